import { LockMode } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { LedgerRecord, ProcedureVersion, Run, type IProcedureVersion, type IRun, type RunState } from '../db/entities';

export function findById(em: EntityManager, id: string): Promise<IRun | null> {
	return em.findOne(Run, { id }, { populate: ['procedureVersion', 'assignedTo', 'startedBy', 'job'] });
}

/**
 * The run with only what the submit route reads of it: its procedure version (the model records are judged by);
 * the assignee stays a reference (its id is all `maySee` needs). Per batch, so the three other joins are saved.
 */
export function findForSubmit(em: EntityManager, id: string): Promise<IRun | null> {
	return em.findOne(Run, { id }, { populate: ['procedureVersion'] });
}

/**
 * The run's row, locked FOR UPDATE until the surrounding transaction ends: every append takes this lock first, so
 * two appends to one run are strictly one after the other and each sees the head the other left. Call only inside
 * a transaction; `refresh` makes sure the head is read from the database, not from the identity map.
 */
export function lockForAppend(tx: EntityManager, id: string): Promise<IRun | null> {
	return tx.findOne(Run, { id }, { lockMode: LockMode.PESSIMISTIC_WRITE, refresh: true });
}

export function create(
	em: EntityManager,
	data: {
		jobId: string;
		procedureVersionId: string;
		contentHash: string;
		assignedToId: string;
		startedById: string;
		state?: RunState;
	}
): IRun {
	return em.create(Run, {
		id: crypto.randomUUID(),
		job: data.jobId,
		procedureVersion: data.procedureVersionId,
		contentHash: data.contentHash,
		assignedTo: data.assignedToId,
		startedBy: data.startedById,
		state: data.state ?? 'in_progress',
		headHash: null,
		recordCount: 0
	});
}

/** The runs of a job, newest first, with their version (and its procedure) and assignee. */
export function listForJob(em: EntityManager, jobId: string): Promise<IRun[]> {
	return em.find(
		Run,
		{ job: jobId },
		{ populate: ['procedureVersion.procedure', 'assignedTo', 'job'], orderBy: { createdAt: 'desc' } }
	);
}

/** Whether `userId` signed at least one record of the run (a technician then sees the run). */
export async function hasSigned(em: EntityManager, runId: string, userId: string): Promise<boolean> {
	return (await em.count(LedgerRecord, { run: runId, signerId: userId })) > 0;
}

/** A published procedure version by id (retired ones too: callers decide), with its procedure. */
export function findVersion(em: EntityManager, id: string): Promise<IProcedureVersion | null> {
	return em.findOne(ProcedureVersion, { id }, { populate: ['procedure'] });
}
