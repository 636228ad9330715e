/**
 * The one submit route's use case: a batch of ledger records for one run, each validated, checked and appended in
 * its OWN transaction under the run's row lock, answered per record in input order — so the offline outbox can
 * replay a batch unchanged and get `duplicate` for what is already stored.
 *
 * Request shape (see runs.schema.ts): `{ records: Submission[], pins?: { [signerId]: pin } }`. The PIN is checked
 * with argon2 (`verifyPin`) under the `$lib/signing` lockout policy per signer per device, and never stored.
 */
import { DriverException, UniqueConstraintViolationException } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { evaluate, type Evaluation, type TorqueToolContext } from '../../checks/evaluate';
import { exact, gt, mul } from '../../checks/exact';
import { DEFAULT_MIN_SHARE } from '../../checks/torque';
import { findUnit } from '../../checks/units';
import { canonicalize, type JsonValue } from '../../ledger/jcs';
import type { RecordDraft, RecordKind, StoredRecord } from '../../ledger/record';
import { uuidv7 } from '../../ledger/uuid-v7';
import { isoDate } from '../../registers/dates';
import type { Checkpoint, Procedure, Step } from '../../procedure/model';
import { ENGINE_VERSION } from '../../procedure/version';
import { TOOL_STATUS_TEXT } from '../../registers/tool-status';
import { attemptsLeft, isLocked, lockRemainingMs, recordFailure, recordSuccess } from '../../signing/pin-lockout';
import type { ILedgerRecord, IProcedureVersion, IRun, IUser } from '../db/entities';
import { sealNext, sha256Hex as sha256 } from '../ledger-hash';
import * as adminLog from '../repositories/admin-log';
import * as ledger from '../repositories/ledger';
import * as pinLocks from '../repositories/pin-locks';
import { isQualified } from '../repositories/qualifications';
import * as runs from '../repositories/runs';
import { findSummary, type ToolSummary } from '../repositories/tools';
import * as users from '../repositories/users';
import { verifyPin } from './accounts.service';
import { maySee, type Result, type Viewer } from './runs.service';
import {
	checkSubmission as checkDeviceSignature,
	deviceStamp,
	enrolledDeviceOf,
	revokedRefusal,
	type DeviceRows
} from './devices-signatures';
import { movedTo } from './run-versions.service';
import * as r2 from './run-records';
import { completionRecords, currentRecords } from '../../ledger/step-state';
import { lateRecordRefusal, stepsToComplete } from './release-guard';
import { withRecordPhotos } from './run-photos';
import { priorEntries, referencedElsewhere } from './run-prior-entries';
import { notifyAwaitingReview } from './quality-mail.service';
import { grantFor, offlineRefusal, type OfflineGrantAnswer } from './offline-signing';
import { clientConflictRefusal, CONFLICT_KINDS, conflictFor, heldConflict } from './run-conflicts';
import { holdRefusal, markHeld } from './held-refusals';
import {
	entriesBodySchema,
	findingBodySchema,
	SERVER_BODY_KEYS,
	submissionSchema,
	verificationBodySchema,
	type SubmitBatch,
	type Submission
} from './runs.schema';

/** The answer for one record, in the order the records were sent. */
export interface RecordAnswer {
	id: string;
	status: 'accepted' | 'duplicate' | 'refused';
	reason?: string;
	seq?: number;
	hash?: string;
	/** On an accepted record: the server's time written into it (ISO 8601), so a tablet never shows its own clock. */
	serverTime?: string;
	/** Ids of records the server appended because of this one (a finding when the tablet's verdict was wrong). */
	findings?: string[];
	/** For a PIN checked online on an enrolled tablet: the permit to check it there offline (12 h). */
	offlineGrant?: OfflineGrantAnswer;
}

export interface SubmitOptions {
	/** The server clock (tests move it for the PIN lock). */
	now?: () => Date;
	/** Called after each record is answered, before the next one (tests act between two records of one batch). */
	afterRecord?: (answer: RecordAnswer, index: number) => Promise<void>;
}

/** Kinds a client may submit today; the rest (N/A approval, supersession…) come with their rules. */
const ACCEPTED_KINDS: readonly RecordKind[] = ['attempt', 'signoff', 'finding', 'verification', ...r2.R2_KINDS];
/** Roles that may verify a critical step (and the role the verification record must name). */
export const VERIFY_ROLES = ['lead', 'quality'] as const;
/** Kinds that may complete a run (and so are checked for completion after they are appended). */
const COMPLETING_KINDS: readonly RecordKind[] = ['signoff', 'verification', 'na_approval'];
/**
 * Kinds no chain check can refuse: for them the "run was moved" check (`movedTo`) is made by the INSERT statement
 * itself, under the run's lock, saving a query per record; the other kinds check it first, as before.
 */
const MOVE_CHECKED_ON_INSERT: readonly RecordKind[] = ['attempt', 'finding'];
/** The admin-log entry of a lead's move decision (run-versions.service.ts `decideVersion`). */
const moveDecision = (runId: string) => ({
	action: 'run.version_decision',
	subjectType: 'run',
	subjectId: runId,
	detail: { decision: 'move' }
});
/** Kinds still accepted once a run awaits review. */
const AFTER_REVIEW_KINDS: readonly RecordKind[] = ['finding'];

const refused = (id: string, reason: string): RecordAnswer => ({ id, status: 'refused', reason });
/** Ids PostgreSQL takes as a uuid (others cannot be stored, so need no duplicate look-up). */
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
/** What is hashed is what PostgreSQL gives back: plain JSON, `undefined` members gone. */
const plain = <T>(v: T): JsonValue => JSON.parse(JSON.stringify(v)) as JsonValue;

/** The fingerprint of what the client sent: a replay has the same one, an id reused for other content does not. */
function fingerprint(s: Submission): string {
	return sha256(
		canonicalize({
			id: s.id,
			runId: s.runId,
			kind: s.kind,
			body: s.body,
			signer: s.signer,
			deviceId: s.deviceId ?? null,
			signedAt: s.signedAt ?? null,
			signedOffline: s.signedOffline ?? false
		})
	);
}

function firstIssue(error: { issues: readonly { path: PropertyKey[]; message: string }[] }): string {
	const i = error.issues[0];
	const path = i.path.map(String).join('.');
	return path ? `${path}: ${i.message}` : i.message;
}

type PinCheck = { ok: true } | { ok: false; reason: string };

/**
 * One PIN try under the lockout policy, serialised per person per device by the lock-state row. Dispositions and
 * releases (quality) use it too, so a quality lead's PIN locks exactly as a technician's does.
 */
export async function checkPin(em: EntityManager, signer: IUser, deviceId: string, pin: string | undefined, now: Date) {
	if (pin === undefined) return { ok: false, reason: `Enter ${signer.name}'s PIN to sign.` } satisfies PinCheck;
	return em.fork().transactional(async (tx): Promise<PinCheck> => {
		const row = await pinLocks.lockRow(tx, signer.id, deviceId);
		const state = pinLocks.toState(row);
		const t = now.getTime();
		const lockedFor = (ms: number) =>
			`${signer.name}'s signing on this tablet is locked for ${Math.ceil(ms / 60_000)} more minutes after too many wrong PINs; a lead can unlock it.`;
		if (isLocked(state, t)) return { ok: false, reason: lockedFor(lockRemainingMs(state, t)) };
		const good = await verifyPin(tx, signer.id, pin);
		const next = good ? recordSuccess(state) : recordFailure(state, t);
		pinLocks.apply(row, next);
		await tx.flush();
		if (good) return { ok: true };
		if (isLocked(next, t)) return { ok: false, reason: `Wrong PIN. ${lockedFor(lockRemainingMs(next, t))}` };
		const left = attemptsLeft(next, t);
		return {
			ok: false,
			reason: `Wrong PIN for ${signer.name}: ${left} ${left === 1 ? 'try' : 'tries'} left before signing locks.`
		};
	});
}

interface Checked {
	body: Record<string, JsonValue>;
	/** Server-judged fails where the tablet showed a pass. */
	overruled: Evaluation[];
}

/**
 * A registered torque wrench as the engine's tool context, or undefined for any other kind of tool. The usable range
 * starts at the register's minimum only when that is above 20 % of the maximum (ISO 6789-1 usable range, see
 * `DEFAULT_MIN_SHARE`); otherwise the engine's 20 % applies, so a wrench's own wider claim never widens the range.
 */
export function torqueContext(tool: ToolSummary, setTo: string[] | undefined): TorqueToolContext | undefined {
	if (tool.kind !== 'torque_click' && tool.kind !== 'torque_indicating') return undefined;
	const max = exact(tool.rangeMax);
	const min = exact(tool.rangeMin);
	const aboveShare = max && min && gt(min, mul(max, DEFAULT_MIN_SHARE));
	return {
		kind: tool.kind === 'torque_click' ? 'preset' : 'indicating',
		...(aboveShare && { min: tool.rangeMin }),
		max: tool.rangeMax,
		unit: findUnit(tool.unit)?.id ?? tool.unit,
		accuracyPercent: tool.accuracyPct,
		...(setTo && { setTo })
	};
}

function stepOf(model: Procedure, index: number): Step | undefined {
	return model.steps.find((s) => s.index === index);
}

/**
 * What cannot change within one batch, read once per batch instead of once per record: the stored records among the
 * batch's ids (the duplicate check up front; the primary key still guards the append), signers, qualification
 * answers per signer + qualification + day, and tool summaries per tool + day (both are judged by the calendar day).
 */
interface BatchCache {
	known: Map<string, ledger.KnownRecord>;
	signers: Map<string, Promise<IUser | null>>;
	qualified: Map<string, Promise<boolean>>;
	tools: Map<string, Promise<ToolSummary | null>>;
	/** Enrolled tablets named by the batch (whether one was revoked since is checked again by each append). */
	devices: DeviceRows;
	/** Offline signing grants earned in this batch, by record id (answered with the record's acceptance). */
	grants: Map<string, OfflineGrantAnswer>;
}

function cached<T>(map: Map<string, Promise<T>>, key: string, load: () => Promise<T>): Promise<T> {
	let v = map.get(key);
	if (!v) {
		v = load();
		map.set(key, v);
	}
	return v;
}

const qualifiedIn = (em: EntityManager, c: BatchCache, userId: string, what: string, now: Date) =>
	cached(c.qualified, `${userId}\n${what}\n${isoDate(now)}`, () => isQualified(em.fork(), userId, what, now));

/** Every checkpoint of a version's model by id (built once per model). */
const checkpointIndex = new WeakMap<Procedure, Record<string, Checkpoint>>();
function checkpointsOf(model: Procedure): Record<string, Checkpoint> {
	let all = checkpointIndex.get(model);
	if (!all) {
		all = {};
		for (const st of model.steps) for (const c of st.checkpoints) all[c.id] = c;
		checkpointIndex.set(model, all);
	}
	return all;
}

/** Whether a step's checkpoints read entries signed on other steps (worked out once per step of a model). */
const readsOther = new WeakMap<Step, boolean>();
function readsOtherSteps(step: Step): boolean {
	let v = readsOther.get(step);
	if (v === undefined) {
		v = referencedElsewhere(step).length > 0;
		readsOther.set(step, v);
	}
	return v;
}

/** Re-runs `evaluate()` on every entry, checks qualification and tools; the server's evaluation goes in the body. */
async function checkEntries(
	em: EntityManager,
	s: Submission,
	signer: IUser,
	version: IProcedureVersion,
	now: Date,
	cache: BatchCache
): Promise<{ ok: true; value: Checked } | { ok: false; reason: string }> {
	const parsed = entriesBodySchema.safeParse(s.body);
	if (!parsed.success) return { ok: false, reason: `body.${firstIssue(parsed.error)}` };
	const body = parsed.data;
	const model = version.model;
	const step = stepOf(model, body.stepIndex);
	if (!step) return { ok: false, reason: `The procedure has no step ${body.stepIndex + 1}.` };
	if (s.kind === 'signoff' && body.entries.length < step.checkpoints.filter((c) => !c.when).length) {
		const given = new Set(body.entries.map((e) => e.checkpointId));
		const missing = step.checkpoints.find((c) => !c.when && !given.has(c.id));
		if (missing) return { ok: false, reason: `Step ${step.index + 1} cannot be signed: ${missing.id} has no entry.` };
	}

	const family = model.meta.family;
	if (!(await qualifiedIn(em, cache, signer.id, family, now)))
		return { ok: false, reason: `${signer.name} holds no training record in force for ${family}, so cannot sign it.` };
	if (step.qualification && !(await qualifiedIn(em, cache, signer.id, step.qualification, now)))
		return {
			ok: false,
			reason: `Step ${step.index + 1} needs the ${step.qualification} qualification, which ${signer.name} does not hold.`
		};

	const toolSnapshots: JsonValue[] = [];
	/** The first torque wrench the record names is the one its torque checkpoints were tightened with. */
	let wrench: ToolSummary | undefined;
	for (const toolId of body.tools) {
		const tool = await cached(cache.tools, `${toolId}\n${isoDate(now)}`, () => findSummary(em.fork(), toolId, now));
		if (!tool) return { ok: false, reason: `No tool with id ${toolId} is in the register.` };
		if (!tool.status.usable)
			return { ok: false, reason: `Tool ${tool.assetTag} cannot be used: ${TOOL_STATUS_TEXT[tool.status.reason]}.` };
		if (!wrench && torqueContext(tool, undefined)) wrench = tool;
		toolSnapshots.push(
			plain({
				id: tool.id,
				assetTag: tool.assetTag,
				kind: tool.kind,
				lastCalibratedOn: tool.lastCalibratedOn,
				status: tool.status
			})
		);
	}

	const all = checkpointsOf(model);
	const entries = {
		...(readsOtherSteps(step) ? await priorEntries(em, s.runId, step) : {}), // a clearance reads earlier steps
		...Object.fromEntries(body.entries.map((e) => [e.checkpointId, e.entry]))
	};
	const evaluation: JsonValue[] = [];
	const overruled: Evaluation[] = [];
	for (const e of body.entries) {
		const cp = step.checkpoints.find((c) => c.id === e.checkpointId);
		if (!cp) return { ok: false, reason: `Step ${step.index + 1} has no checkpoint ${e.checkpointId}.` };
		const tool = cp.kind === 'torque' && wrench ? torqueContext(wrench, e.setTo) : undefined;
		if (tool && wrench) {
			// The engine judges the wrench against the target before any reading: its sentences are the refusal.
			const fit = evaluate(cp, {}, { tool });
			if (fit.reasons.length > 0)
				return {
					ok: false,
					reason: `Tool ${wrench.assetTag} cannot tighten ${cp.id}: ${fit.reasons.join(' ')}`
				};
		}
		const result = evaluate(cp, e.entry, { checkpoints: all, entries, ...(tool && { tool }) });
		if (s.kind === 'signoff' && result.status === 'incomplete')
			return {
				ok: false,
				reason: `Step ${step.index + 1} cannot be signed: ${cp.id} is incomplete (${result.reasons[0] ?? 'not finished'}).`
			};
		if (e.claimed === 'pass' && result.status === 'fail') overruled.push(result);
		evaluation.push(plain({ ...result, claimed: e.claimed ?? null }));
	}
	return { ok: true, value: { body: { evaluation, toolSnapshots }, overruled } };
}

function overruleSentence(ev: Evaluation): string {
	const bad = ev.readings.filter((r) => r.status === 'fail');
	const what = bad.length
		? bad.map((r) => `${r.label} ${r.display ?? r.value ?? ''}${r.reason ? ` (${r.reason})` : ''}`.trim()).join('; ')
		: (ev.reasons[0] ?? 'the entry is out of limits');
	return `The tablet showed a pass for ${ev.checkpointId}; the server judged it a fail: ${what}.`;
}

type Prepared =
	| { kind: 'answer'; answer: RecordAnswer }
	| {
			kind: 'append';
			s: Submission;
			fp: string;
			signer: IUser;
			extra: Record<string, JsonValue>;
			overruled: Evaluation[];
	  };

const stepIndexOf = (r: ILedgerRecord): number | undefined => (r.body as { stepIndex?: number } | null)?.stepIndex;

/**
 * The checks of a verification that depend on the run's chain, made under the run's row lock so no record can slip
 * in between: the named sign-off is this step's, the verifier neither signed nor attempted the step (whatever roles
 * they hold), and the step is not verified already.
 */
function verificationRefusal(records: ILedgerRecord[], s: Submission, signer: IUser): string | null {
	const { stepIndex, signoffId } = s.body as { stepIndex: number; signoffId: string };
	const n = stepIndex + 1;
	const signoff = records.find((r) => r.id === signoffId);
	if (!signoff || signoff.kind !== 'signoff' || stepIndexOf(signoff) !== stepIndex)
		return `Step ${n} has no sign-off ${signoffId} in this run to verify.`;
	const did = records.some(
		(r) => (r.kind === 'signoff' || r.kind === 'attempt') && stepIndexOf(r) === stepIndex && r.signerId === signer.id
	);
	if (did)
		return `${signer.name} worked on step ${n}, so cannot verify it: a critical step is verified by a second person.`;
	if (records.some((r) => r.kind === 'verification' && stepIndexOf(r) === stepIndex))
		return `Step ${n} is already verified.`;
	return null;
}

/** Every step has a sign-off, and a verification where it is critical (a rework run: only its rework steps). */
function isComplete(model: Procedure, records: { kind: string; stepIndex?: number }[], run?: IRun): boolean {
	const has = (kind: string, index: number) => records.some((r) => r.kind === kind && r.stepIndex === index);
	return stepsToComplete(model, run).every(
		(st) => has('signoff', st.index) && (!st.critical || has('verification', st.index))
	);
}

async function duplicateOrReused(
	em: EntityManager,
	id: string,
	fp: string,
	runId: string
): Promise<RecordAnswer | null> {
	const existing = await ledger.findById(em, id);
	if (!existing) return null;
	if (existing.submissionHash === fp && (existing.run as unknown as IRun).id === runId)
		return { id, status: 'duplicate', seq: existing.seq, hash: existing.hash };
	return refused(id, 'Refused: this record id was already used with different content.');
}

function knownAnswer(
	known: ledger.KnownRecord | undefined,
	id: string,
	fp: string,
	runId: string
): RecordAnswer | null {
	if (!known) return null;
	if (known.submissionHash === fp && known.runId === runId)
		return { id, status: 'duplicate', seq: known.seq, hash: known.hash };
	return refused(id, 'Refused: this record id was already used with different content.');
}

/** Submits a batch to one run. The route has checked the role; here: the run, who may see it, and every record. */
export async function submitRecords(
	em: EntityManager,
	actor: Viewer,
	runId: string,
	batch: SubmitBatch,
	opts: SubmitOptions = {}
): Promise<Result<{ answers: RecordAnswer[]; serverTime: number }>> {
	const clock = opts.now ?? (() => new Date());
	const run = await runs.findForSubmit(em, runId);
	if (!run || !(await maySee(em, actor, run))) return { ok: false, status: 404, message: 'No such run.' };
	const version = run.procedureVersion as unknown as IProcedureVersion;
	const pinResults = new Map<string, PinCheck>();
	const ids = batch.records
		.map((r) => (r as { id?: unknown } | null)?.id)
		.filter((id): id is string => typeof id === 'string' && UUID.test(id));
	const cache: BatchCache = {
		known: await ledger.findKnown(em, [...new Set(ids)]),
		signers: new Map(),
		qualified: new Map(),
		tools: new Map(),
		devices: new Map(),
		grants: new Map()
	};
	const seen = seenOf(run);
	const answers: RecordAnswer[] = [];
	// One fork for the checks of the whole batch, emptied before each record: every record starts from a clear
	// identity map (fresh reads, nothing carried over), without building a new entity manager per record.
	const fork = em.fork({ clear: true });
	for (const [i, raw] of batch.records.entries()) {
		fork.clear();
		// photos a record names are checked against storage and their sha256 written by the server.
		const prepared = await withRecordPhotos(
			fork,
			await prepare(fork, raw, i, run, version, batch.pins, pinResults, clock, cache)
		);
		const decided =
			prepared.kind === 'answer' ? prepared.answer : await append(em, runId, version.model, prepared, clock, seen);
		// Offline issue: a refused offline record, one sent after release or a held clash goes to the held queue.
		const answer = await holdRefusal(em, runId, raw, decided);
		// A resend of this record later in the same batch is answered as a duplicate up front.
		if (prepared.kind === 'append' && answer.status === 'accepted' && answer.seq !== undefined && answer.hash)
			cache.known.set(answer.id, {
				id: answer.id,
				runId,
				seq: answer.seq,
				hash: answer.hash,
				submissionHash: prepared.fp
			});
		const grant = answer.status === 'accepted' ? cache.grants.get(answer.id) : undefined;
		answers.push(grant ? { ...answer, offlineGrant: grant } : answer);
		await opts.afterRecord?.(answer, i);
	}
	return { ok: true, value: { answers, serverTime: clock().getTime() } };
}

async function prepare(
	em: EntityManager,
	raw: unknown,
	index: number,
	run: IRun,
	version: IProcedureVersion,
	pins: Record<string, string>,
	pinResults: Map<string, PinCheck>,
	clock: () => Date,
	cache: BatchCache
): Promise<Prepared> {
	const rawId = (raw as { id?: unknown } | null)?.id;
	const label = typeof rawId === 'string' && rawId.length <= 64 ? rawId : `(record ${index + 1})`;
	const answer = (a: RecordAnswer): Prepared => ({ kind: 'answer', answer: a });
	const parsed = submissionSchema.safeParse(raw);
	if (!parsed.success) return answer(refused(label, firstIssue(parsed.error)));
	const s = parsed.data;
	if (s.runId !== run.id) return answer(refused(s.id, `This record is for run ${s.runId}, not for run ${run.id}.`));
	if (typeof s.body !== 'object' || s.body === null || Array.isArray(s.body))
		return answer(refused(s.id, 'body: a record body is a JSON object.'));
	const reserved = SERVER_BODY_KEYS.find((k) => k in (s.body as object));
	if (reserved) return answer(refused(s.id, `body.${reserved} is written by the server, not sent.`));
	const clashKey = clientConflictRefusal(s.body); // run-conflicts.ts: conflictsWith is the server's
	if (clashKey) return answer(refused(s.id, clashKey));
	const fp = fingerprint(s);
	const known = knownAnswer(cache.known.get(s.id), s.id, fp, run.id);
	if (known) return answer(known);
	if (!ACCEPTED_KINDS.includes(s.kind)) return answer(refused(s.id, `Records of kind ${s.kind} are not accepted yet.`));
	// Device signatures (offline issue, devices-signatures.ts): a revoked or unverifiable tablet's record is held.
	const deviceCheck = await checkDeviceSignature(em, s, raw, run.id, cache.devices);
	if (!deviceCheck.ok) return answer(refused(s.id, deviceCheck.reason));

	const signer = await cached(cache.signers, s.signer.id, () => users.findById(em.fork(), s.signer.id));
	if (!signer || !signer.active) return answer(refused(s.id, 'The signer is not an active account.'));
	if (!signer.roles.includes(s.signer.role))
		return answer(refused(s.id, `${signer.name} does not hold the ${s.signer.role} role named in the record.`));
	const now = clock();
	const device = s.deviceId ?? '';
	const key = `${signer.id}\n${device}`;
	if (s.signedOffline) {
		// Offline issue: no PIN travels with a record signed offline; the tablet's grant must still hold.
		const why = await offlineRefusal(em, s, raw, signer);
		if (why) return answer(refused(s.id, why));
	} else {
		let pin = pinResults.get(key);
		if (!pin) {
			pin = await checkPin(em, signer, device, pins[signer.id], now);
			pinResults.set(key, pin);
		}
		if (!pin.ok) return answer(refused(s.id, pin.reason));
		const grant = grantFor(signer, deviceCheck.stamp, now);
		if (grant) cache.grants.set(s.id, grant);
	}

	// not-applicable approvals, handovers and corrections (run-records.ts).
	if ((r2.R2_KINDS as readonly string[]).includes(s.kind)) {
		const r = await r2.prepareRecord(em, s, signer, version.model);
		if (!r.ok) return answer(refused(s.id, r.reason));
		return { kind: 'append', s, fp, signer, extra: r.extra, overruled: [] };
	}
	if (s.kind === 'verification') {
		const v = verificationBodySchema.safeParse(s.body);
		if (!v.success) return answer(refused(s.id, `body.${firstIssue(v.error)}`));
		const step = stepOf(version.model, v.data.stepIndex);
		if (!step) return answer(refused(s.id, `The procedure has no step ${v.data.stepIndex + 1}.`));
		if (!step.critical)
			return answer(refused(s.id, `Step ${step.index + 1} is not a critical step: it needs no verification.`));
		if (!(VERIFY_ROLES as readonly string[]).includes(s.signer.role))
			return answer(
				refused(
					s.id,
					signer.roles.some((r) => (VERIFY_ROLES as readonly string[]).includes(r))
						? `A verification is signed in the lead or quality role, not as ${s.signer.role}.`
						: `${signer.name} holds neither the lead nor the quality role, so cannot verify a critical step.`
				)
			);
		return { kind: 'append', s, fp, signer, extra: {}, overruled: [] };
	}
	if (s.kind === 'finding') {
		const f = findingBodySchema.safeParse(s.body);
		if (!f.success) return answer(refused(s.id, `body.${firstIssue(f.error)}`));
		return { kind: 'append', s, fp, signer, extra: {}, overruled: [] };
	}
	const checked = await checkEntries(em, s, signer, version, now, cache);
	if (!checked.ok) return answer(refused(s.id, checked.reason));
	return { kind: 'append', s, fp, signer, extra: checked.value.body, overruled: checked.value.overruled };
}

/**
 * Appends a record the server itself makes (a finding when the tablet's pass was overruled, an export's sha256) at
 * the run's head. Call inside a transaction holding the run's row lock (`runs.lockForAppend`); it advances the head.
 */
export function appendServerRecord(
	tx: EntityManager,
	run: IRun,
	kind: RecordKind,
	body: JsonValue,
	serverTime: Date
): StoredRecord {
	const head = run.headHash ? { runId: run.id, seq: run.recordCount, hash: run.headHash } : null;
	const stored = sealNext(head, { id: uuidv7(), runId: run.id, kind, body });
	ledger.insert(tx, run, stored, {
		submissionHash: sha256(canonicalize(body)),
		signerId: null,
		signerRole: 'server',
		deviceId: null,
		deviceTime: null,
		serverTime,
		engineVersion: ENGINE_VERSION,
		signedOffline: false
	});
	return stored;
}

/**
 * The stored body of a checked record: what was sent, what the server adds, who signed where and when. Every part
 * is plain JSON already (the sent body passed `jsonBodySchema`, the server's parts are typed `JsonValue` and built
 * from strings), so no JSON round trip here; `canonicalize` would refuse anything else before it is hashed.
 */
function recordBody(p: Extract<Prepared, { kind: 'append' }>, serverTime: Date): JsonValue {
	const { s } = p;
	return {
		...(s.body as Record<string, JsonValue>),
		...p.extra,
		...deviceStamp(s),
		signer: { id: p.signer.id, name: p.signer.name, role: s.signer.role },
		device: { id: s.deviceId ?? null, time: s.signedAt === undefined ? null : new Date(s.signedAt).toISOString() },
		serverTime: serverTime.toISOString(),
		engine: ENGINE_VERSION
	} as unknown as JsonValue; // DeviceStamp is an interface (no index signature), JSON all the same
}

function recordColumns(p: Extract<Prepared, { kind: 'append' }>, serverTime: Date): ledger.RecordColumns {
	const { s } = p;
	return {
		submissionHash: p.fp,
		signerId: p.signer.id,
		signerRole: s.signer.role,
		deviceId: s.deviceId ?? null,
		deviceTime: s.signedAt === undefined ? null : new Date(s.signedAt),
		serverTime,
		engineVersion: ENGINE_VERSION,
		signedOffline: s.signedOffline ?? false
	};
}

const seenOf = (run: IRun): ledger.ExpectedHead => ({
	headHash: run.headHash ?? null,
	recordCount: run.recordCount,
	state: run.state,
	reworkSteps: run.reworkSteps ?? null
});

/**
 * The fast path of {@link append} for a record nothing in the chain can refuse (an attempt or a finding, with no
 * server finding to add, on a run in progress): chained on the head this batch last saw, stored in one round trip
 * that takes the run's row lock and stores only if the row is still as seen and the run was not moved
 * (`ledger.lockAndAppendIfHead`). Null when it did not store: the full path then decides, under the lock.
 */
async function appendFast(
	em: EntityManager,
	runId: string,
	p: Extract<Prepared, { kind: 'append' }>,
	seen: ledger.ExpectedHead,
	clock: () => Date
): Promise<RecordAnswer | null> {
	const { s } = p;
	if (!MOVE_CHECKED_ON_INSERT.includes(s.kind) || p.overruled.length > 0 || seen.state !== 'in_progress') return null;
	if (CONFLICT_KINDS.includes(s.kind)) return null; // run-conflicts.ts reads the chain under the lock
	if (await lateRecordRefusal(em, { state: seen.state, reworkSteps: seen.reworkSteps } as IRun, s)) return null;
	const serverTime = clock();
	const head = seen.headHash ? { runId, seq: seen.recordCount, hash: seen.headHash } : null;
	const stored = sealNext(head, { id: s.id, runId, kind: s.kind, body: recordBody(p, serverTime) });
	try {
		const guard = { unlessLogged: moveDecision(runId), activeDevice: enrolledDeviceOf(s) };
		if (!(await ledger.lockAndAppendIfHead(em, stored, recordColumns(p, serverTime), seen, guard))) return null;
	} catch (e) {
		// A database error rolled the implicit transaction back: the full path retries and answers it.
		if (e instanceof Error && 'code' in e) return null;
		throw e;
	}
	seen.headHash = stored.hash;
	seen.recordCount = stored.seq;
	return { id: s.id, status: 'accepted', seq: stored.seq, hash: stored.hash, serverTime: serverTime.toISOString() };
}

/**
 * Appends one checked record (and a server finding if the tablet's pass was overruled) in one transaction; when the
 * record completes the run (every step signed, critical ones verified) the run moves to `awaiting_review` in that
 * same transaction. The job's own state is left to the people who move it: the job page shows the run's state.
 */
async function append(
	batchEm: EntityManager,
	runId: string,
	model: Procedure,
	p: Extract<Prepared, { kind: 'append' }>,
	clock: () => Date,
	seen: ledger.ExpectedHead
): Promise<RecordAnswer> {
	const { s } = p;
	// The fast path touches no identity map; the full path gets a fork of its own.
	const fast = await appendFast(batchEm, runId, p, seen, clock);
	if (fast) return fast;
	const em = batchEm.fork({ clear: true });
	let reachedReview = false;
	try {
		const result = await em.transactional(async (tx) => {
			const run = await runs.lockForAppend(tx, runId);
			if (!run) return refused(s.id, 'No such run.');
			// What the next record of the batch chains on (checked again by the fast path's statement).
			const see = () => Object.assign(seen, seenOf(run));
			see();
			// The duplicate check ran up front for the whole batch; a resend that raced in since is caught here before
			// any refusal (rare), and before an accept by the primary key (the UniqueConstraintViolation path below).
			const refuse = async (why: string) => (await duplicateOrReused(tx, s.id, p.fp, runId)) ?? refused(s.id, why);
			// The tablet was read once for the batch: whether it was revoked since is decided here, under the lock.
			const tablet = enrolledDeviceOf(s);
			const revoked = tablet ? await revokedRefusal(tx, tablet) : null;
			if (revoked) return markHeld(await refuse(revoked), 'device_revoked');
			// a released run takes no record; a rework run takes records on its rework steps only.
			const late = await lateRecordRefusal(tx, run, s);
			if (late) return refuse(late);
			if (run.state === 'awaiting_review' && !AFTER_REVIEW_KINDS.includes(s.kind))
				return refuse('The run is awaiting review: no more steps can be recorded on it.');
			const movedRefusal = async () => {
				const moved = await movedTo(tx, runId);
				return moved
					? refuse(
							`${moved.by} moved this run to version ${moved.toVersion} (run ${moved.newRunId}): record on that run.`
						)
					: null;
			};
			const moveOnInsert = MOVE_CHECKED_ON_INSERT.includes(s.kind);
			if (!moveOnInsert) {
				const why = await movedRefusal();
				if (why) return why;
			}
			const completing = COMPLETING_KINDS.includes(s.kind);
			const earlier = completing || r2.CHAIN_CHECKED_KINDS.includes(s.kind) ? await ledger.listForRun(tx, runId) : [];
			const chainWhy = r2.chainRefusal(run, earlier, s, p.signer);
			if (chainWhy) return refuse(chainWhy);
			if (s.kind === 'verification') {
				const why = verificationRefusal(currentRecords(earlier), s, p.signer);
				if (why) return refuse(why);
			}
			// Offline issue: the same step signed on two tablets is superseded or held, never silent (run-conflicts.ts).
			const clash = conflictFor(earlier, s, p.signer);
			if (clash.kind === 'hold') return heldConflict(await refuse(clash.reason));
			if (clash.kind === 'supersede') Object.assign(p.extra, clash.extra);
			const stateBefore = run.state;
			const serverTime = clock();
			const body = recordBody(p, serverTime);
			const head = run.headHash ? { runId, seq: run.recordCount, hash: run.headHash } : null;
			const draft: RecordDraft = { id: s.id, runId, kind: s.kind, body };
			const stored = sealNext(head, draft);
			// One statement for the record and the run's head, outside the unit of work (the hot path).
			const inserted = await ledger.insertAndAdvance(
				tx,
				run,
				stored,
				recordColumns(p, serverTime),
				moveOnInsert ? { unlessLogged: moveDecision(runId) } : {}
			);
			if (!inserted) {
				const why = await movedRefusal();
				if (why) return why;
				throw new Error(`The record ${s.id} was not stored and the run was not moved.`);
			}
			run.headHash = stored.hash;
			run.recordCount = stored.seq;
			const findings: string[] = [];
			for (const ev of p.overruled) {
				const findingBody = plain({
					raisedBy: 'server',
					about: s.id,
					stepIndex: (s.body as { stepIndex?: number }).stepIndex,
					checkpointId: ev.checkpointId,
					text: overruleSentence(ev),
					serverTime: serverTime.toISOString(),
					engine: ENGINE_VERSION
				});
				const finding = appendServerRecord(tx, run, 'finding', findingBody, serverTime);
				findings.push(finding.id);
			}
			r2.afterAppend(tx, run, s, p.signer);
			// completion counts current sign-offs and N/A steps (a correction voids what it supersedes).
			const done = completionRecords([...earlier, { id: s.id, kind: s.kind, body: s.body }]);
			if (completing && run.state !== 'awaiting_review' && isComplete(model, done, run)) {
				run.state = 'awaiting_review';
				reachedReview = true;
				adminLog.append(tx, p.signer, {
					action: 'run.awaiting_review',
					subjectType: 'run',
					subjectId: runId,
					detail: { completedBy: s.id, kind: s.kind, recordCount: run.recordCount }
				});
			}
			// Server findings, a state change and its admin-log entry go through the unit of work; with none of them
			// the run's new head (already written above) is all that changed, so the closing flush is skipped.
			see();
			if (findings.length > 0 || run.state !== stateBefore) await tx.flush();
			else tx.clear();
			const answer: RecordAnswer = {
				id: s.id,
				status: 'accepted',
				seq: stored.seq,
				hash: stored.hash,
				serverTime: serverTime.toISOString()
			};
			return findings.length ? { ...answer, findings } : answer;
		});
		// mail the quality leads only once the transaction has committed; a failed send never fails the record.
		if (reachedReview) notifyAwaitingReview(em.fork({ clear: true }), runId);
		return result;
	} catch (e) {
		if (e instanceof UniqueConstraintViolationException) {
			const known = await duplicateOrReused(em.fork({ clear: true }), s.id, p.fp, runId);
			if (known) return known;
		}
		if (e instanceof DriverException)
			return refused(s.id, 'The database could not store this record; nothing was stored.');
		throw e;
	}
}
