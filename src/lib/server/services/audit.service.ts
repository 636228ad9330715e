/**
 * The quality lead's audit use cases (issue 8, first slice): proof that a run's ledger is unaltered — its chain
 * recomputed and compared with the anchors kept outside the database — the quality home's queues and the run
 * record. Routes check the role; everything here returns plain objects.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { verifyAgainstAnchors, verifyChain, type ChainAnchor, type ChainFailureReason } from '../../ledger/chain';
import { ChainScreen } from '../../ledger/chain-screen';
import type { RoleName } from '../../accounts/schema';
import {
	LedgerRecord,
	Run,
	type AnchorPlace,
	type ILedgerAnchor,
	type IJob,
	type IProcedure,
	type IProcedureVersion,
	type IRun,
	type IUser,
	type RunState
} from '../db/entities';
import type { ChainLink } from '../../ledger/record';
import { serverRecordHash, storedTextHash } from '../ledger-hash';
import * as anchors from '../repositories/anchors';
import * as ledgerRead from '../repositories/ledger-read';
import * as runRecordRead from '../repositories/run-record-read';

/** Roles that may verify chains and record anchors. */
export const VERIFY_ROLES: RoleName[] = ['quality', 'admin'];

/** Where an anchor was copied to, as said in a failure sentence. */
const PLACE_TEXT: Record<AnchorPlace, string> = {
	release_pdf: 'the release PDF',
	daily_digest: 'the daily digest',
	manual: 'the manual anchor'
};

/** Verify's answer for one run. */
export type RunVerification =
	| { runId: string; ok: true; head: string | null; count: number; anchors: number }
	| {
			runId: string;
			ok: false;
			anchors: number;
			/** The first record that does not match (null when records are missing from the end). */
			recordId: string | null;
			/** 1-based chain position of that record. */
			position: number;
			reason: ChainFailureReason;
			message: string;
	  };

function toChainAnchor(a: ILedgerAnchor): ChainAnchor {
	return {
		head: a.head,
		count: a.count,
		at: `${PLACE_TEXT[a.recordedIn]} of ${a.recordedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC`
	};
}

/**
 * `records` verified with `hash` against the run's anchors. The server hashes with node:crypto: the stored canonical
 * text (`storedTextHash`) or, when the ledger's body no longer derives from it, the re-encoded body
 * (`serverRecordHash`, held equal to the pure `recordHash` by ledger-hash.test.ts).
 */
function check<T extends ChainLink>(
	runId: string,
	records: T[],
	hash: (r: T) => string,
	runAnchors: ILedgerAnchor[]
): RunVerification {
	const result = runAnchors.length
		? verifyAgainstAnchors(records, runAnchors.map(toChainAnchor), hash)
		: verifyChain(records, hash);
	if (result.ok) return { runId, ok: true, head: result.head, count: result.count, anchors: runAnchors.length };
	return {
		runId,
		ok: false,
		anchors: runAnchors.length,
		recordId: result.recordId,
		position: result.index + 1,
		reason: result.reason,
		message: result.message
	};
}

/** Recomputes one run's chain (`ORDER BY seq`) against every anchor recorded for it; null when there is no such run. */
export async function verifyRun(em: EntityManager, runId: string): Promise<RunVerification | null> {
	const run = await em.findOne(Run, { id: runId });
	if (!run) return null;
	const runAnchors = await anchors.listForRun(em, runId);
	return (await ledgerRead.hashSource(em)) === 'text'
		? check(runId, await ledgerRead.textChainOf(em, runId), storedTextHash, runAnchors)
		: check(runId, await ledgerRead.chainOf(em, runId), serverRecordHash, runAnchors);
}

export interface AllVerification {
	runs: number;
	intact: number;
	failed: number;
	records: number;
	/** The runs that do not verify, each with its first bad record. */
	failures: Extract<RunVerification, { ok: false }>[];
}

/**
 * {@link verifyRun} over every run, runs without records included; failures listed in the order the runs were
 * created. Every record is read once, in heap order (`ledger-read`'s `eachTextRecord`), its stored text checked and
 * hashed, and a {@link ChainScreen} keeps each run's last link: a run it passes, whose heads at its anchors' counts
 * are the anchored ones, is intact. Any other run — and every run, should the screen give up — is read again in
 * `seq` order and checked by `verifyChain`/`verifyAgainstAnchors`, which name its first bad record. Should `body`
 * no longer be generated from the stored text, every chain is read in `(run_id, seq)` order and its bodies
 * re-encoded instead.
 */
export async function verifyAll(em: EntityManager): Promise<AllVerification> {
	const ids = (await em.find(Run, {}, { fields: ['id'], orderBy: { createdAt: 'asc' } })).map((r) => r.id);
	const byRun = new Map<string, ILedgerAnchor[]>();
	for (const a of await anchors.listAll(em)) {
		const id = (a.run as unknown as IRun).id;
		byRun.set(id, [...(byRun.get(id) ?? []), a]);
	}
	const out: AllVerification = { runs: ids.length, intact: 0, failed: 0, records: 0, failures: [] };
	const tally = (v: RunVerification, records: number) => {
		out.records += records;
		if (v.ok) out.intact += 1;
		else {
			out.failed += 1;
			out.failures.push(v);
		}
	};
	const order = new Map(ids.map((id, i) => [id, i]));
	if ((await ledgerRead.hashSource(em)) === 'text') {
		const anchored = new Map([...byRun].map(([id, list]) => [id, new Set(list.map((a) => a.count))]));
		const screen = new ChainScreen((runId) => anchored.get(runId));
		await ledgerRead.eachTextRecord(em, (r) => {
			if (!order.has(r.runId)) return; // a run created after the list was read: the next verify sees it
			let ok: boolean;
			try {
				ok = storedTextHash(r) === r.hash;
			} catch {
				ok = false; // the text is not its row's envelope: the ordered check says so
			}
			screen.add(r, ok);
		});
		for (const id of ids) {
			const runAnchors = byRun.get(id) ?? [];
			const screened = screen.result(id);
			if (screened.intact && runAnchors.every((a) => screened.heads.get(a.count) === a.head)) {
				const v: RunVerification = {
					runId: id,
					ok: true,
					head: screened.head,
					count: screened.count,
					anchors: runAnchors.length
				};
				tally(v, screened.count);
				continue;
			}
			const records = await ledgerRead.textChainOf(em, id);
			tally(check(id, records, storedTextHash, runAnchors), records.length);
		}
	} else {
		const seen = new Set<string>();
		for await (const chain of ledgerRead.chainsInOrder(em)) {
			if (!order.has(chain.runId)) continue;
			seen.add(chain.runId);
			tally(check(chain.runId, chain.records, serverRecordHash, byRun.get(chain.runId) ?? []), chain.records.length);
		}
		for (const id of ids) if (!seen.has(id)) tally(check(id, [], serverRecordHash, byRun.get(id) ?? []), 0);
	}
	out.failures.sort((a, b) => order.get(a.runId)! - order.get(b.runId)!);
	return out;
}

/** The job number of each of `runIds` that exists, by run id. */
export async function jobNumbersOf(em: EntityManager, runIds: string[]): Promise<Record<string, string>> {
	if (!runIds.length) return {};
	const runs = await em.find(Run, { id: { $in: runIds } }, { populate: ['job'] });
	return Object.fromEntries(runs.map((r) => [r.id, (r.job as unknown as IJob).jobNumber]));
}

export type AnchorResult =
	| { ok: true; value: { runId: string; head: string; count: number; recordedIn: AnchorPlace } }
	| { ok: false; status: 404 | 409; message: string };

/**
 * Records the run's current chain head as copied to `recordedIn` (printed on a release PDF, sent in a digest). The
 * chain is verified first: a head that does not verify is never anchored.
 */
export async function recordAnchor(
	em: EntityManager,
	runId: string,
	recordedIn: AnchorPlace,
	now: Date = new Date()
): Promise<AnchorResult> {
	const v = await verifyRun(em, runId);
	if (!v) return { ok: false, status: 404, message: 'No such run.' };
	if (!v.ok)
		return { ok: false, status: 409, message: `The chain does not verify, so it is not anchored: ${v.message}` };
	if (v.head === null) return { ok: false, status: 409, message: 'The run has no records yet: nothing to anchor.' };
	anchors.insert(em, { runId, head: v.head, count: v.count, recordedAt: now, recordedIn });
	await em.flush();
	return { ok: true, value: { runId, head: v.head, count: v.count, recordedIn } };
}

/** One run on the quality home. */
export interface QueueRun {
	id: string;
	jobNumber: string;
	procedure: string;
	version: number;
	technician: string;
	state: RunState;
	records: number;
	lastRecordAt: string | null;
}

const QUEUE_STATES: RunState[] = ['awaiting_review', 'in_progress', 'paused'];

/** Runs awaiting review first, then runs in progress or paused; newest first within each. */
export async function reviewQueue(em: EntityManager): Promise<QueueRun[]> {
	const list = await em.find(
		Run,
		{ state: { $in: QUEUE_STATES } },
		{ populate: ['job', 'procedureVersion.procedure', 'assignedTo'], orderBy: { updatedAt: 'desc' }, limit: 200 }
	);
	const last = new Map<string, string>();
	if (list.length) {
		const rows = await em.execute<{ run_id: string; last: Date }[]>(
			`select run_id, last_at as last from run_summary where run_id in (?)`,
			[list.map((r) => r.id)]
		);
		for (const r of rows) last.set(r.run_id, new Date(r.last).toISOString());
	}
	return list
		.map((r) => {
			const version = r.procedureVersion as unknown as IProcedureVersion;
			return {
				id: r.id,
				jobNumber: (r.job as unknown as IJob).jobNumber,
				procedure: (version.procedure as unknown as IProcedure).title,
				version: version.number,
				technician: (r.assignedTo as unknown as IUser).name,
				state: r.state,
				records: r.recordCount,
				lastRecordAt: last.get(r.id) ?? null
			};
		})
		.sort((a, b) => QUEUE_STATES.indexOf(a.state) - QUEUE_STATES.indexOf(b.state));
}

/** A finding from the ledger that no disposition names yet. */
export interface OpenFinding {
	id: string;
	runId: string;
	jobNumber: string;
	text: string;
	raisedBy: string;
	at: string;
	step: number | null;
	checkpointId: string | null;
}

type Body = Record<string, unknown>;
const bodyOf = (r: { body: unknown }): Body =>
	r.body && typeof r.body === 'object' && !Array.isArray(r.body) ? (r.body as Body) : {};
const str = (v: unknown): string | null => (typeof v === 'string' ? v : null);

/** Findings recorded in the ledger and not yet named by a `disposition` record, newest first. */
export async function openFindings(em: EntityManager): Promise<OpenFinding[]> {
	const findings = await em.find(
		LedgerRecord,
		{ kind: 'finding' },
		{ populate: ['run.job'], orderBy: { serverTime: 'desc' }, limit: 500 }
	);
	const decided = new Set(
		(await em.find(LedgerRecord, { kind: 'disposition' })).map((d) => str(bodyOf(d).findingId)).filter(Boolean)
	);
	return findings
		.filter((f) => !decided.has(f.id))
		.map((f) => {
			const b = bodyOf(f);
			const signer = b.signer as { name?: string } | undefined;
			const run = f.run as unknown as IRun;
			return {
				id: f.id,
				runId: run.id,
				jobNumber: (run.job as unknown as IJob).jobNumber,
				text: str(b.text) ?? '',
				raisedBy: b.raisedBy === 'server' ? 'The server (evaluation overruled)' : (signer?.name ?? 'unknown'),
				at: f.serverTime.toISOString(),
				step: typeof b.stepIndex === 'number' ? b.stepIndex + 1 : null,
				checkpointId: str(b.checkpointId)
			};
		});
}

/** One judged line of an entry, as the server evaluated it when the record was stored. */
export interface RecordReading {
	label: string;
	status: string;
	value: string;
	limits: string;
	reason: string | null;
}

export interface RecordEntry {
	checkpointId: string;
	status: string;
	claimed: string | null;
	/** The readings as typed on the tablet (the evaluation shows them normalised, e.g. 22.010 → 22.01). */
	entered: string[];
	readings: RecordReading[];
	reasons: string[];
}

export interface RecordTool {
	assetTag: string;
	kind: string;
	lastCalibratedOn: string | null;
	usable: boolean;
	dueOn: string | null;
	reason: string | null;
}

export interface RunRecordRow {
	id: string;
	seq: number;
	kind: string;
	step: string | null;
	signer: string;
	role: string;
	deviceTime: string | null;
	serverTime: string;
	signedOffline: boolean;
	hash: string;
	text: string | null;
	entries: RecordEntry[];
	tools: RecordTool[];
	/** a correction names the record it supersedes, and why. */
	supersedes?: { id: string; reason: string } | null;
	/** Offline issue: the tablet it was signed on, and the sign-off of the same step on another tablet it superseded. */
	deviceId?: string | null;
	conflictsWith?: string | null;
}

export interface RunRecordView {
	id: string;
	jobId: string;
	jobNumber: string;
	unit: string;
	procedure: string;
	version: number;
	technician: string;
	state: RunState;
	records: RunRecordRow[];
}

function limitsText(l: unknown): string {
	if (!l || typeof l !== 'object') return '—';
	const { min, max, unit } = l as { min?: string; max?: string; unit?: string };
	const u = unit ? ` ${unit}` : '';
	if (min !== undefined && max !== undefined) return `${min} to ${max}${u}`;
	if (max !== undefined) return `max ${max}${u}`;
	if (min !== undefined) return `min ${min}${u}`;
	return '—';
}

function enteredReadings(b: Body, checkpointId: string | null): string[] {
	const sent = Array.isArray(b.entries) ? (b.entries as Body[]) : [];
	const entry = (sent.find((e) => e?.checkpointId === checkpointId)?.entry ?? {}) as Body;
	const all = [...(Array.isArray(entry.readings) ? entry.readings : []), entry.reading];
	return all.filter((x): x is string => typeof x === 'string');
}

function entriesOf(b: Body): RecordEntry[] {
	if (!Array.isArray(b.evaluation)) return [];
	return b.evaluation.map((raw) => {
		const e = (raw ?? {}) as Body;
		const readings = Array.isArray(e.readings) ? (e.readings as Body[]) : [];
		return {
			checkpointId: str(e.checkpointId) ?? '?',
			status: str(e.status) ?? '?',
			claimed: str(e.claimed),
			entered: enteredReadings(b, str(e.checkpointId)),
			reasons: Array.isArray(e.reasons) ? e.reasons.filter((x): x is string => typeof x === 'string') : [],
			readings: readings.map((r) => ({
				label: str(r.label) ?? '',
				status: str(r.status) ?? '?',
				value: str(r.value) ? [str(r.value), str(r.unit)].filter(Boolean).join(' ') : (str(r.display) ?? '—'),
				limits: limitsText(r.limits),
				reason: str(r.reason)
			}))
		};
	});
}

function toolsOf(b: Body): RecordTool[] {
	if (!Array.isArray(b.toolSnapshots)) return [];
	return b.toolSnapshots.map((raw) => {
		const t = (raw ?? {}) as Body;
		const status = (t.status ?? {}) as Body;
		return {
			assetTag: str(t.assetTag) ?? '?',
			kind: str(t.kind) ?? '',
			lastCalibratedOn: str(t.lastCalibratedOn),
			usable: status.usable === true,
			dueOn: str(status.dueOn),
			reason: str(status.reason)
		};
	});
}

/** The words a record carries, whatever its kind calls them: a finding's text, a handover note, an N/A reason… */
function recordText(kind: string, b: Body): string | null {
	const name = (v: unknown) => str((v as { name?: unknown } | null)?.name);
	switch (kind) {
		case 'handover': {
			const to = name(b.to);
			return `Handover${to ? ` to ${to}` : ''}: ${str(b.note) ?? ''}`;
		}
		case 'na_approval':
			return `Not applicable — ${str(b.reason) ?? 'no reason'}${str(b.note) ? `: ${str(b.note)}` : ''}`;
		case 'disposition':
			return `Disposition: ${str(b.decision) ?? '?'}${str(b.justification) ? ` — ${str(b.justification)}` : ''}`;
		default:
			return str(b.text);
	}
}

/** Every record of the run in chain order, as the run record page and its print show it; null when no such run. */
export async function runRecord(em: EntityManager, runId: string): Promise<RunRecordView | null> {
	const [run, rows] = await Promise.all([runRecordRead.findHead(em, runId), runRecordRead.listRecords(em, runId)]);
	if (!run) return null;
	const stepTitle = (i: unknown) => {
		if (typeof i !== 'number') return null;
		const s = run.model.steps.find((x) => x.index === i);
		return s ? `Step ${i + 1}: ${s.title}` : `Step ${i + 1}`;
	};
	return {
		id: run.id,
		jobId: run.jobId,
		jobNumber: run.jobNumber,
		unit: `${run.unitModel} · serial ${run.unitSerial}`,
		procedure: run.procedure,
		version: run.version,
		technician: run.technician,
		state: run.state,
		records: rows.map((r) => {
			const b = bodyOf(r);
			const signer = (b.signer ?? {}) as Body;
			return {
				id: r.id,
				seq: r.seq,
				kind: r.kind,
				step: stepTitle(b.stepIndex),
				signer: r.signerRole === 'server' ? 'Benchstamp server' : (str(signer.name) ?? 'unknown'),
				role: r.signerRole,
				deviceTime: r.deviceTime ? r.deviceTime.toISOString() : null,
				serverTime: r.serverTime.toISOString(),
				signedOffline: r.signedOffline,
				hash: r.hash,
				text: recordText(r.kind, b),
				entries: entriesOf(b),
				tools: toolsOf(b),
				supersedes: r.kind === 'supersession' ? { id: str(b.supersedes) ?? '', reason: str(b.reason) ?? '' } : null,
				deviceId: r.deviceId ?? null,
				conflictsWith: r.kind === 'signoff' ? (str(b.conflictsWith) ?? null) : null
			};
		})
	};
}
