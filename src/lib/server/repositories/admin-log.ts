import type { EntityManager } from '@mikro-orm/postgresql';
import { AdminLog, type IAdminLog } from '../db/entities';

export interface Actor {
	id: string;
	name: string;
}

export interface LogEntry {
	action: string;
	subjectType: string;
	subjectId: string;
	detail?: Record<string, unknown>;
}

/** Queues one append-only entry in the current unit of work; it is written with the change it records. */
export function append(em: EntityManager, actor: Actor | null, entry: LogEntry): IAdminLog {
	return em.create(AdminLog, {
		actorId: actor?.id ?? null,
		actorName: actor?.name ?? null,
		action: entry.action,
		subjectType: entry.subjectType,
		subjectId: entry.subjectId,
		detail: entry.detail ?? {}
	});
}

/** The entries of one action about one subject, newest first. */
export function forSubject(
	em: EntityManager,
	action: string,
	subjectType: string,
	subjectId: string
): Promise<IAdminLog[]> {
	return em.find(AdminLog, { action, subjectType, subjectId }, { orderBy: { id: 'desc' } });
}

export function latest(em: EntityManager, limit = 200): Promise<IAdminLog[]> {
	return em.find(AdminLog, {}, { orderBy: { id: 'desc' }, limit });
}
