/**
 * The runner's tool picker per step: every active tool in the register, usable ones first, the others with the
 * reason they cannot be chosen in words — blocked by the register (never calibrated, past due, found out of
 * tolerance) or, for a torque wrench on a step with torque checkpoints, unsuited to the step's targets (the engine's
 * ISO 6789-1 usable range and accuracy check). For display only: the submit service re-checks every tool a record
 * names and refuses a blocked one.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { evaluate } from '../../checks/evaluate';
import type { Procedure } from '../../procedure/model';
import { TOOL_STATUS_TEXT } from '../../registers/tool-status';
import { listWithStatus, type ToolSummary } from '../repositories/tools';
import { torqueContext } from './submit.service';

export interface ToolChoice {
	id: string;
	assetTag: string;
	kind: string;
	description: string;
	/** Why it cannot be chosen on this step, in words; null when it can. */
	blocked: string | null;
}

/** Why a usable wrench cannot tighten this step's torque checkpoints (the engine's sentences), or null. */
function unsuited(tool: ToolSummary, step: Procedure['steps'][number]): string | null {
	const ctx = torqueContext(tool, undefined);
	if (!ctx) return null;
	for (const cp of step.checkpoints) {
		if (cp.kind !== 'torque') continue;
		const fit = evaluate(cp, {}, { tool: ctx });
		if (fit.reasons.length > 0) return `Not for ${cp.id}: ${fit.reasons.join(' ')}`;
	}
	return null;
}

/** Tool choices by step index, for every step that lists tools (usable first, then by asset tag). */
export async function toolChoices(em: EntityManager, model: Procedure, at: Date = new Date()) {
	const out: Record<number, ToolChoice[]> = {};
	const steps = model.steps.filter((s) => s.tools.length > 0);
	if (steps.length === 0) return out;
	const register = (await listWithStatus(em, { at })).filter((t) => t.active);
	for (const step of steps) {
		out[step.index] = register
			.map((t) => ({
				id: t.id,
				assetTag: t.assetTag,
				kind: t.kind,
				description: t.description,
				blocked: t.status.usable ? unsuited(t, step) : TOOL_STATUS_TEXT[t.status.reason]
			}))
			.sort((a, b) => Number(a.blocked !== null) - Number(b.blocked !== null) || a.assetTag.localeCompare(b.assetTag));
	}
	return out;
}
