// Run by scripts (outside Vite): relative imports only.
/**
 * The demo shop's history (demo mode only), so search, lot trace, suspect tool and trends have answers: eight weeks
 * of released runs of the three demo procedures, every record a real chained ledger record (`sealNext` + the
 * repository insert submit.service uses) carrying the server's own `evaluate()` of its entries and the tools' status
 * on the day it was signed — so `verifyAll` finds every chain intact. Every value is invented, not service data:
 *
 * - valve-body procedure: 34 runs → 136 bore-1 readings (22 mm H7 = 22.000–22.021 mm) drifting slowly upward from
 *   about 22.007 to 22.016 mm, a few within 2 µm of the upper limit, and 68 piston-1 readings (22 mm f7 =
 *   21.959–21.980 mm, ISO 286-2: IT7 21 µm, f upper deviation −20 µm);
 * - a comeback: job KTX7-0917-55310 came back 8 days ago, linked to its earlier job;
 * - torque wrench TW-019 (invented), known good 70 days ago, tightened most cover screws, and its latest calibration
 *   (2 days ago) found it out of tolerance as found: the suspect-tool list has answers;
 * - filters and pressure-sensor runs record lots and serials from the parts register (lot trace).
 *
 * Idempotent and atomic: it runs in one transaction and does nothing once TW-019 is registered. Photos named by the
 * history records are placeholders (no image is stored for them: the history predates the photo store).
 */
import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { evaluate, type TorqueToolContext } from '../checks/evaluate';
import { findUnit } from '../checks/units';
import { canonicalize, type JsonValue } from '../ledger/jcs';
import type { RecordKind, StoredRecord } from '../ledger/record';
import { uuidv7 } from '../ledger/uuid-v7';
import type { Checkpoint, Procedure, Step } from '../procedure/model';
import { ENGINE_VERSION } from '../procedure/version';
import { addDays, isoDate } from '../registers/dates';
import { toolStatus } from '../registers/tool-status';
import {
	Procedure as ProcedureEntity,
	ProcedureVersion,
	Tool,
	User,
	type IJob,
	type ITool,
	type IRun,
	type IUser
} from './db/entities';
import { sealNext } from './ledger-hash';
import * as jobs from './repositories/jobs';
import * as ledger from './repositories/ledger';
import * as runs from './repositories/runs';
import * as tools from './repositories/tools';

const MARKER_TOOL = 'TW-019';
const DEVICE = 'demo-history-tablet';
const HOUR = 3_600_000;

/** A small deterministic generator (LCG, Numerical Recipes constants) so the demo is the same at every start. */
function random(seed: number) {
	let s = seed >>> 0;
	return () => {
		s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
		return s / 2 ** 32;
	};
}

type Entries = Record<string, unknown>;
interface Plan {
	/** checkpoint id → entry */
	entries: Entries;
	/** step index → tool ids */
	tools: Record<number, string[]>;
	/** torque checkpoint id → preset settings per pass */
	setTo?: Record<string, string[]>;
}

interface Ctx {
	em: EntityManager;
	lead: IUser;
	quality: IUser;
	/** Each tool used, with its whole calibration history, loaded once. */
	tools: Map<string, { tool: ITool; records: tools.CalibrationRecord[] }>;
}

/**
 * The tool as the register saw it on the day `at` (what submit.service snapshots), from the history loaded once:
 * only calibration records dated on or before that day count, for the status and for the last calibration date.
 */
function summaryAt(ctx: Ctx, id: string, at: Date): tools.ToolSummary | null {
	const t = ctx.tools.get(id);
	if (!t) return null;
	const day = isoDate(at);
	const known = t.records.filter((r) => r.performedOn <= day);
	return {
		id: t.tool.id,
		assetTag: t.tool.assetTag,
		kind: t.tool.kind,
		description: t.tool.description,
		rangeMin: t.tool.rangeMin,
		rangeMax: t.tool.rangeMax,
		unit: t.tool.unit,
		resolution: t.tool.resolution,
		accuracyPct: t.tool.accuracyPct,
		active: t.tool.active,
		lastCalibratedOn:
			known
				.filter((r) => r.kind === 'calibration')
				.map((r) => r.performedOn)
				.sort()
				.at(-1) ?? null,
		status: toolStatus(known, day, t.tool.active)
	};
}

async function loadTools(em: EntityManager, ids: string[]): Promise<Ctx['tools']> {
	const out: Ctx['tools'] = new Map();
	for (const id of ids) {
		const tool = await tools.findById(em, id);
		if (tool) out.set(id, { tool, records: (await tools.listCalibrations(em, id)).map(tools.toCalibrationRecord) });
	}
	return out;
}

/** The engine's view of a registered torque wrench (the submit service's rule: the ISO 6789-1 20 % floor applies). */
function torqueTool(t: tools.ToolSummary, setTo?: string[]): TorqueToolContext | undefined {
	if (t.kind !== 'torque_click' && t.kind !== 'torque_indicating') return undefined;
	return {
		kind: t.kind === 'torque_click' ? 'preset' : 'indicating',
		max: t.rangeMax,
		unit: findUnit(t.unit)?.id ?? t.unit,
		accuracyPercent: t.accuracyPct,
		...(setTo && { setTo })
	};
}

const plain = (v: unknown): JsonValue => JSON.parse(JSON.stringify(v)) as JsonValue;
const sha256 = (s: string) => createHash('sha256').update(s, 'utf8').digest('hex');

/** Appends one record to the run's chain as submit.service does (same body keys, same columns). */
function append(
	ctx: Ctx,
	run: IRun,
	head: StoredRecord | null,
	kind: RecordKind,
	signer: IUser,
	role: string,
	at: Date,
	body: Record<string, JsonValue>
): StoredRecord {
	const full = plain({
		...body,
		signer: { id: signer.id, name: signer.name, role },
		device: { id: DEVICE, time: at.toISOString() },
		serverTime: at.toISOString(),
		engine: ENGINE_VERSION
	});
	const stored = sealNext(head ? { runId: run.id, seq: head.seq, hash: head.hash } : null, {
		id: uuidv7(),
		runId: run.id,
		kind,
		body: full
	});
	ledger.insert(ctx.em, run, stored, {
		submissionHash: sha256(canonicalize(full)),
		signerId: signer.id,
		signerRole: role,
		deviceId: DEVICE,
		deviceTime: at,
		serverTime: at,
		engineVersion: ENGINE_VERSION,
		signedOffline: false
	});
	return stored;
}

/**
 * Signs every step of `model` for `run` from `start`: a sign-off per step (the step's `minutes` estimate ± 35 %
 * later), and a lead's verification two minutes after each critical one. Throws when an entry does not evaluate
 * as a pass — the history must be records the server itself would have accepted.
 */
async function signRun(
	ctx: Ctx,
	run: IRun,
	model: Procedure,
	tech: IUser,
	start: Date,
	plan: Plan,
	rnd: () => number
): Promise<void> {
	const all: Record<string, Checkpoint> = {};
	for (const st of model.steps) for (const c of st.checkpoints) all[c.id] = c;
	let head: StoredRecord | null = null;
	let t = start.getTime();
	for (const step of model.steps) {
		t += Math.round((step.minutes ?? 10) * (0.65 + rnd() * 0.7) * 60_000);
		const at = new Date(t);
		const stepTools = plan.tools[step.index] ?? [];
		const summaries = stepTools.map((id) => summaryAt(ctx, id, at));
		const wrench = summaries.find((s) => s && torqueTool(s));
		const required = requiredIds(step, plan.entries);
		const entries = step.checkpoints
			.filter((c) => required.has(c.id))
			.map((c) => ({
				checkpointId: c.id,
				entry: plan.entries[c.id] ?? {},
				claimed: 'pass',
				...(plan.setTo?.[c.id] && { setTo: plan.setTo[c.id] })
			}));
		const evaluation = entries.map((e) => {
			const cp = all[e.checkpointId];
			const tool = cp.kind === 'torque' && wrench ? torqueTool(wrench, e.setTo) : undefined;
			const result = evaluate(cp, e.entry, { checkpoints: all, entries: plan.entries, ...(tool && { tool }) });
			if (result.status !== 'pass')
				throw new Error(
					`history seed: ${cp.id} is ${result.status}: ${[...result.reasons, ...result.readings.filter((r) => r.status !== 'pass').map((r) => `${r.label}: ${r.reason ?? r.status}`)].join(' ')}`
				);
			return plain({ ...result, claimed: 'pass' });
		});
		const signoff: StoredRecord = append(ctx, run, head, 'signoff', tech, tech.roles[0], at, {
			stepIndex: step.index,
			entries: plain(entries),
			tools: stepTools,
			evaluation,
			toolSnapshots: summaries
				.filter((s): s is tools.ToolSummary => !!s)
				.map((s) =>
					plain({
						id: s.id,
						assetTag: s.assetTag,
						kind: s.kind,
						lastCalibratedOn: s.lastCalibratedOn,
						status: s.status
					})
				)
		});
		head = signoff;
		if (step.critical) {
			t += 2 * 60_000;
			head = append(ctx, run, head, 'verification', ctx.lead, 'lead', new Date(t), {
				stepIndex: step.index,
				signoffId: signoff.id
			});
		}
	}
}

/** The step's checkpoints that need an entry: those without a `when`, and those a chosen option requires. */
function requiredIds(step: Step, entries: Entries): Set<string> {
	const out = new Set(step.checkpoints.filter((c) => !c.when).map((c) => c.id));
	for (const c of step.checkpoints)
		if (c.kind === 'choice') {
			const option = (entries[c.id] as { option?: string } | undefined)?.option;
			for (const id of c.options.find((o) => o.key === option)?.then ?? []) out.add(id);
		}
	return out;
}

const mm = (x: number) => x.toFixed(3);
/** The engine's unit id for a unit as written. */
const u = (text: string) => findUnit(text)?.id ?? text;
const photos = (n: number, tag: string) => Array.from({ length: n }, (_, i) => `history-${tag}-${i + 1}`);

/** Entries for the valve-body procedure: bore-1 drifting upward over the weeks, piston-1 steady. */
function valveBodyEntries(i: number, n: number, rnd: () => number): Entries {
	const drift = 22.007 + (0.009 * i) / (n - 1);
	const near = i === n - 3 || i === n - 1 || i === Math.floor(n / 2);
	const base = near ? 22.017 : drift;
	const bore = [0, 1, 2, 3].map((k) => Math.min(22.02, base + (k === 3 && near ? 0.002 : 0) + (rnd() - 0.5) * 0.004));
	const piston = [0, 1].map(() => 21.97 + (rnd() - 0.5) * 0.007);
	const screws = Object.fromEntries(
		['C1', 'C2', 'C3', 'C4', 'C5', 'C6', 'C7', 'C8'].map((c) => [c, { reached: true }])
	);
	return {
		'unit-cool': { confirmed: true },
		'id-plate': { photos: photos(1, `plate-${i}`) },
		'vb-as-found': { photos: photos(2, `vb-${i}`) },
		'bore-1': { unit: u('mm'), readings: bore.map(mm), zeroed: true },
		'piston-1': { unit: u('mm'), readings: piston.map(mm), zeroed: true },
		'piston-1-clearance': {},
		'guide-pin-fit': { unit: u('mm'), reading: (0.012 + rnd() * 0.008).toFixed(3) },
		'magnet-1': { confirmed: true, photos: photos(1, `magnet-${i}`) },
		'bore-findings': {
			text: near
				? 'Bore 1 polished along the stroke; no scoring. Size near the upper limit.'
				: 'Light polishing marks only; no scoring or debris.'
		},
		'cover-screws': { unit: u('N·m'), passes: [screws, screws] }
	};
}

/** Entries for the filters, pan and refill procedure, with lots from the parts register. */
function filtersEntries(i: number, rnd: () => number): Entries {
	const screws = Object.fromEntries(
		Array.from({ length: 12 }, (_, k) => [String(k + 1), { value: (9.6 + rnd() * 0.8).toFixed(1) }])
	);
	return {
		'drained-fluid': { photos: photos(1, `fluid-${i}`) },
		'pan-magnet': { photos: photos(1, `magnet-pan-${i}`) },
		'suction-filter': { option: 'replaced-new' },
		'suction-filter-part': { number: 'KL-7710-01A', lot: i % 3 === 2 ? 'L26-0587' : 'L26-0412', quantity: 1 },
		'pressure-filter-part': { number: 'KL-7720-015', lot: 'PF-2609', quantity: 1 },
		'pan-screws': { unit: u('N·m'), passes: [screws] },
		'drain-plug': {
			unit: u('N·m'),
			passes: [{ drain: { value: (24.2 + rnd() * 1.6).toFixed(1) } }],
			angles: [{ drain: { value: String(43 + Math.floor(rnd() * 5)) } }]
		},
		fill: {
			specConfirmed: true,
			lot: i % 4 === 3 ? 'FL-2611-AC' : 'FL-2611-AB',
			amount: (5.1 + rnd() * 0.2).toFixed(2),
			unit: u('L')
		},
		'level-check': {
			specConfirmed: true,
			level: 'ok',
			temperature: String(38 + Math.floor(rnd() * 6)),
			temperatureUnit: 'degC'
		}
	};
}

/** Entries for the pressure-sensor procedure: a new serialised sensor from the register, or the old one reused. */
function sensorEntries(i: number, rnd: () => number): Entries {
	const serial = i < 2 ? ['PS26110451', 'PS26110452'][i] : undefined;
	const half = (26 + rnd()).toFixed(1);
	const full = (52 + rnd() * 2).toFixed(1);
	return {
		depressurised: { confirmed: true },
		'sensor-disposition': { option: serial ? 'replaced-new' : 'reused' },
		...(serial && { 'new-sensor': { number: 'KL-4410-03C', serial, quantity: 1 } }),
		'sensor-screws': {
			unit: u('lbf·in'),
			passes: [
				{ S1: { value: half }, S2: { value: half } },
				{ S1: { value: full }, S2: { value: full } }
			]
		},
		'seal-test': { result: 'pass', reading: String(1180 + Math.floor(rnd() * 60)), unit: u('kPa') },
		adaptation: { result: 'pass' },
		'adaptation-notes': { text: 'Adaptation with the shop scan tool (invented), software 4.2; no codes left stored.' }
	};
}

const FIRST = [
	'Ayla',
	'Bram',
	'Corin',
	'Dessa',
	'Emrys',
	'Fenna',
	'Gideon',
	'Hollis',
	'Ilsa',
	'Joran',
	'Kesia',
	'Lorcan'
];
const LAST = ['Brackwater', 'Calloway', 'Dunmore', 'Everleigh', 'Fairholt', 'Greystone', 'Hawthorne', 'Ivesdale'];
const MODELS = ['Corvane Estate 2.0 (invented)', 'Halden Sport 1.8 (invented)', 'Corvane City 1.4 (invented)'];

interface JobSpec {
	serial: string;
	receivedOn: string;
	state: 'released' | 'in_work';
	complaint: string;
	comeback?: boolean;
}

async function openJob(ctx: Ctx, spec: JobSpec, n: number): Promise<IJob> {
	// Only the comeback's serial has an earlier job (the other history serials are new), so only it asks.
	const previous = spec.comeback ? await jobs.findLatestForSerial(ctx.em, spec.serial, spec.receivedOn) : null;
	const job = jobs.create(ctx.em, {
		jobNumber: await jobs.nextJobNumber(ctx.em),
		customerName: `${FIRST[n % FIRST.length]} ${LAST[(n * 5) % LAST.length]}`,
		customerEmail: '',
		customerPhone: '',
		unitModel: MODELS[n % MODELS.length],
		unitSerial: spec.serial,
		mileage: 60_000 + ((n * 7919) % 140_000),
		complaint: spec.complaint,
		faultCodes: [],
		receivedOn: spec.receivedOn,
		intakeNotes: 'Demo history job (invented customer and unit).',
		state: spec.state,
		previousJob: previous,
		createdById: ctx.lead.id,
		createdByName: ctx.lead.name
	});
	const lead = { id: ctx.lead.id, name: ctx.lead.name };
	jobs.recordStateChange(ctx.em, job, lead, { from: null, to: 'received', reason: 'Received at intake.' });
	jobs.recordStateChange(ctx.em, job, lead, { from: 'received', to: 'in_work', reason: 'On the bench.' });
	if (spec.state === 'released') {
		jobs.recordStateChange(ctx.em, job, lead, { from: 'in_work', to: 'awaiting_review', reason: 'Work done.' });
		jobs.recordStateChange(
			ctx.em,
			job,
			{ id: ctx.quality.id, name: ctx.quality.name },
			{ from: 'awaiting_review', to: 'released', reason: 'Audited and released.' }
		);
	}
	return job;
}

async function latestVersion(em: EntityManager, title: string) {
	const p = await em.findOne(ProcedureEntity, { title });
	if (!p) return null;
	return em.findOne(ProcedureVersion, { procedure: p.id }, { orderBy: { number: 'desc' } });
}

/** A wrench found and left in tolerance `daysAgo` days before `today` by the invented laboratory, due a year later. */
function calibratedWrench(
	tx: EntityManager,
	actor: { id: string; name: string },
	today: string,
	daysAgo: number,
	tool: Parameters<typeof tools.create>[1]
) {
	const wrench = tools.create(tx, tool);
	const on = addDays(today, -daysAgo);
	tools.addCalibration(tx, wrench, actor, {
		kind: 'calibration',
		performedOn: on,
		certificateNo: `KLC-${on.slice(0, 4)}-${tool.assetTag}`,
		asFound: 'in',
		asLeft: 'in',
		nextDueOn: addDays(today, 365 - daysAgo),
		notes: 'Invented calibration laboratory (demo).'
	});
	return wrench;
}

/** Seeds the history once (see the file comment); `now` is the demo's "today". */
export async function seedHistory(em: EntityManager, now: Date = new Date()): Promise<{ created: number }> {
	if (await tools.findByAssetTag(em, MARKER_TOOL)) return { created: 0 };
	const people = new Map((await em.find(User, {})).map((u) => [u.email, u] as const));
	const [tech, tech2, lead, quality] = ['tech', 'tech2', 'lead', 'quality'].map((n) => people.get(`${n}@example.com`));
	const valveBody = await latestVersion(em, 'Valve body teardown and shift-piston bore inspection');
	const filters = await latestVersion(em, 'Filters, oil pan and fluid refill');
	const sensor = await latestVersion(em, 'Line-pressure sensor replacement');
	const byTag = async (tag: string) => (await tools.findByAssetTag(em, tag))?.id;
	const [gauge, micrometer, tw014, tw031] = await Promise.all(['BG-003', 'MC-007', 'TW-014', 'TW-031'].map(byTag));
	if (!tech || !tech2 || !lead || !quality || !valveBody || !filters || !sensor) return { created: 0 };
	if (!gauge || !micrometer || !tw014 || !tw031) return { created: 0 };

	let created = 0;
	await em.transactional(async (tx) => {
		const ctx: Ctx = { em: tx, lead, quality, tools: new Map() };
		const today = isoDate(now);
		const actor = { id: lead.id, name: lead.name };
		const tw019 = calibratedWrench(tx, actor, today, 70, {
			assetTag: MARKER_TOOL,
			kind: 'torque_click',
			description: 'Click wrench 2–12 N·m, 1/4 in drive (second bench)',
			rangeMin: '2',
			rangeMax: '12',
			unit: 'N·m',
			resolution: '0.1',
			accuracyPct: '4'
		});
		// A dial wrench whose usable range (ISO 6789-1: from 20 % of 40 = 8 N·m) covers both pan screws and drain plug.
		const tw027 = calibratedWrench(tx, actor, today, 100, {
			assetTag: 'TW-027',
			kind: 'torque_indicating',
			description: 'Dial torque wrench 0–40 N·m, 3/8 in drive',
			rangeMin: '8',
			rangeMax: '40',
			unit: 'N·m',
			resolution: '0.5',
			accuracyPct: '3'
		});
		await tx.flush();
		ctx.tools = await loadTools(tx, [gauge, micrometer, tw014, tw031, tw019.id, tw027.id]);

		const at = (daysAgo: number, hour: number) =>
			new Date(Date.parse(`${addDays(today, -daysAgo)}T00:00:00Z`) + hour * HOUR);
		const rnd = random(20261201);
		let n = 0;
		const start = async (
			version: NonNullable<typeof valveBody>,
			spec: JobSpec,
			who: IUser,
			begin: Date,
			plan: Plan
		) => {
			const job = await openJob(ctx, spec, n++);
			const run = runs.create(tx, {
				jobId: job.id,
				procedureVersionId: version.id,
				contentHash: version.contentHash,
				assignedToId: who.id,
				startedById: lead.id,
				state: 'released'
			});
			run.createdAt = begin;
			run.updatedAt = begin;
			await signRun(ctx, run, version.model as unknown as Procedure, who, begin, plan, rnd);
			// One flush per run, then a clear: the identity map stays small, so flushes stay cheap (and a comeback's
			// query finds the job before it).
			await tx.flush();
			tx.clear();
			created++;
		};

		// Valve body: 34 runs, 56 to 7 days ago; one in three cover-screw jobs on TW-014, the rest on TW-019.
		const VB = 34;
		for (let i = 0; i < VB; i++) {
			const daysAgo = 56 - Math.round((i * 49) / (VB - 1));
			const serial = i === 5 ? 'KTX7-0917-55310' : `KTX7-${String(1100 + i * 37).padStart(4, '0')}-${60000 + i * 113}`;
			await start(
				valveBody,
				{
					serial,
					receivedOn: addDays(today, -daysAgo - 1),
					state: 'released',
					complaint: 'Wrong gear shown; harsh shifts.'
				},
				i % 2 ? tech2 : tech,
				at(daysAgo, 7 + (i % 3)),
				{
					entries: valveBodyEntries(i, VB, rnd),
					tools: { 2: [gauge], 3: [micrometer], 5: [i % 3 === 0 ? tw014 : tw019.id] },
					setTo: { 'cover-screws': ['4', '8'] }
				}
			);
		}
		// The comeback: the unit of the sixth run came back 8 days ago (linked to its earlier job), waiting on the bench.
		await openJob(
			ctx,
			{
				serial: 'KTX7-0917-55310',
				receivedOn: addDays(today, -8),
				state: 'in_work',
				complaint: 'Gear indicator wrong again after the rebuild.',
				comeback: true
			},
			n++
		);
		await tx.flush();
		tx.clear();
		created++;

		// Filters and refill: 12 runs, 50 to 4 days ago, lots L26-0412 / L26-0587, PF-2609, FL-2611-AB / AC.
		for (let i = 0; i < 12; i++) {
			const daysAgo = 50 - i * 4;
			await start(
				filters,
				{
					serial: `KTX7-${String(2200 + i * 41).padStart(4, '0')}-${71000 + i * 97}`,
					receivedOn: addDays(today, -daysAgo - 1),
					state: 'released',
					complaint: 'Fluid service due; slight slip when cold.'
				},
				i % 2 ? tech : tech2,
				at(daysAgo, 13),
				{ entries: filtersEntries(i, rnd), tools: { 2: [tw027.id] } }
			);
		}
		// Pressure sensor: 4 runs while TW-031 was in calibration (55 to 37 days ago), two with a new serialised sensor.
		for (let i = 0; i < 4; i++) {
			const daysAgo = 55 - i * 6;
			await start(
				sensor,
				{
					serial: `KTX7-${String(3300 + i * 53).padStart(4, '0')}-${82000 + i * 71}`,
					receivedOn: addDays(today, -daysAgo - 1),
					state: 'released',
					complaint: 'Line-pressure sensor fault code; limp mode.'
				},
				tech,
				at(daysAgo, 10),
				{ entries: sensorEntries(i, rnd), tools: { 1: [tw031] } }
			);
		}

		// TW-019's latest calibration: found out of tolerance (reads high), adjusted and left in tolerance.
		tools.addCalibration(tx, tx.getReference(Tool, tw019.id), actor, {
			kind: 'calibration',
			performedOn: addDays(today, -2),
			certificateNo: `KLC-${today.slice(0, 4)}-TW-019-B`,
			asFound: 'out',
			asLeft: 'in',
			nextDueOn: addDays(today, 363),
			notes: 'As found: released 9 % above the set value at 8 N·m. Adjusted; as left in tolerance. (Invented, demo.)'
		});
		await tx.flush();
	});
	return { created };
}
