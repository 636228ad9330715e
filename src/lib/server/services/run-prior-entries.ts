/**
 * Entries a step's evaluation needs from OTHER steps of the same run: a clearance worked out from a bore and a shaft
 * measured on earlier steps (the demo bore procedure measures bore 1 on step 3 and piston 1 with its clearance on
 * step 4). The server takes them from the latest sign-off of each named checkpoint already in the run's ledger, so
 * it judges with what was signed, never with a copy the tablet sends again.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { Step } from '../../procedure/model';
import * as ledger from '../repositories/ledger';

/** Checkpoint ids outside `step` that its clearance checkpoints read. */
export function referencedElsewhere(step: Step): string[] {
	const own = new Set(step.checkpoints.map((c) => c.id));
	const ids = step.checkpoints.flatMap((c) => (c.kind === 'clearance' ? [c.bore, c.shaft] : []));
	return [...new Set(ids.filter((id): id is string => !!id && !own.has(id)))];
}

/** The signed entries of the checkpoints `step` reads from other steps, by checkpoint id (empty when none). */
export async function priorEntries(em: EntityManager, runId: string, step: Step): Promise<Record<string, unknown>> {
	const wanted = referencedElsewhere(step);
	if (wanted.length === 0) return {};
	const out: Record<string, unknown> = {};
	for (const r of await ledger.listForRun(em, runId)) {
		if (r.kind !== 'signoff') continue;
		const entries = (r.body as { entries?: { checkpointId?: string; entry?: unknown }[] } | null)?.entries ?? [];
		for (const e of entries) if (e.checkpointId && wanted.includes(e.checkpointId)) out[e.checkpointId] = e.entry;
	}
	return out;
}
