import type { EntityManager } from '@mikro-orm/postgresql';
import type { RoleName } from '$lib/accounts/schema';
import type { JsonValue } from '../../ledger/jcs';
import type { IJob, IProcedureVersion, IRun, IUser, RunState } from '../db/entities';
import * as adminLog from '../repositories/admin-log';
import * as jobs from '../repositories/jobs';
import * as ledger from '../repositories/ledger';
import * as runs from '../repositories/runs';
import * as runRecords from '../repositories/run-records';
import * as users from '../repositories/users';
import type { StartRunInput } from './runs.schema';

export interface Viewer {
	id: string;
	name: string;
	roles: readonly RoleName[];
}

export type Result<T> =
	{ ok: true; value: T } | { ok: false; status: 400 | 403 | 404 | 409; message: string; field?: string };

const refuse = (status: 400 | 403 | 404 | 409, message: string, field?: string): Result<never> => ({
	ok: false,
	status,
	message,
	field
});

/** Who may start a run (and assign it). */
export const START_ROLES: RoleName[] = ['technician', 'lead', 'admin'];
/** Roles that may start a run for someone else; a technician starts runs assigned to themselves only. */
export const ASSIGN_OTHERS_ROLES: RoleName[] = ['lead', 'admin'];
/** Who may read runs: technicians their own (see {@link maySee}), the others all. */
export const READ_ROLES: RoleName[] = ['technician', 'lead', 'quality', 'admin'];
/** Who may submit records (a quality lead verifies critical steps). */
export const SUBMIT_ROLES: RoleName[] = ['technician', 'lead', 'quality'];
/** Roles a run may be assigned to. */
const ASSIGNABLE: RoleName[] = ['technician', 'lead'];
/** Job states in which a run may start. */
const STARTABLE_JOB_STATES: IJob['state'][] = ['received', 'in_work', 'on_hold', 'awaiting_parts'];

export interface RunRecordView {
	id: string;
	seq: number;
	kind: string;
	body: JsonValue;
	prevHash: string | null;
	hash: string;
	signerId: string | null;
	signerRole: string;
	deviceId: string | null;
	deviceTime: string | null;
	serverTime: string;
	engineVersion: string;
	signedOffline: boolean;
}

export interface RunView {
	id: string;
	state: RunState;
	jobId: string;
	jobNumber: string;
	procedureVersionId: string;
	procedureId: string;
	versionNumber: number;
	contentHash: string;
	assignedTo: { id: string; name: string };
	startedBy: { id: string; name: string };
	headHash: string | null;
	recordCount: number;
	createdAt: string;
	records: RunRecordView[];
}

const person = (u: IUser) => ({ id: u.id, name: u.name });

/**
 * "Own runs" of a technician: the runs assigned to them, the runs in which they signed at least one record (so
 * whoever continued a handed-over run, or helped on one, keeps seeing it), and the runs a handover names them to
 * take over. Leads, quality leads and admins see all.
 */
export async function maySee(em: EntityManager, viewer: Viewer, run: IRun): Promise<boolean> {
	if (viewer.roles.some((r) => r !== 'technician' && READ_ROLES.includes(r))) return true;
	if (!viewer.roles.includes('technician')) return false;
	if ((run.assignedTo as unknown as IUser).id === viewer.id) return true;
	return (await runs.hasSigned(em, run.id, viewer.id)) || runRecords.handedOverTo(em, run.id, viewer.id);
}

/**
 * Starts a run: the job must be open, the version published and not retired, and the content hash the one the
 * person saw (so nobody starts on a text other than the one on their screen); the assignee must be an active
 * technician or lead. Written with an admin-log entry.
 */
export async function startRun(
	em: EntityManager,
	actor: Viewer,
	input: StartRunInput
): Promise<Result<{ id: string }>> {
	if (!actor.roles.some((r) => START_ROLES.includes(r)))
		return refuse(403, 'Starting a run is for a technician, a lead or an administrator.');
	if (input.assignedToId !== actor.id && !actor.roles.some((r) => ASSIGN_OTHERS_ROLES.includes(r)))
		return refuse(403, 'A technician starts runs for themselves; a lead assigns runs to others.', 'assignedToId');
	const job = await jobs.findById(em, input.jobId);
	if (!job) return refuse(404, 'No such job.', 'jobId');
	if (!STARTABLE_JOB_STATES.includes(job.state))
		return refuse(409, `Job ${job.jobNumber} is ${job.state.replace('_', ' ')}: no run can start on it.`, 'jobId');
	const version = await runs.findVersion(em, input.procedureVersionId);
	if (!version) return refuse(404, 'No such published version.', 'procedureVersionId');
	if (version.retiredAt)
		return refuse(
			409,
			`Version ${version.number} is retired: start the run on a current version.`,
			'procedureVersionId'
		);
	if (version.contentHash !== input.contentHash)
		return refuse(409, 'The version text is not the one this request names (content hash differs).', 'contentHash');
	const assignee = await users.findById(em, input.assignedToId);
	if (!assignee || !assignee.active)
		return refuse(400, 'The person to assign is not an active account.', 'assignedToId');
	if (!assignee.roles.some((r) => ASSIGNABLE.includes(r)))
		return refuse(400, `${assignee.name} is not a technician or lead and cannot be assigned a run.`, 'assignedToId');
	const run = runs.create(em, {
		jobId: job.id,
		procedureVersionId: version.id,
		contentHash: version.contentHash,
		assignedToId: assignee.id,
		startedById: actor.id
	});
	adminLog.append(em, actor, {
		action: 'run.started',
		subjectType: 'run',
		subjectId: run.id,
		detail: {
			jobNumber: job.jobNumber,
			versionId: version.id,
			version: version.number,
			contentHash: version.contentHash,
			assignedTo: assignee.id
		}
	});
	await em.flush();
	return { ok: true, value: { id: run.id } };
}

/** The run with its records in chain order, if the viewer may see it (otherwise "not found", revealing nothing). */
export async function getRun(em: EntityManager, viewer: Viewer, id: string): Promise<Result<RunView>> {
	const run = await runs.findById(em, id);
	if (!run || !(await maySee(em, viewer, run))) return refuse(404, 'No such run.');
	const version = run.procedureVersion as unknown as IProcedureVersion;
	const job = run.job as unknown as IJob;
	const records = await ledger.listForRun(em, run.id);
	return {
		ok: true,
		value: {
			id: run.id,
			state: run.state,
			jobId: job.id,
			jobNumber: job.jobNumber,
			procedureVersionId: version.id,
			procedureId: (version.procedure as unknown as { id: string }).id,
			versionNumber: version.number,
			contentHash: run.contentHash,
			assignedTo: person(run.assignedTo as unknown as IUser),
			startedBy: person(run.startedBy as unknown as IUser),
			headHash: run.headHash ?? null,
			recordCount: run.recordCount,
			createdAt: run.createdAt.toISOString(),
			records: records.map((r) => ({
				id: r.id,
				seq: r.seq,
				kind: r.kind,
				body: r.body,
				prevHash: r.prevHash ?? null,
				hash: r.hash,
				signerId: r.signerId ?? null,
				signerRole: r.signerRole,
				deviceId: r.deviceId ?? null,
				deviceTime: r.deviceTime ? r.deviceTime.toISOString() : null,
				serverTime: r.serverTime.toISOString(),
				engineVersion: r.engineVersion,
				signedOffline: r.signedOffline
			}))
		}
	};
}
