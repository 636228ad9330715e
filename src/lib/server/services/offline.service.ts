/**
 * What a tablet stores to run a job with the network down: the runner view (as the runner page shows it), the
 * pinned version's source, and the pictures its steps show (id + sha256, so the tablet can check what it cached).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import * as images from '../repositories/images';
import * as runs from '../repositories/runs';
import { entryContext, type EntryContext } from './run-entry-context';
import { runRecordsView, type RunRecordsView } from './run-records-view';
import { runnerView, type RunnerView } from './runner.service';
import { maySee, SUBMIT_ROLES, type Result, type Viewer } from './runs.service';

export interface OfflineRunnerView extends RunnerView {
	canSign: boolean;
	/** the lots and wrenches checkpoint entry offers (what the runner page's server load used to add). */
	entryContext: EntryContext;
	/** handover note, leads and workers for N/A, handover, corrections and unlock. */
	records: RunRecordsView;
	source: string;
	images: { id: string; sha256: string }[];
	/** Server clock when the view was made (ms): the tablet measures its offset from it. */
	serverTime: number;
}

const IMAGE_REF = /\/images\/([0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12})/g;

export async function offlineRunner(
	em: EntityManager,
	viewer: Viewer,
	runId: string
): Promise<Result<OfflineRunnerView>> {
	const view = await runnerView(em, viewer, runId);
	if (!view.ok) return view;
	const version = await runs.findVersion(em, view.value.run.procedureVersionId);
	if (!version) return { ok: false, status: 404, message: 'No such run.' };
	const ids = new Set(view.value.stepHtml.flatMap((html) => [...html.matchAll(IMAGE_REF)].map((m) => m[1])));
	const pictures: { id: string; sha256: string }[] = [];
	for (const id of ids) {
		const row = await images.findById(em, id);
		if (row) pictures.push({ id: row.id, sha256: row.sha256 });
	}
	const moved = view.value.versionNotice?.decision?.decision === 'move';
	return {
		ok: true,
		value: {
			...view.value,
			canSign: SUBMIT_ROLES.some((r) => viewer.roles.includes(r)) && !moved,
			entryContext: await entryContext(em, view.value.model),
			records: await runRecordsView(em, view.value.run),
			source: version.source,
			images: pictures,
			serverTime: Date.now()
		}
	};
}

/**
 * The runner page's own check (the page renders from the tablet's store, so its server load only decides who gets
 * the page at all): the run exists and the viewer may see it. One row read, no records.
 */
export async function mayOpenRun(em: EntityManager, viewer: Viewer, runId: string): Promise<boolean> {
	const run = await runs.findById(em, runId);
	return run !== null && run !== undefined && (await maySee(em, viewer, run));
}
