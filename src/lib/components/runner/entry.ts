/**
 * The runner's entry state per checkpoint and how it becomes the engine's entry shape (`entrySchemas` in
 * $lib/checks/evaluate). Keypad readings are "slots" (a bore position, a fastener in a pass, a fill amount); flags
 * are the one-tap answers (confirmed, zeroed, an option, a fluid level).
 */
import { unitById } from '$lib/checks/units';
import type { Checkpoint } from '$lib/procedure/model';

export interface Slot {
	key: string;
	label: string;
}

export interface EntryState {
	values: Record<string, string>;
	zeroed?: boolean;
	confirmed?: boolean;
	option?: string;
	specConfirmed?: boolean;
	level?: 'ok' | 'low' | 'high';
}

export const emptyState = (): EntryState => ({ values: {} });

/** The keypad readings a checkpoint asks for, in entry order. */
export function slotsFor(cp: Checkpoint): Slot[] {
	switch (cp.kind) {
		case 'measure':
			return cp.positions.map((p, i) => ({ key: `r${i}`, label: `Reading ${i + 1} (${p})` }));
		case 'torque':
			return cp.passes.flatMap((pass, i) =>
				cp.order.map((f) => ({ key: `p${i}/${f}`, label: `Pass ${i + 1} (${pass.percent} %), ${f}` }))
			);
		case 'fluid':
			return cp.amount ? [{ key: 'amount', label: 'Amount filled' }] : [];
		case 'test':
			return cp.value ? [{ key: 'reading', label: 'Reading' }] : [];
		default:
			return [];
	}
}

/** The unit symbol shown beside every reading of the checkpoint. */
export function unitSymbol(cp: Checkpoint): string {
	const id =
		cp.kind === 'measure'
			? cp.unit
			: cp.kind === 'torque'
				? cp.target.unit
				: cp.kind === 'fluid'
					? cp.amount?.unit
					: cp.kind === 'test'
						? cp.value?.unit
						: undefined;
	if (!id) return '';
	try {
		return unitById(id).symbol;
	} catch {
		return id;
	}
}

/** The engine's entry for the checkpoint from the runner's state (readings stay decimal strings). */
export function toEntry(cp: Checkpoint, s: EntryState): unknown {
	const v = s.values;
	switch (cp.kind) {
		case 'measure': {
			const readings: string[] = [];
			for (let i = 0; i < cp.positions.length && v[`r${i}`]; i++) readings.push(v[`r${i}`]);
			return { readings, ...(cp.zeroCheck ? { zeroed: s.zeroed ?? false } : {}) };
		}
		case 'torque':
			return {
				passes: cp.passes.map((_, i) =>
					Object.fromEntries(cp.order.filter((f) => v[`p${i}/${f}`]).map((f) => [f, { value: v[`p${i}/${f}`] }]))
				)
			};
		case 'fluid':
			return { specConfirmed: s.specConfirmed, amount: v.amount || undefined, level: s.level };
		case 'test':
			return { result: s.option as 'pass' | 'fail' | undefined, reading: v.reading || undefined };
		case 'confirm':
			return { confirmed: s.confirmed ?? false };
		case 'choice':
			return { option: s.option };
		default:
			return {};
	}
}
