import type { EntityManager } from '@mikro-orm/postgresql';
import { Run, type IRun } from '../db/entities';

/**
 * Opens a rework run: the same job and pinned version as the run whose finding was dispositioned as rework, only
 * the listed steps (0-based) to sign, assigned to a technician.
 */
export function create(
	em: EntityManager,
	data: { of: IRun; stepIndexes: number[]; findingId: string; assignedToId: string; startedById: string }
): IRun {
	const job = data.of.job as unknown as { id: string };
	const version = data.of.procedureVersion as unknown as { id: string };
	return em.create(Run, {
		id: crypto.randomUUID(),
		job: job.id,
		procedureVersion: version.id,
		contentHash: data.of.contentHash,
		assignedTo: data.assignedToId,
		startedBy: data.startedById,
		state: 'in_progress',
		headHash: null,
		recordCount: 0,
		reworkOf: data.of.id,
		reworkSteps: [...data.stepIndexes].sort((a, b) => a - b),
		reworkFindingId: data.findingId
	});
}

/** The rework runs opened from `runId`, oldest first, with their assignee. */
export function listFor(em: EntityManager, runId: string): Promise<IRun[]> {
	return em.find(Run, { reworkOf: runId }, { populate: ['assignedTo'], orderBy: { createdAt: 'asc' } });
}

/** `runId` and every rework run below it (a rework run's own findings may open further rework), root first. */
export async function family(em: EntityManager, runId: string): Promise<string[]> {
	const out = [runId];
	for (let i = 0; i < out.length && out.length < 200; i++)
		for (const r of await em.find(Run, { reworkOf: out[i] }, { fields: ['id'], orderBy: { createdAt: 'asc' } }))
			out.push(r.id);
	return out;
}
