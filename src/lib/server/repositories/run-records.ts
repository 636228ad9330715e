import type { EntityManager } from '@mikro-orm/postgresql';
import { Run, type IRun, type RunState } from '../db/entities';

/** Whether a handover record of the run names `userId` as the person taking over (they then see the run). */
export async function handedOverTo(em: EntityManager, runId: string, userId: string): Promise<boolean> {
	const rows = await em
		.getConnection()
		.execute<{ one: number }[]>(
			`select 1 as one from ledger_record where run_id = ? and kind = 'handover' and body->'to'->>'id' = ? limit 1`,
			[runId, userId]
		);
	return rows.length > 0;
}

/** Ids of the runs a technician calls their own beyond their assignments: signed in, or handed over to them. */
async function involvedRunIds(em: EntityManager, userId: string): Promise<string[]> {
	const rows = await em.getConnection().execute<{ run_id: string }[]>(
		`select distinct run_id from ledger_record
		 where signer_id = ? or (kind = 'handover' and body->'to'->>'id' = ?)`,
		[userId, userId]
	);
	return rows.map((r) => r.run_id);
}

export interface RunListFilter {
	state?: RunState;
	jobId?: string;
	assignedTo?: string;
	/** Only the runs this technician may see (assigned, signed in, handed over to). */
	ownFor?: string;
	limit: number;
	offset: number;
}

/** Runs newest first with their job, version (and procedure) and assignee, and the total that match. */
export async function list(em: EntityManager, f: RunListFilter): Promise<{ rows: IRun[]; total: number }> {
	const own = f.ownFor ? { $or: [{ assignedTo: f.ownFor }, { id: { $in: await involvedRunIds(em, f.ownFor) } }] } : {};
	const where = {
		...(f.state ? { state: f.state } : {}),
		...(f.jobId ? { job: f.jobId } : {}),
		...(f.assignedTo ? { assignedTo: f.assignedTo } : {}),
		...own
	};
	const [rows, total] = await em.findAndCount(Run, where, {
		orderBy: { createdAt: 'desc', id: 'asc' },
		limit: f.limit,
		offset: f.offset,
		populate: ['job', 'procedureVersion.procedure', 'assignedTo']
	});
	return { rows, total };
}
