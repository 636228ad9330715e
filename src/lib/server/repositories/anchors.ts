import type { EntityManager } from '@mikro-orm/postgresql';
import { LedgerAnchor, type AnchorPlace, type ILedgerAnchor } from '../db/entities';

/** Every anchor recorded for a run, oldest first. */
export function listForRun(em: EntityManager, runId: string): Promise<ILedgerAnchor[]> {
	return em.find(LedgerAnchor, { run: runId }, { orderBy: { recordedAt: 'asc', count: 'asc' } });
}

/** Every per-run anchor, oldest first (verify all groups them by run). */
export function listAll(em: EntityManager): Promise<ILedgerAnchor[]> {
	return em.find(LedgerAnchor, { run: { $ne: null } }, { orderBy: { recordedAt: 'asc', count: 'asc' } });
}

/** Queues the INSERT of an anchor (the only write anchors ever see). */
export function insert(
	em: EntityManager,
	data: { runId: string; head: string; count: number; recordedAt: Date; recordedIn: AnchorPlace }
): ILedgerAnchor {
	return em.create(LedgerAnchor, {
		id: crypto.randomUUID(),
		run: data.runId,
		head: data.head,
		count: data.count,
		recordedAt: data.recordedAt,
		recordedIn: data.recordedIn
	});
}
