/**
 * What a tablet stores to run a job with the network down: the runner view (as the runner page shows it), the
 * pinned version's source, and the pictures its steps show (id + sha256, so the tablet can check what it cached).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import * as images from '../repositories/images';
import * as runs from '../repositories/runs';
import { runnerView, type RunnerView } from './runner.service';
import { SUBMIT_ROLES, type Result, type Viewer } from './runs.service';

export interface OfflineRunnerView extends RunnerView {
	canSign: boolean;
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
			source: version.source,
			images: pictures,
			serverTime: Date.now()
		}
	};
}
