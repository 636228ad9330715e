// Imported by the demo seed (outside Vite): relative imports only.
import { LockMode } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import {
	Procedure,
	ProcedureDraft,
	ProcedureVersion,
	type IProcedure,
	type IProcedureDraft,
	type IProcedureVersion
} from '../db/entities';

/** Version fields without the (large) source and model, for tables and history. */
const LIGHT = { exclude: ['source', 'model'] as const };

export function findById(em: EntityManager, id: string): Promise<IProcedure | null> {
	if (!/^[0-9a-f-]{36}$/i.test(id)) return Promise.resolve(null);
	return em.findOne(Procedure, { id }, { populate: ['createdBy', 'changedBy'] });
}

export function slugTaken(em: EntityManager, slug: string): Promise<number> {
	return em.count(Procedure, { slug });
}

export function count(em: EntityManager): Promise<number> {
	return em.count(Procedure, {});
}

export function listAll(em: EntityManager): Promise<IProcedure[]> {
	return em.find(Procedure, {}, { populate: ['changedBy'], orderBy: { title: 'asc' } });
}

export function listVersionsLight(em: EntityManager, procedureIds?: string[]): Promise<IProcedureVersion[]> {
	const where = procedureIds ? { procedure: { $in: procedureIds } } : {};
	return em.find(ProcedureVersion, where, {
		...LIGHT,
		populate: ['author', 'approver', 'retiredBy'],
		orderBy: { number: 'asc' }
	}) as Promise<IProcedureVersion[]>;
}

export function listDrafts(em: EntityManager, procedureIds?: string[]): Promise<IProcedureDraft[]> {
	const where = procedureIds ? { procedure: { $in: procedureIds } } : {};
	return em.find(ProcedureDraft, where, { populate: ['author', 'updatedBy', 'submittedBy'] });
}

export function findVersion(em: EntityManager, procedureId: string, number: number): Promise<IProcedureVersion | null> {
	return em.findOne(
		ProcedureVersion,
		{ procedure: procedureId, number },
		{ populate: ['author', 'approver', 'retiredBy'] }
	);
}

export function findDraft(em: EntityManager, procedureId: string): Promise<IProcedureDraft | null> {
	return em.findOne(ProcedureDraft, { procedure: procedureId }, { populate: ['author', 'updatedBy', 'submittedBy'] });
}

/** The draft row locked FOR UPDATE: call inside a transaction; a concurrent approval waits here, then finds none. */
export function lockDraft(em: EntityManager, procedureId: string): Promise<IProcedureDraft | null> {
	return em.findOne(ProcedureDraft, { procedure: procedureId }, { lockMode: LockMode.PESSIMISTIC_WRITE });
}

export async function lastVersionNumber(em: EntityManager, procedureId: string): Promise<number> {
	const last = await em.findOne(
		ProcedureVersion,
		{ procedure: procedureId },
		{ orderBy: { number: 'desc' }, ...LIGHT }
	);
	return last?.number ?? 0;
}

export function create(
	em: EntityManager,
	data: { slug: string; title: string; family: string; createdBy: string }
): IProcedure {
	return em.create(Procedure, {
		id: crypto.randomUUID(),
		slug: data.slug,
		title: data.title,
		family: data.family,
		createdBy: data.createdBy,
		changedBy: data.createdBy
	});
}

export function createDraft(
	em: EntityManager,
	procedure: IProcedure,
	source: string,
	authorId: string
): IProcedureDraft {
	return em.create(ProcedureDraft, {
		id: crypto.randomUUID(),
		procedure,
		source,
		author: authorId,
		contributors: [authorId],
		updatedBy: authorId
	});
}

export function createVersion(
	em: EntityManager,
	data: Omit<IProcedureVersion, 'id' | 'retiredAt' | 'retiredBy' | 'procedure' | 'author' | 'approver'> & {
		procedure: IProcedure;
		author: string;
		approver: string;
	}
): IProcedureVersion {
	return em.create(ProcedureVersion, { id: crypto.randomUUID(), retiredAt: null, retiredBy: null, ...data });
}
