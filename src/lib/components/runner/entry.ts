/**
 * The runner's entry state per checkpoint and how it becomes the engine's entry shape (`entrySchemas` in
 * $lib/checks/evaluate). Keypad readings are "slots" (a bore position, a fastener in a pass, a fill amount); flags
 * are the one-tap answers (confirmed, zeroed, an option, a fluid level).
 */
import type { TorqueToolContext } from '$lib/checks/evaluate';
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
	part?: { number?: string; serial?: string; lot?: string };
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
				...(cp.lot && { lot: trimmed(s.part?.lot) })
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
