/**
 * The runner's rarely opened panels (and rarely shown parts), loaded with a dynamic `import()` the first time one is opened, so the runner
 * page's JavaScript stays small (issue 6: ≤ 120 KB gzipped). Each loader is memoised: a second opening reuses the
 * module. Offline they still open: the service worker caches every built chunk (`build` in src/service-worker).
 */
const once = <T>(load: () => Promise<{ default: T }>) => {
	let got: Promise<T> | undefined;
	return () =>
		(got ??= load()
			.then((m) => m.default)
			.catch((error: unknown) => {
				got = undefined; // a failed load (chunk not cached, server gone) is tried again next time
				throw error;
			}));
};

export const lazyPanels = {
	notApplicable: once(() => import('./NotApplicablePanel.svelte')),
	handover: once(() => import('./HandoverPanel.svelte')),
	correction: once(() => import('./CorrectionPanel.svelte')),
	unlock: once(() => import('./UnlockPanel.svelte')),
	finding: once(() => import('./FindingForm.svelte')),
	/** Part and fluid-lot checkpoints only. */
	part: once(() => import('./PartEntry.svelte')),
	/** Shown only on a run that was handed over. */
	handoverNote: once(() => import('./HandoverNote.svelte'))
};
