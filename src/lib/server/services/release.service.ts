/**
 * Release (issue 8): the quality lead signs release of a run — with its rework runs — as a `release` record (PIN),
 * then of the job (job state → released through `jobs.service.changeState`). Refused, with every reason, while a
 * finding is open, a record is held, a required result is missing, or the releaser signed any of the run's steps.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import type { RoleName } from '../../accounts/schema';
import { currentRecords } from '../../ledger/step-state';
import type { Procedure } from '../../procedure/model';
import type { ILedgerRecord, IProcedureVersion, IRun, IUser } from '../db/entities';
import * as adminLog from '../repositories/admin-log';
import * as jobs from '../repositories/jobs';
import * as heldRecords from '../repositories/held-records';
import * as ledger from '../repositories/ledger';
import { isQualified } from '../repositories/qualifications';
import * as rework from '../repositories/rework';
import * as runs from '../repositories/runs';
import * as users from '../repositories/users';
import { DESK_DEVICE, type Outcome } from './dispositions.service';
import { changeState } from './jobs.service';
import { appendDeskRecord } from './quality-records';
import { photosOnTheirWayReason } from './release-guard';
import { movedTo } from './run-versions.service';
import type { Viewer } from './runs.service';
import { checkPin } from './submit.service';

/** Who signs releases. */
export const RELEASE_ROLES: RoleName[] = ['quality'];

/** `POST /api/audit/runs/:id/release` and `…/jobs/:id/release`, and the run record page's forms. */
export const releaseSchema = z.object({ pin: z.string().regex(/^\d{6,8}$/, 'Your PIN is 6 to 8 digits.') });
export type ReleaseInput = z.infer<typeof releaseSchema>;

export type ReleaseOutcome<T> = Outcome<T> | { ok: false; status: 403 | 409; message: string; reasons: string[] };

type Body = Record<string, unknown>;
const bodyOf = (r: { body: unknown }): Body =>
	r.body && typeof r.body === 'object' && !Array.isArray(r.body) ? (r.body as Body) : {};
const SIGNED_KINDS = ['signoff', 'attempt', 'verification'];

/** Held records of a run not yet resolved (the offline issue's holding queue). */
export function heldCount(em: EntityManager, runId: string): Promise<number> {
	return heldRecords.countForRun(em, runId);
}

interface Member {
	run: IRun;
	records: ILedgerRecord[];
}

async function members(em: EntityManager, runId: string): Promise<Member[]> {
	const out: Member[] = [];
	for (const id of await rework.family(em, runId)) {
		const run = await runs.findById(em, id);
		if (run) out.push({ run, records: await ledger.listForRun(em, id) });
	}
	return out;
}

/** Whether `actor` signed any step of the runs: a release is signed by someone who did none of the work. */
function signedByReleaser(all: Member[], actor: Viewer): string | null {
	const did = all.flatMap((m) => m.records).find((r) => r.signerId === actor.id && SIGNED_KINDS.includes(r.kind));
	if (!did) return null;
	const n = bodyOf(did).stepIndex;
	return `${actor.name} signed a ${did.kind} of step ${typeof n === 'number' ? n + 1 : '?'} on this run, so cannot release it: a release is signed by someone who signed none of its steps.`;
}

/**
 * Every reason the run (with its rework runs) cannot be released now; empty when it can. The latest current
 * sign-off of each step, across the run and its rework runs, is the one whose results count.
 */
async function reasonsNotReady(em: EntityManager, all: Member[]): Promise<string[]> {
	const [root, ...reworks] = all;
	const reasons: string[] = [];
	if (root.run.state !== 'awaiting_review')
		reasons.push('Not every step is signed (and every critical step verified) yet: the run is not awaiting review.');
	const moved = await movedTo(em, root.run.id);
	if (moved) reasons.push(`The run was moved to version ${moved.toVersion}: release run ${moved.newRunId} instead.`);
	for (const r of reworks)
		if (r.run.state !== 'awaiting_review' && r.run.state !== 'released')
			reasons.push(
				`The rework of step ${(r.run.reworkSteps ?? []).map((i) => i + 1).join(', ')} (${(r.run.assignedTo as unknown as IUser).name}) is not complete yet.`
			);

	const records = all.flatMap((m) => m.records);
	const decisions = new Map(
		records.filter((r) => r.kind === 'disposition').map((d) => [String(bodyOf(d).findingId), bodyOf(d)] as const)
	);
	for (const f of records.filter((r) => r.kind === 'finding')) {
		const b = bodyOf(f);
		const where = typeof b.stepIndex === 'number' ? `on step ${b.stepIndex + 1}` : 'on the run';
		const d = decisions.get(f.id);
		if (!d) reasons.push(`A finding ${where} has no disposition yet: “${String(b.text ?? '')}”.`);
		else if (d.decision === 'scrap')
			reasons.push(`A finding ${where} was dispositioned scrap: the unit is not released.`);
	}
	for (const m of all) {
		const held = await heldCount(em, m.run.id);
		if (held)
			reasons.push(`${held} record${held === 1 ? ' is' : 's are'} held for review on this run: resolve them first.`);
	}
	// Issue 7: photos a record declared while they were still on the tablet.
	const runIds = all.map((m) => m.run.id);
	const photos = await photosOnTheirWayReason(em, runIds);
	if (photos) reasons.push(photos);

	const model = (root.run.procedureVersion as unknown as IProcedureVersion).model as unknown as Procedure;
	const latest = new Map<number, ILedgerRecord>();
	for (const m of all)
		for (const r of currentRecords(m.records))
			if (r.kind === 'signoff' && typeof bodyOf(r).stepIndex === 'number') {
				const i = bodyOf(r).stepIndex as number;
				const prev = latest.get(i);
				if (!prev || prev.serverTime <= r.serverTime) latest.set(i, r);
			}
	for (const step of model.steps) {
		const signoff = latest.get(step.index);
		for (const cp of step.checkpoints.filter((c) => c.kind === 'test')) {
			const ev = (
				Array.isArray(signoff && bodyOf(signoff).evaluation) ? (bodyOf(signoff!).evaluation as Body[]) : []
			).find((e) => e?.checkpointId === cp.id);
			if (!ev && cp.when) continue;
			if (!ev) reasons.push(`Step ${step.index + 1}: the required test ${cp.id} has no result.`);
			else if (ev.status !== 'pass') reasons.push(`Step ${step.index + 1}: the required test ${cp.id} did not pass.`);
		}
		const qualification = step.qualification;
		if (qualification && signoff && signoff.signerId) {
			if (!(await isQualified(em, signoff.signerId, qualification, signoff.serverTime)))
				reasons.push(
					`Step ${step.index + 1} needs the ${qualification} qualification, which its signer did not hold when signing.`
				);
		}
	}
	return reasons;
}

/** What the run record page shows beside the release button. */
export interface ReleaseState {
	released: boolean;
	jobState: string;
	isRework: boolean;
	reworks: { id: string; steps: number[]; technician: string; state: string }[];
	reasons: string[];
}

export async function releaseState(em: EntityManager, actor: Viewer, runId: string): Promise<ReleaseState | null> {
	const all = await members(em, runId);
	if (!all.length) return null;
	const [root, ...reworks] = all;
	const mine = signedByReleaser(all, actor);
	return {
		released: root.run.state === 'released',
		jobState: (root.run.job as unknown as { state: string }).state,
		isRework: !!root.run.reworkOf,
		reworks: reworks.map((r) => ({
			id: r.run.id,
			steps: (r.run.reworkSteps ?? []).map((i) => i + 1),
			technician: (r.run.assignedTo as unknown as IUser).name,
			state: r.run.state
		})),
		reasons: root.run.state === 'released' ? [] : [...(mine ? [mine] : []), ...(await reasonsNotReady(em, all))]
	};
}

async function signerFor(em: EntityManager, actor: Viewer, pin: string, now: Date) {
	const signer = await users.findById(em, actor.id);
	if (!signer || !signer.active) return { ok: false as const, reason: 'Your account is not active.' };
	return checkPin(em, signer, DESK_DEVICE, pin, now);
}

/**
 * Signs release of a run and its rework runs: a `release` record in each chain, state → released, admin log, in one
 * transaction that holds every one of their row locks (so no record slips in between the checks and the release).
 */
export async function releaseRun(
	em: EntityManager,
	actor: Viewer,
	runId: string,
	input: ReleaseInput,
	opts: { now?: Date } = {}
): Promise<ReleaseOutcome<{ recordId: string; head: string; released: string[] }>> {
	if (!actor.roles.some((r) => RELEASE_ROLES.includes(r)))
		return { ok: false, status: 403, message: 'Releasing is for a quality lead.' };
	const first = await runs.findById(em, runId);
	if (!first) return { ok: false, status: 404, message: 'No such run.' };
	if (first.reworkOf)
		return {
			ok: false,
			status: 409,
			message: 'This is a rework run: release the original run, and its rework runs are released with it.'
		};
	if (first.state === 'released') return { ok: false, status: 409, message: 'The run is already released.' };
	const all = await members(em, runId);
	const mine = signedByReleaser(all, actor);
	if (mine) return { ok: false, status: 403, message: mine, reasons: [mine] };
	const before = await reasonsNotReady(em, all);
	if (before.length) return { ok: false, status: 409, message: before.join(' '), reasons: before };
	const now = opts.now ?? new Date();
	const pin = await signerFor(em, actor, input.pin, now);
	if (!pin.ok) return { ok: false, status: 400, message: pin.reason, field: 'pin' };

	return em.fork({ clear: true }).transactional(async (tx) => {
		const ids = all.map((m) => m.run.id);
		const locked: IRun[] = [];
		for (const id of ids) locked.push((await runs.lockForAppend(tx, id))!);
		const again = await members(tx, runId);
		const mine = signedByReleaser(again, actor);
		const reasons = [...(mine ? [mine] : []), ...(await reasonsNotReady(tx, again))];
		if (reasons.length) return { ok: false as const, status: 409 as const, message: reasons.join(' '), reasons };
		const [root, ...reworks] = locked;
		const signer = { id: actor.id, name: actor.name, role: 'quality' as const };
		for (const r of reworks) {
			appendDeskRecord(
				tx,
				r,
				'release',
				{ released: 'rework', of: root.id, head: r.headHash ?? null, count: r.recordCount },
				signer,
				now
			);
			r.state = 'released';
		}
		const stored = appendDeskRecord(
			tx,
			root,
			'release',
			{ released: 'run', head: root.headHash ?? null, count: root.recordCount, reworkRuns: reworks.map((r) => r.id) },
			signer,
			now
		);
		root.state = 'released';
		adminLog.append(tx, actor, {
			action: 'run.released',
			subjectType: 'run',
			subjectId: root.id,
			detail: { recordId: stored.id, head: stored.hash, reworkRuns: reworks.map((r) => r.id) }
		});
		await tx.flush();
		return { ok: true as const, value: { recordId: stored.id, head: stored.hash, released: ids } };
	});
}

/**
 * Releases a job once every run on it is released (rework runs go with their run; a run moved to another version
 * counts through the run it moved to). The state move itself is `jobs.service.changeState` (transition rules,
 * conditional UPDATE, history, admin log).
 */
export async function releaseJob(
	em: EntityManager,
	actor: Viewer,
	jobId: string,
	input: ReleaseInput,
	opts: { now?: Date } = {}
): Promise<ReleaseOutcome<{ jobNumber: string }>> {
	if (!actor.roles.some((r) => RELEASE_ROLES.includes(r)))
		return { ok: false, status: 403, message: 'Releasing is for a quality lead.' };
	const list = await runs.listForJob(em, jobId);
	const job = await jobs.findById(em, jobId);
	if (!job) return { ok: false, status: 404, message: 'No such job.' };
	const reasons: string[] = [];
	if (!list.length) reasons.push('No run was worked on this job: there is nothing to release.');
	for (const run of list.filter((r) => !r.reworkOf)) {
		if (await movedTo(em, run.id)) continue;
		if (run.state !== 'released')
			reasons.push(
				`The run of ${(run.procedureVersion as unknown as { procedure: { title: string } }).procedure.title} is not released yet.`
			);
	}
	for (const run of list) {
		const mine = signedByReleaser([{ run, records: await ledger.listForRun(em, run.id) }], actor);
		if (mine) return { ok: false, status: 403, message: mine, reasons: [mine] };
	}
	if (reasons.length) return { ok: false, status: 409, message: reasons.join(' '), reasons };
	const now = opts.now ?? new Date();
	const pin = await signerFor(em, actor, input.pin, now);
	if (!pin.ok) return { ok: false, status: 400, message: pin.reason, field: 'pin' };
	const moved = await changeState(em, actor, jobId, {
		to: 'released',
		reason: `Released by ${actor.name}: every run on the job is released.`
	});
	if (!moved.ok) return { ok: false, status: 409, message: moved.message, reasons: [moved.message] };
	return { ok: true, value: { jobNumber: job.jobNumber } };
}
