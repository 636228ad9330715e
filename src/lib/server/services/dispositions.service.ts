/**
 * Findings and their dispositions (issue 8): the quality lead decides — rework, replace, use as is (with a written
 * justification), scrap — and signs with their PIN (the runner's PIN check and lockout, `checkPin`). The decision is
 * a `disposition` record in the chain of the finding's run; a rework opens a linked run of the affected steps.
 * Routes check the role; everything here returns plain objects.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { RoleName } from '../../accounts/schema';
import { currentRecords } from '../../ledger/step-state';
import type { Procedure } from '../../procedure/model';
import {
	LedgerRecord,
	type IJob,
	type ILedgerRecord,
	type IProcedureVersion,
	type IRun,
	type IUser
} from '../db/entities';
import * as adminLog from '../repositories/admin-log';
import * as ledger from '../repositories/ledger';
import * as rework from '../repositories/rework';
import * as runs from '../repositories/runs';
import * as users from '../repositories/users';
import { DECISION_LABELS, type Decision, type DispositionInput } from './dispositions.schema';
import { appendDeskRecord } from './quality-records';
import type { Viewer } from './runs.service';
import { checkPin } from './submit.service';

/** Who decides about findings. */
export const DISPOSITION_ROLES: RoleName[] = ['quality'];
/** The PIN lock of a decision signed at the quality desk (no tablet). */
export const DESK_DEVICE = '';

export type Outcome<T> =
	{ ok: true; value: T } | { ok: false; status: 400 | 403 | 404 | 409; message: string; field?: string };
const refuse = (status: 400 | 403 | 404 | 409, message: string, field?: string): Outcome<never> => ({
	ok: false,
	status,
	message,
	field
});

type Body = Record<string, unknown>;
const bodyOf = (r: { body: unknown }): Body =>
	r.body && typeof r.body === 'object' && !Array.isArray(r.body) ? (r.body as Body) : {};
const str = (v: unknown): string | null => (typeof v === 'string' ? v : null);

export interface DispositionView {
	id: string;
	decision: Decision;
	label: string;
	justification: string;
	by: string;
	at: string;
	steps: number[];
	reworkRunId: string | null;
}

export interface FindingSummary {
	id: string;
	runId: string;
	jobNumber: string;
	text: string;
	raisedBy: string;
	at: string;
	/** 1-based step number, or null for a finding on the run as a whole. */
	step: number | null;
	checkpointId: string | null;
	disposition: DispositionView | null;
}

function toDisposition(d: ILedgerRecord): DispositionView {
	const b = bodyOf(d);
	const decision = (str(b.decision) ?? 'use_as_is') as Decision;
	return {
		id: d.id,
		decision,
		label: DECISION_LABELS[decision] ?? decision,
		justification: str(b.justification) ?? '',
		by: str((b.signer as Body | undefined)?.name) ?? 'unknown',
		at: d.serverTime.toISOString(),
		steps: Array.isArray(b.stepIndexes) ? (b.stepIndexes as number[]).map((i) => i + 1) : [],
		reworkRunId: str(b.reworkRunId)
	};
}

function toSummary(f: ILedgerRecord, disposition: ILedgerRecord | undefined): FindingSummary {
	const b = bodyOf(f);
	const run = f.run as unknown as IRun;
	return {
		id: f.id,
		runId: run.id,
		jobNumber: (run.job as unknown as IJob).jobNumber,
		text: str(b.text) ?? '',
		raisedBy:
			b.raisedBy === 'server'
				? 'The server (evaluation overruled)'
				: (str((b.signer as Body | undefined)?.name) ?? 'unknown'),
		at: f.serverTime.toISOString(),
		step: typeof b.stepIndex === 'number' ? b.stepIndex + 1 : null,
		checkpointId: str(b.checkpointId),
		disposition: disposition ? toDisposition(disposition) : null
	};
}

/** Disposition records by the finding they name. */
async function dispositionsFor(em: EntityManager, findingIds: string[]): Promise<Map<string, ILedgerRecord>> {
	if (!findingIds.length) return new Map();
	const rows = await em.find(LedgerRecord, { kind: 'disposition' }, { orderBy: { serverTime: 'asc' } });
	const wanted = new Set(findingIds);
	const out = new Map<string, ILedgerRecord>();
	for (const d of rows) {
		const id = str(bodyOf(d).findingId);
		if (id && wanted.has(id) && !out.has(id)) out.set(id, d);
	}
	return out;
}

/** Findings newest first: the open ones (no disposition yet), or all with their disposition. */
export async function listFindings(em: EntityManager, status: 'open' | 'all'): Promise<FindingSummary[]> {
	const findings = await em.find(
		LedgerRecord,
		{ kind: 'finding' },
		{ populate: ['run.job'], orderBy: { serverTime: 'desc' }, limit: 500 }
	);
	const decided = await dispositionsFor(
		em,
		findings.map((f) => f.id)
	);
	return findings.filter((f) => status === 'all' || !decided.has(f.id)).map((f) => toSummary(f, decided.get(f.id)));
}

export interface FindingDetail {
	finding: FindingSummary;
	run: { id: string; state: string; procedure: string; technician: string; unit: string; isRework: boolean };
	steps: { number: number; title: string; critical: boolean }[];
	/** Active technicians and leads, who may be given a rework. */
	assignees: { id: string; name: string }[];
	/** Why the viewer may not decide (their own work, a released run), or null. */
	blocked: string | null;
}

/** Whether `actor` raised the finding or worked on what it is about: such a person does not decide it. */
function ownWork(finding: ILedgerRecord, records: ILedgerRecord[], actor: Viewer): string | null {
	if (finding.signerId === actor.id)
		return `${actor.name} raised this finding, so cannot decide it: a disposition is made by someone else.`;
	const step = bodyOf(finding).stepIndex;
	const did = currentRecords(records).find(
		(r) =>
			r.signerId === actor.id &&
			['signoff', 'attempt', 'verification'].includes(r.kind) &&
			(typeof step !== 'number' || bodyOf(r).stepIndex === step)
	);
	if (!did) return null;
	const n = bodyOf(did).stepIndex;
	return `${actor.name} signed step ${typeof n === 'number' ? n + 1 : '?'} of this run, so cannot decide its finding: a disposition is made by someone who did not do the work.`;
}

/** The finding page: the finding, its run, the steps a rework may cover and who may do it; null when not a finding. */
export async function findingDetail(em: EntityManager, actor: Viewer, id: string): Promise<FindingDetail | null> {
	const finding = await ledger.findById(em, id);
	if (!finding || finding.kind !== 'finding') return null;
	const run = (await runs.findById(em, (finding.run as unknown as IRun).id))!;
	await em.populate(run, ['procedureVersion.procedure']);
	const version = run.procedureVersion as unknown as IProcedureVersion;
	const model = version.model as unknown as Procedure;
	const job = run.job as unknown as IJob;
	const decided = await dispositionsFor(em, [finding.id]);
	const records = await ledger.listForRun(em, run.id);
	const people = (await users.listAll(em)).filter(
		(u) => u.active && u.roles.some((r) => r === 'technician' || r === 'lead')
	);
	return {
		finding: toSummary(finding, decided.get(finding.id)),
		run: {
			id: run.id,
			state: run.state,
			procedure: (version.procedure as unknown as { title: string }).title,
			technician: (run.assignedTo as unknown as IUser).name,
			unit: `${job.unitModel} · serial ${job.unitSerial}`,
			isRework: !!run.reworkSteps?.length
		},
		steps: model.steps.map((s) => ({ number: s.index + 1, title: s.title, critical: s.critical })),
		assignees: people.map((u) => ({ id: u.id, name: u.name })),
		blocked: run.state === 'released' ? 'The run is released: its record is closed.' : ownWork(finding, records, actor)
	};
}

/**
 * Decides a finding. Checks, in order: the person holds the quality role, the finding exists, its run is not
 * released, the person did not raise it or work on its step, the rework's steps and assignee, the PIN. Then, under
 * the run's row lock: no disposition names the finding yet; the record is appended (and a rework run opened) with
 * admin-log entries, in one transaction.
 */
export async function dispose(
	em: EntityManager,
	actor: Viewer,
	findingId: string,
	input: DispositionInput,
	opts: { now?: Date } = {}
): Promise<Outcome<{ recordId: string; reworkRunId: string | null }>> {
	if (!actor.roles.some((r) => DISPOSITION_ROLES.includes(r)))
		return refuse(403, 'Deciding about a finding is for a quality lead.');
	const finding = await ledger.findById(em, findingId);
	if (!finding || finding.kind !== 'finding') return refuse(404, 'No such finding.');
	const runId = (finding.run as unknown as IRun).id;
	const run = (await runs.findById(em, runId))!;
	if (run.state === 'released') return refuse(409, 'The run is released: its record is closed.');
	const mine = ownWork(finding, await ledger.listForRun(em, runId), actor);
	if (mine) return refuse(403, mine);

	const model = (run.procedureVersion as unknown as IProcedureVersion).model as unknown as Procedure;
	const stepIndexes = input.decision === 'rework' ? [...new Set(input.steps)].map((n) => n - 1) : [];
	const unknown = stepIndexes.find((i) => !model.steps.some((s) => s.index === i));
	if (unknown !== undefined) return refuse(400, `The procedure has no step ${unknown + 1}.`, 'steps');
	let assignee: IUser | null = null;
	if (input.decision === 'rework') {
		assignee = await users.findById(em, input.assignedToId);
		if (!assignee || !assignee.active || !assignee.roles.some((r) => r === 'technician' || r === 'lead'))
			return refuse(400, 'The rework goes to an active technician or lead.', 'assignedToId');
	}
	const signer = await users.findById(em, actor.id);
	if (!signer || !signer.active) return refuse(403, 'Your account is not active.');
	const now = opts.now ?? new Date();
	const pin = await checkPin(em, signer, DESK_DEVICE, input.pin, now);
	if (!pin.ok) return refuse(400, pin.reason, 'pin');

	return em.fork({ clear: true }).transactional(async (tx) => {
		const locked = await runs.lockForAppend(tx, runId);
		if (!locked) return refuse(404, 'No such finding.');
		if (locked.state === 'released') return refuse(409, 'The run is released: its record is closed.');
		const already = (await ledger.listForRun(tx, runId)).some(
			(r) => r.kind === 'disposition' && bodyOf(r).findingId === findingId
		);
		if (already) return refuse(409, 'This finding already has a disposition: reload the page.');
		const opened =
			input.decision === 'rework' && assignee
				? rework.create(tx, {
						of: locked,
						stepIndexes,
						findingId,
						assignedToId: assignee.id,
						startedById: actor.id
					})
				: null;
		const stored = appendDeskRecord(
			tx,
			locked,
			'disposition',
			{
				findingId,
				decision: input.decision,
				justification: input.justification,
				...(opened && { stepIndexes: opened.reworkSteps ?? [], reworkRunId: opened.id, assignedTo: assignee!.id })
			},
			{ id: actor.id, name: actor.name, role: 'quality' },
			now
		);
		adminLog.append(tx, actor, {
			action: 'finding.dispositioned',
			subjectType: 'run',
			subjectId: runId,
			detail: { findingId, recordId: stored.id, decision: input.decision, reworkRunId: opened?.id ?? null }
		});
		if (opened)
			adminLog.append(tx, actor, {
				action: 'run.rework_opened',
				subjectType: 'run',
				subjectId: opened.id,
				detail: { reworkOf: runId, findingId, steps: stepIndexes.map((i) => i + 1), assignedTo: assignee!.id }
			});
		await tx.flush();
		return { ok: true as const, value: { recordId: stored.id, reworkRunId: opened?.id ?? null } };
	});
}
