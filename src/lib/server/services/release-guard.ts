/**
 * The hooks the one submit path (submit.service.ts) calls for quality's rules (issue 8): which steps a run needs
 * for completion (a rework run: only its rework steps) and which late records a run refuses (every record once it
 * is released; a rework run's records on steps outside the rework). Kept here so submit.service.ts only calls them.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { Procedure, Step } from '../../procedure/model';
import type { IRun } from '../db/entities';
import { pendingForRuns } from '../repositories/tablet-photos';

/** The sentence a record sent to a released run is refused with (the offline queue holds such records). */
export const RELEASED_REFUSAL =
	'This run was released by the quality lead: its record is closed and takes no more records.';

const stepList = (steps: readonly number[]) => steps.map((i) => i + 1).join(', ');

/** The steps whose sign-off (and verification, where critical) complete the run. */
export function stepsToComplete(model: Procedure, run?: Pick<IRun, 'reworkSteps'>): Step[] {
	const only = run?.reworkSteps;
	return only?.length ? model.steps.filter((s) => only.includes(s.index)) : model.steps;
}

/**
 * Why a record may not be appended to `run` (null when it may). Called under the run's row lock by `append`.
 * `em` is the caller's transaction: the offline issue will hold a record refused here instead of dropping it.
 */
export async function lateRecordRefusal(
	em: EntityManager,
	run: IRun,
	s: { kind: string; body: unknown }
): Promise<string | null> {
	void em;
	if (run.state === 'released') return RELEASED_REFUSAL;
	const steps = run.reworkSteps;
	if (steps?.length && ['attempt', 'signoff', 'verification'].includes(s.kind)) {
		const index = (s.body as { stepIndex?: unknown } | null)?.stepIndex;
		if (typeof index === 'number' && !steps.includes(index))
			return `This rework run covers step${steps.length === 1 ? '' : 's'} ${stepList(steps)} only: step ${index + 1} is not part of the rework.`;
	}
	return null;
}

/**
 * Photos offline (issue 7): a record may name a photo still on its tablet (`tabletPhotos`). Until every such photo
 * is stored, the run is not released — the released record would otherwise point at a picture nobody has seen.
 */
export async function photosOnTheirWayReason(em: EntityManager, runIds: readonly string[]): Promise<string | null> {
	const missing = new Set((await pendingForRuns(em, runIds)).map((p) => p.photoId)).size;
	if (!missing) return null;
	return `${missing} photo${missing === 1 ? ' is' : 's are'} still on the tablet that took ${missing === 1 ? 'it' : 'them'}: release once ${missing === 1 ? 'it has' : 'they have'} been synced.`;
}
