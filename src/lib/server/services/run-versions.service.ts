/**
 * A run keeps the version it started on. When a newer version of its procedure is published while the run is in
 * progress, the runner shows a notice and a lead (or an administrator) decides: continue on the run's version, or
 * move — a new run on the newer version for the same job and assignee, and the old run takes no more records.
 * Decisions are admin-log entries (`run.version_decision`), so the run's schema is unchanged.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { RoleName } from '$lib/accounts/schema';
import type { IJob, IProcedure, IProcedureVersion, IRun, IUser } from '../db/entities';
import * as adminLog from '../repositories/admin-log';
import * as procedures from '../repositories/procedures';
import * as runs from '../repositories/runs';
import { maySee, startRun, type Result, type Viewer } from './runs.service';

/** Who decides whether a run continues or moves. */
export const DECIDE_ROLES: RoleName[] = ['lead', 'admin'];
const ACTION = 'run.version_decision';
/** Run states in which the decision is open (a run awaiting review is finished). */
const OPEN_STATES: IRun['state'][] = ['in_progress', 'paused'];

export interface Decision {
	decision: 'continue' | 'move';
	by: string;
	at: string;
	/** The newer version the decision was about. */
	toVersion: number;
	newRunId?: string;
}
export interface VersionNotice {
	runVersion: number;
	/** The newest current (not retired) version above the run's, if any. */
	newer: { id: string; number: number; publishedAt: string; changeNote: string } | null;
	/** The decision about `newer` (or the move, whenever it was made); null while nobody has decided. */
	decision: Decision | null;
	canDecide: boolean;
}

const refuse = (status: 400 | 403 | 404 | 409, message: string): Result<never> => ({ ok: false, status, message });

async function decisions(em: EntityManager, runId: string): Promise<Decision[]> {
	return (await adminLog.forSubject(em, ACTION, 'run', runId)).map((e) => {
		const d = e.detail as { decision: Decision['decision']; toVersion: number; newRunId?: string };
		return { ...d, by: e.actorName ?? 'someone', at: e.at.toISOString() };
	});
}

/** The run this run was moved to, if a lead moved it (the submit service then refuses records on it). */
export async function movedTo(em: EntityManager, runId: string): Promise<Decision | null> {
	return (await decisions(em, runId)).find((d) => d.decision === 'move') ?? null;
}

async function newerThan(em: EntityManager, version: IProcedureVersion) {
	const procedureId = (version.procedure as unknown as IProcedure).id;
	const all = await procedures.listVersionsLight(em, [procedureId]);
	return all.filter((v) => !v.retiredAt && v.number > version.number).at(-1) ?? null;
}

/** The notice for the runner (null when there is nothing to say). */
export async function versionNotice(em: EntityManager, viewer: Viewer, run: IRun): Promise<VersionNotice | null> {
	const version = run.procedureVersion as unknown as IProcedureVersion;
	const all = await decisions(em, run.id);
	const move = all.find((d) => d.decision === 'move') ?? null;
	const newer = OPEN_STATES.includes(run.state) ? await newerThan(em, version) : null;
	if (!move && !newer) return null;
	const decided = move ?? all.find((d) => newer && d.toVersion >= newer.number) ?? null;
	return {
		runVersion: version.number,
		newer: newer && {
			id: newer.id,
			number: newer.number,
			publishedAt: newer.publishedAt.toISOString(),
			changeNote: newer.changeNote
		},
		decision: decided,
		canDecide: !decided && viewer.roles.some((r) => DECIDE_ROLES.includes(r))
	};
}

/**
 * Records a lead's decision about the newer version `toVersionId` (the one the lead saw: if another was published
 * since, the request is refused so nobody decides about a text they did not see). A move starts the new run through
 * {@link startRun} under the old run's row lock, so no record lands on the old run after the move.
 */
export async function decideVersion(
	em: EntityManager,
	actor: Viewer,
	runId: string,
	input: { decision: 'continue' | 'move'; toVersionId: string }
): Promise<Result<{ decision: 'continue' | 'move'; runId: string }>> {
	if (!actor.roles.some((r) => DECIDE_ROLES.includes(r)))
		return refuse(403, 'Whether a run continues or moves is for a lead or an administrator to decide.');
	const run = await runs.findById(em, runId);
	if (!run || !(await maySee(em, actor, run))) return refuse(404, 'No such run.');
	if (!OPEN_STATES.includes(run.state))
		return refuse(409, 'The run is awaiting review: there is nothing left to decide.');
	if (await movedTo(em, run.id)) return refuse(409, 'This run was already moved to a newer version.');
	const version = run.procedureVersion as unknown as IProcedureVersion;
	const newer = await newerThan(em, version);
	if (!newer) return refuse(409, `There is no current version newer than version ${version.number}.`);
	if (newer.id !== input.toVersionId)
		return refuse(409, `Version ${newer.number} is now the newest: reload the run and decide about that one.`);
	const detail = { decision: input.decision, fromVersion: version.number, toVersion: newer.number };
	if (input.decision === 'continue') {
		adminLog.append(em, actor, { action: ACTION, subjectType: 'run', subjectId: run.id, detail });
		await em.flush();
		return { ok: true, value: { decision: 'continue', runId: run.id } };
	}
	return em.transactional(async (tx) => {
		await runs.lockForAppend(tx, run.id);
		if (await movedTo(tx, run.id)) return refuse(409, 'This run was already moved to a newer version.');
		const started = await startRun(tx, actor, {
			jobId: (run.job as unknown as IJob).id,
			procedureVersionId: newer.id,
			contentHash: newer.contentHash,
			assignedToId: (run.assignedTo as unknown as IUser).id
		});
		if (!started.ok) return refuse(started.status, started.message);
		adminLog.append(tx, actor, {
			action: ACTION,
			subjectType: 'run',
			subjectId: run.id,
			detail: { ...detail, newRunId: started.value.id }
		});
		await tx.flush();
		return { ok: true as const, value: { decision: 'move' as const, runId: started.value.id } };
	});
}
