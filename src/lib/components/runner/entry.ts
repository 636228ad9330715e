/**
 * The runner's entry state per checkpoint and how it becomes the engine's entry shape (`entrySchemas` in
 * $lib/checks/evaluate). Keypad readings are "slots" (a bore position, a fastener in a pass, a fill amount); flags
 * are the one-tap answers (confirmed, zeroed, an option, a fluid level).
 */
import type { Evaluation } from '$lib/checks/judge';
import type { TorqueToolContext } from '$lib/checks/entry-schemas';
import { evaluateOnTablet } from '$lib/checks/evaluate-on-tablet';
import { currentRecords } from '$lib/ledger/step-state';
import { unitById } from '$lib/checks/units';
import type { Checkpoint } from '$lib/procedure/model';

export interface Slot {
	key: string;
	label: string;
	/** Unit id when it differs from the checkpoint's (a fluid level's temperature). */
	unit?: string;
}

export interface EntryState {
	values: Record<string, string>;
	zeroed?: boolean;
	confirmed?: boolean;
	option?: string;
	specConfirmed?: boolean;
	level?: 'ok' | 'low' | 'high';
	/** Free text (text checkpoints). */
	text?: string;
	/** Part number, serial and lot as tapped or typed (part and fluid checkpoints). */
	part?: { number?: string; serial?: string; lot?: string; quantity?: number };
	/** Photos uploaded for the checkpoint, in the order taken. */
	photos?: { id: string; url: string }[];
	/** Preset wrench: "reached" taps by slot key (`p<pass>/<fastener>`). */
	reached?: Record<string, boolean>;
}

/** How a torque checkpoint is recorded: preset settings and "reached" taps, or a reading per fastener. */
export type TorqueMode = 'preset' | 'indicating';

export const emptyState = (): EntryState => ({ values: {} });

/**
 * The wrench the step's tools name (the first registered torque wrench among them), as the engine's context; the
 * submit service picks the same one. Undefined when no torque wrench was chosen.
 */
export function chosenWrench(
	toolIds: string[],
	torqueTools: Record<string, TorqueToolContext>
): TorqueToolContext | undefined {
	const id = toolIds.find((t) => torqueTools[t]);
	return id ? torqueTools[id] : undefined;
}

/** Preset when the chosen wrench is a click wrench, or, with none chosen, when the procedure asks for one. */
export function torqueMode(cp: Checkpoint, wrench: TorqueToolContext | undefined): TorqueMode {
	if (wrench) return wrench.kind;
	return cp.kind === 'torque' && cp.tool === 'preset' ? 'preset' : 'indicating';
}

/** The preset wrench's setting for each pass, as keyed in (undefined when not preset or nothing keyed). */
export function setToOf(cp: Checkpoint, s: EntryState, mode: TorqueMode): string[] | undefined {
	if (cp.kind !== 'torque' || mode !== 'preset') return undefined;
	const set = cp.passes.map((_, i) => s.values[`set${i}`] ?? '');
	return set.every((v) => v) ? set : undefined;
}

/** The engine's context for one checkpoint: the wrench with its settings for torque, nothing else otherwise. */
export function toolContextFor(
	cp: Checkpoint,
	s: EntryState,
	wrench: TorqueToolContext | undefined
): { tool?: TorqueToolContext } {
	if (cp.kind !== 'torque' || !wrench) return {};
	const setTo = setToOf(cp, s, torqueMode(cp, wrench));
	return { tool: setTo ? { ...wrench, setTo } : wrench };
}

/** The keypad readings a checkpoint asks for, in entry order. */
export function slotsFor(cp: Checkpoint, mode: TorqueMode = 'indicating'): Slot[] {
	switch (cp.kind) {
		case 'measure':
			return cp.positions.map((p, i) => ({ key: `r${i}`, label: `Reading ${i + 1} (${p})` }));
		case 'clearance':
			return cp.bore && cp.shaft ? [] : [{ key: 'clearance', label: 'Clearance reading' }];
		case 'torque':
			if (mode === 'preset')
				return cp.passes.map((pass, i) => ({
					key: `set${i}`,
					label: `Pass ${i + 1} (${pass.percent} %): wrench set to`
				}));
			return cp.passes.flatMap((pass, i) =>
				cp.order.map((f) => ({ key: `p${i}/${f}`, label: `Pass ${i + 1} (${pass.percent} %), ${f}` }))
			);
		case 'fluid':
			return [
				...(cp.amount ? [{ key: 'amount', label: 'Amount filled' }] : []),
				...(cp.level?.temperature
					? [{ key: 'temperature', label: 'Fluid temperature at the level check', unit: cp.level.temperature.unit }]
					: [])
			];
		case 'test':
			return cp.value ? [{ key: 'reading', label: 'Reading' }] : [];
		default:
			return [];
	}
}

/** A unit id's symbol ("N·m" for "N.m"), or the id itself when the engine does not know it. */
export function symbolOf(id: string | undefined): string {
	if (!id) return '';
	try {
		return unitById(id).symbol;
	} catch {
		return id;
	}
}

/** The unit symbol shown beside every reading of the checkpoint. */
export function unitSymbol(cp: Checkpoint): string {
	switch (cp.kind) {
		case 'measure':
			return symbolOf(cp.unit);
		case 'clearance':
			return symbolOf(cp.limits.unit);
		case 'torque':
			return symbolOf(cp.target.unit);
		case 'fluid':
			return symbolOf(cp.amount?.unit);
		case 'test':
			return symbolOf(cp.value?.unit);
		default:
			return '';
	}
}

const trimmed = (t: string | undefined) => (t?.trim() ? t.trim() : undefined);

/** The engine's entry for the checkpoint from the runner's state (readings stay decimal strings). */
export function toEntry(cp: Checkpoint, s: EntryState, mode: TorqueMode = 'indicating'): unknown {
	const v = s.values;
	const photos = (s.photos ?? []).map((p) => p.id);
	switch (cp.kind) {
		case 'measure': {
			const readings: string[] = [];
			for (let i = 0; i < cp.positions.length && v[`r${i}`]; i++) readings.push(v[`r${i}`]);
			return { readings, ...(cp.zeroCheck ? { zeroed: s.zeroed ?? false } : {}) };
		}
		case 'torque':
			if (mode === 'preset')
				return {
					passes: cp.passes.map((_, i) =>
						Object.fromEntries(cp.order.filter((f) => s.reached?.[`p${i}/${f}`]).map((f) => [f, { reached: true }]))
					)
				};
			return {
				passes: cp.passes.map((_, i) =>
					Object.fromEntries(cp.order.filter((f) => v[`p${i}/${f}`]).map((f) => [f, { value: v[`p${i}/${f}`] }]))
				)
			};
		case 'fluid':
			return {
				specConfirmed: s.specConfirmed,
				amount: v.amount || undefined,
				level: s.level,
				...(cp.lot && { lot: trimmed(s.part?.lot) }),
				...(cp.level?.temperature && {
					temperature: v.temperature || undefined,
					temperatureUnit: cp.level.temperature.unit === 'degF' ? ('degF' as const) : ('degC' as const)
				})
			};
		case 'test':
			return { result: s.option as 'pass' | 'fail' | undefined, reading: v.reading || undefined };
		case 'confirm':
			return { confirmed: s.confirmed, photos };
		case 'choice':
			return { option: s.option };
		case 'clearance':
			return cp.bore && cp.shaft ? {} : { reading: v.clearance || undefined };
		case 'part':
			return {
				number: trimmed(s.part?.number),
				...(cp.serial && { serial: trimmed(s.part?.serial) }),
				...(cp.lot && { lot: trimmed(s.part?.lot) }),
				// A quantity of 1 is implied (the engine's default); more must be counted on the tablet.
				...(cp.quantity > 1 && s.part?.quantity !== undefined && { quantity: s.part.quantity })
			};
		case 'text':
			return { text: s.text ?? '' };
		case 'photo':
			return { photos };
		default:
			return {};
	}
}

/**
 * The entry of each checkpoint as last signed in the run's records (later sign-offs win), so a step judged against
 * another step's measures (a clearance) still sees them after the page is reloaded.
 */
export function signedEntries(records: { kind: string; body: unknown }[]): Record<string, unknown> {
	const out: Record<string, unknown> = {};
	for (const r of records) {
		if (r.kind !== 'signoff') continue;
		const entries = (r.body as { entries?: { checkpointId?: string; entry?: unknown }[] } | null)?.entries ?? [];
		for (const e of entries) if (e.checkpointId) out[e.checkpointId] = e.entry;
	}
	return out;
}

/** What the run's current sign-off recorded for one checkpoint (the signed entry and what it was judged with). */
export interface SignedCheckpoint {
	recordId: string;
	entry: unknown;
	/** The preset wrench's setting per pass, as sent beside the entry. */
	setTo?: string[];
	/** The tools the sign-off names (the first torque wrench among them tightened its torque checkpoints). */
	tools: string[];
	/** The server's evaluation stored in the record; absent on a record the server has not stored yet. */
	evaluation?: Evaluation;
}

const strings = (v: unknown): string[] | undefined =>
	Array.isArray(v) && v.every((x) => typeof x === 'string') ? v : undefined;

/**
 * Each checkpoint's entry in the latest current sign-off of its step (corrected sign-offs no longer count), with the
 * wrench settings, tools and the server's evaluation stored beside it, so a reloaded runner shows it as signed.
 */
export function signedCheckpoints(
	records: { id: string; kind: string; body: unknown }[]
): Record<string, SignedCheckpoint> {
	const out: Record<string, SignedCheckpoint> = {};
	for (const r of currentRecords(records)) {
		if (r.kind !== 'signoff' || !r.body || typeof r.body !== 'object') continue;
		const body = r.body as { entries?: unknown; tools?: unknown; evaluation?: unknown };
		const tools = strings(body.tools) ?? [];
		const evaluations = Array.isArray(body.evaluation) ? (body.evaluation as Evaluation[]) : [];
		for (const e of Array.isArray(body.entries) ? body.entries : []) {
			const { checkpointId, entry, setTo } = (e ?? {}) as { checkpointId?: unknown; entry?: unknown; setTo?: unknown };
			if (typeof checkpointId !== 'string') continue;
			const evaluation = evaluations.find((x) => x && x.checkpointId === checkpointId);
			out[checkpointId] = {
				recordId: r.id,
				entry,
				...(strings(setTo) && { setTo: strings(setTo) }),
				tools,
				...(evaluation && { evaluation })
			};
		}
	}
	return out;
}

/** True while nothing has been entered on the tablet for the checkpoint since the page loaded. */
export function isPristine(s: EntryState): boolean {
	return Object.keys(s.values).length === 0 && Object.keys(s).every((k) => k === 'values');
}

/**
 * How a signed checkpoint is judged on screen: the server's stored evaluation when the record carries one; else, for
 * torque, the engine on the signed entry with the wrench and settings the record names (a record still waiting on
 * the tablet); else `fallback` (the page's own evaluation of the signed entry).
 */
export function signedEvaluation(
	cp: Checkpoint,
	signed: SignedCheckpoint,
	torqueTools: Record<string, TorqueToolContext>,
	fallback: Evaluation
): Evaluation {
	if (signed.evaluation) return signed.evaluation;
	if (cp.kind !== 'torque') return fallback;
	const wrench = chosenWrench(signed.tools, torqueTools);
	return evaluateOnTablet(
		cp,
		signed.entry,
		wrench ? { tool: signed.setTo ? { ...wrench, setTo: signed.setTo } : wrench } : {}
	);
}

type Obj = Record<string, unknown>;
const obj = (v: unknown): Obj => (v && typeof v === 'object' && !Array.isArray(v) ? (v as Obj) : {});
const str = (v: unknown) => (typeof v === 'string' ? v : undefined);

/** The runner's entry state that shows a signed entry again (the inverse of `toEntry`). */
export function stateFromSigned(cp: Checkpoint, signed: SignedCheckpoint): EntryState {
	const e = obj(signed.entry);
	const values: Record<string, string> = {};
	const put = (key: string, v: unknown) => {
		if (typeof v === 'string' && v) values[key] = v;
	};
	switch (cp.kind) {
		case 'measure':
			(Array.isArray(e.readings) ? e.readings : []).forEach((r, i) => put(`r${i}`, r));
			return { values, ...(typeof e.zeroed === 'boolean' && { zeroed: e.zeroed }) };
		case 'torque': {
			const reached: Record<string, boolean> = {};
			const passes = Array.isArray(e.passes) ? e.passes : [];
			passes.forEach((p, i) => {
				for (const [f, rec] of Object.entries(obj(p))) {
					if (obj(rec).reached === true) reached[`p${i}/${f}`] = true;
					put(`p${i}/${f}`, obj(rec).value);
				}
			});
			signed.setTo?.forEach((v, i) => put(`set${i}`, v));
			return { values, ...(Object.keys(reached).length > 0 && { reached }) };
		}
		case 'fluid':
			put('amount', e.amount);
			put('temperature', e.temperature);
			return {
				values,
				...(typeof e.specConfirmed === 'boolean' && { specConfirmed: e.specConfirmed }),
				...(str(e.level) && { level: e.level as EntryState['level'] }),
				...(str(e.lot) && { part: { lot: str(e.lot) } })
			};
		case 'test':
			put('reading', e.reading);
			return { values, ...(str(e.result) && { option: str(e.result) }) };
		case 'clearance':
			put('clearance', e.reading);
			return { values };
		case 'confirm':
			return { values, ...(typeof e.confirmed === 'boolean' && { confirmed: e.confirmed }), photos: photosOf(e) };
		case 'choice':
			return { values, ...(str(e.option) && { option: str(e.option) }) };
		case 'part':
			return {
				values,
				part: {
					number: str(e.number),
					serial: str(e.serial),
					lot: str(e.lot),
					...(typeof e.quantity === 'number' && { quantity: e.quantity })
				}
			};
		case 'text':
			return { values, text: str(e.text) ?? '' };
		case 'photo':
			return { values, photos: photosOf(e) };
		default:
			return { values };
	}
}

/** Photos are served by id (`GET /images/[id]`). */
const photosOf = (e: Obj) => (strings(e.photos) ?? []).map((id) => ({ id, url: `/images/${id}` }));
