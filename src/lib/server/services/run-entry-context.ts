/**
 * What the runner's checkpoint entries need beyond the pinned model, as plain objects: the usable torque wrenches as
 * the engine's tool context (so the tablet judges a preset setting and the 20 % rule exactly as the submit service
 * will), and for part and fluid checkpoints the lots received in the parts register that fit them, so a gloved
 * technician taps a lot instead of typing it.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { TorqueToolContext } from '../../checks/evaluate';
import { compilePattern, matchPattern } from '../../procedure/pattern';
import type { Procedure } from '../../procedure/model';
import * as parts from '../repositories/parts';
import { findUsable } from '../repositories/tools';
import { torqueContext } from './submit.service';

export interface LotChoice {
	partNumber: string;
	description: string;
	lotNumber: string;
	/** A serialised lot is one part: its lot number is the serial number. */
	serialised: boolean;
	receivedOn: string;
}

export interface EntryContext {
	/** Usable torque wrenches by tool id, as `evaluate()`'s tool context (without the preset settings). */
	torqueTools: Record<string, TorqueToolContext>;
	/** Lots that fit each part or fluid checkpoint, by checkpoint id, newest first. */
	lots: Record<string, LotChoice[]>;
}

const matches = (patterns: string[], text: string) =>
	patterns.some((src) => {
		const p = compilePattern(src);
		return p.ok ? matchPattern(p.pattern, text) : src.trim().toUpperCase() === text.trim().toUpperCase();
	});

/** The runner's entry context for a pinned procedure model. */
export async function entryContext(em: EntityManager, model: Procedure): Promise<EntryContext> {
	const torqueTools: Record<string, TorqueToolContext> = {};
	for (const t of await findUsable(em)) {
		const ctx = torqueContext(t, undefined);
		if (ctx) torqueTools[t.id] = ctx;
	}
	const checkpoints = model.steps.flatMap((s) => s.checkpoints);
	const lots: Record<string, LotChoice[]> = {};
	if (!checkpoints.some((c) => c.kind === 'part' || (c.kind === 'fluid' && c.lot))) return { torqueTools, lots };

	const register = await parts.listParts(em);
	const lotsOf = new Map<string, LotChoice[]>();
	const lotsFor = async (p: (typeof register)[number]) => {
		if (!lotsOf.has(p.id))
			lotsOf.set(
				p.id,
				(await parts.listLots(em, p.id)).map((l) => ({
					partNumber: p.partNumber,
					description: p.description,
					lotNumber: l.lotNumber,
					serialised: l.serialised,
					receivedOn: l.receivedOn
				}))
			);
		return lotsOf.get(p.id)!;
	};
	for (const cp of checkpoints) {
		if (cp.kind === 'part') {
			const fitting = register.filter((p) => matches(cp.numbers, p.partNumber));
			const all: LotChoice[] = [];
			for (const p of fitting) all.push(...(await lotsFor(p)));
			lots[cp.id] = all.filter((l) => {
				const pattern = l.serialised ? cp.serial?.pattern : cp.lot?.pattern;
				return !pattern || matches([pattern], l.lotNumber);
			});
		} else if (cp.kind === 'fluid' && cp.lot) {
			const all: LotChoice[] = [];
			for (const p of register.filter((r) => r.category === 'fluid')) all.push(...(await lotsFor(p)));
			const pattern = cp.lot.pattern;
			lots[cp.id] = all.filter((l) => !pattern || matches([pattern], l.lotNumber));
		}
	}
	return { torqueTools, lots };
}
