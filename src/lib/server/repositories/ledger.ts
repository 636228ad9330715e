import type { EntityManager } from '@mikro-orm/postgresql';
import type { StoredRecord } from '../../ledger/record';
import { LedgerRecord, type ILedgerRecord, type IRun } from '../db/entities';

/** One stored record by its client id (in any run), or null. */
export function findById(em: EntityManager, id: string): Promise<ILedgerRecord | null> {
	return em.findOne(LedgerRecord, { id });
}

/** A run's records in chain order (`ORDER BY seq`), as verification reads them. */
export function listForRun(em: EntityManager, runId: string): Promise<ILedgerRecord[]> {
	return em.find(LedgerRecord, { run: runId }, { orderBy: { seq: 'asc' } });
}

/** The hashed envelope of a stored row, as `verifyChain` takes it. */
export function toStored(r: ILedgerRecord): StoredRecord {
	return {
		id: r.id,
		runId: (r.run as unknown as IRun).id,
		seq: r.seq,
		kind: r.kind as StoredRecord['kind'],
		body: r.body,
		prevHash: r.prevHash ?? null,
		hash: r.hash
	};
}

/** What is stored beside the envelope. */
export interface RecordColumns {
	submissionHash: string;
	signerId: string | null;
	signerRole: string;
	deviceId: string | null;
	deviceTime: Date | null;
	serverTime: Date;
	engineVersion: string;
	signedOffline: boolean;
}

/**
 * Queues the INSERT of an appended record (the only write the ledger ever sees). Call with the run's row lock held
 * (`runs.lockForAppend`), and advance the run's head in the same transaction.
 */
export function insert(tx: EntityManager, run: IRun, record: StoredRecord, columns: RecordColumns): ILedgerRecord {
	const row = tx.create(LedgerRecord, {
		id: record.id,
		run,
		seq: record.seq,
		kind: record.kind,
		body: record.body,
		prevHash: record.prevHash,
		hash: record.hash,
		...columns
	});
	run.headHash = record.hash;
	run.recordCount = record.seq;
	return row;
}
