/**
 * Where the bench runner gets its data: from the tablet's store, refreshed from the server when it answers. The
 * runner renders the same stored view online and offline, so a run that opens here opens with the network down.
 *
 * - {@link makeAvailable} fetches a run's view (`GET /api/runs/:id/runner`), checks the pinned source against its
 *   content hash, fetches the step pictures into the store, and saves it all.
 * - {@link openRun} refreshes when it can (short timeout) and falls back to the stored copy; records signed on this
 *   tablet and still in the outbox are laid over the view so the steps show as signed.
 */
import { contentHash } from '$lib/procedure/hash';
import type { OfflineRunnerView } from '$lib/server/services/offline.service';
import { getRun, KEYS, saveRun, type OfflineImage, type OfflineRun, type OfflineStore } from './offline-store';
import type { OutboxItem, RefusedItem } from './outbox';

export type FetchLike = (input: string, init?: RequestInit) => Promise<Response>;

/** How long the runner waits for the server before it opens the stored copy (a dead Wi-Fi often hangs, not fails). */
export const REFRESH_TIMEOUT_MS = 4_000;

export class NotOnThisTablet extends Error {
	constructor(readonly runId: string) {
		super('This run is not available on this tablet and the server cannot be reached.');
		this.name = 'NotOnThisTablet';
	}
}

async function fetchView(fetch: FetchLike, runId: string, timeoutMs: number): Promise<OfflineRunnerView | 'gone'> {
	const res = await fetch(`/api/runs/${runId}/runner`, { signal: AbortSignal.timeout(timeoutMs) });
	if (res.status === 404 || res.status === 403) return 'gone';
	if (!res.ok) throw new Error(`The server answered ${res.status}.`);
	return (await res.json()) as OfflineRunnerView;
}

async function fetchImages(fetch: FetchLike, view: OfflineRunnerView, old: OfflineImage[]): Promise<OfflineImage[]> {
	const out: OfflineImage[] = [];
	for (const img of view.images) {
		const kept = old.find((o) => o.id === img.id && o.sha256 === img.sha256 && o.blob);
		if (kept) {
			out.push(kept);
			continue;
		}
		try {
			const res = await fetch(`/images/${img.id}`);
			out.push(res.ok ? { ...img, blob: await res.blob() } : { ...img });
		} catch {
			out.push({ ...img }); // shown as missing offline; fetched again next time
		}
	}
	return out;
}

function toStored(
	view: OfflineRunnerView,
	images: OfflineImage[],
	old: OfflineRun | undefined,
	now: number
): OfflineRun {
	return {
		runId: view.run.id,
		jobNumber: view.run.jobNumber,
		procedureVersionId: view.run.procedureVersionId,
		contentHash: view.run.contentHash,
		source: view.source,
		model: view.model,
		images,
		takenAt: old?.takenAt ?? now,
		signed: old?.signed ?? [],
		view
	};
}

/** Fetches and stores a run for offline use; throws with a sentence when it cannot. */
export async function makeAvailable(
	store: OfflineStore,
	fetch: FetchLike,
	runId: string,
	now = Date.now(),
	timeoutMs = 15_000
): Promise<OfflineRun> {
	const view = await fetchView(fetch, runId, timeoutMs);
	if (view === 'gone') throw new Error('The server has no such run for you.');
	if (contentHash(view.source) !== view.run.contentHash)
		throw new Error('The procedure text does not match the version this run is pinned to; nothing was stored.');
	const old = await getRun(store, runId);
	const stored = toStored(view, await fetchImages(fetch, view, old?.images ?? []), old, now);
	await saveRun(store, stored);
	return stored;
}

/** Where the view came from, for the runner's banner. */
export type ViewOrigin = 'server' | 'tablet';

export interface OpenedRun {
	view: OfflineRunnerView;
	origin: ViewOrigin;
	stored: OfflineRun;
	/** Records signed here that the server has not answered yet (drawn as signed, marked waiting). */
	pending: OutboxItem['record'][];
	/** Records of this run the server refused at sync, with the reason, until someone marks them dealt with. */
	refused: RefusedItem[];
}

/** Opens a run: refreshed from the server when it answers in time, else the stored copy; throws NotOnThisTablet. */
export async function openRun(
	store: OfflineStore,
	fetch: FetchLike,
	runId: string,
	now = Date.now(),
	timeoutMs = REFRESH_TIMEOUT_MS
): Promise<OpenedRun> {
	let stored: OfflineRun | undefined;
	let origin: ViewOrigin = 'tablet';
	try {
		stored = await makeAvailable(store, fetch, runId, now, timeoutMs);
		origin = 'server';
	} catch {
		stored = await getRun(store, runId);
	}
	if (!stored?.view) throw new NotOnThisTablet(runId);
	const outbox = await store.transact('readonly', (tx) => tx.range<OutboxItem>(['outbox']));
	const known = new Set(stored.view.run.records.map((r) => r.id));
	const pending = outbox.map(([, item]) => item.record).filter((r) => r.runId === runId && !known.has(r.id));
	const refused = (await store.transact('readonly', (tx) => tx.range<RefusedItem>(['refused'])))
		.map(([, item]) => item)
		.filter((item) => item.record.runId === runId);
	return { view: stored.view, origin, stored, pending, refused };
}

/** Step HTML with stored pictures swapped in as blob URLs (CSP allows `blob:` images); call `revoke` when done. */
export function htmlWithStoredImages(html: string, images: OfflineImage[]): { html: string; revoke: () => void } {
	const urls: string[] = [];
	let out = html;
	for (const img of images) {
		if (!img.blob || !out.includes(`/images/${img.id}`)) continue;
		const url = URL.createObjectURL(img.blob);
		urls.push(url);
		out = out.replaceAll(`/images/${img.id}`, url);
	}
	return { html: out, revoke: () => urls.forEach((u) => URL.revokeObjectURL(u)) };
}

/** Drops a run from this tablet (its unsent records stay in the outbox). */
export function forgetRun(store: OfflineStore, runId: string): Promise<void> {
	return store.delMany([KEYS.run(runId)]);
}
