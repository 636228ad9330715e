import type { EntityManager } from '@mikro-orm/postgresql';
import { Qualification, User, type IQualification, type IUser } from '../db/entities';
import { isoDate } from '../../registers/dates';

/** The key qualifications match on: lower case, runs of spaces as one, trimmed. */
export const familyKey = (family: string) => family.trim().replace(/\s+/g, ' ').toLowerCase();

export interface QualificationRecord {
	id: string;
	userId: string;
	userName: string;
	family: string;
	trainedBy: string;
	trainedOn: string;
	expiresOn: string | null;
	notes: string;
	revokedAt: Date | null;
	recordedByName: string | null;
}

export const toRecord = (q: IQualification): QualificationRecord => {
	const user = q.user as unknown as IUser;
	return {
		id: q.id,
		userId: user.id,
		userName: user.name,
		family: q.family,
		trainedBy: q.trainedBy,
		trainedOn: q.trainedOn,
		expiresOn: q.expiresOn ?? null,
		notes: q.notes,
		revokedAt: q.revokedAt ?? null,
		recordedByName: q.recordedByName ?? null
	};
};

/** Whether a record is in force on the ISO day `on`: trained by then, not expired (expiry day included), not revoked. */
export const inForce = (q: Pick<QualificationRecord, 'trainedOn' | 'expiresOn' | 'revokedAt'>, on: string) =>
	!q.revokedAt && q.trainedOn <= on && (!q.expiresOn || q.expiresOn >= on);

/**
 * Whether the person holds a training record for `family` (a procedure family, or a step's `qualification:` name;
 * matched case- and space-insensitively) that is in force on `at` (default now). The bench runner refuses a
 * signature when this is false.
 */
export async function isQualified(
	em: EntityManager,
	userId: string,
	family: string,
	at: Date = new Date()
): Promise<boolean> {
	const on = isoDate(at);
	const n = await em.count(Qualification, {
		user: userId,
		familyKey: familyKey(family),
		revokedAt: null,
		trainedOn: { $lte: on },
		$or: [{ expiresOn: null }, { expiresOn: { $gte: on } }]
	});
	return n > 0;
}

export function findById(em: EntityManager, id: string): Promise<IQualification | null> {
	return em.findOne(Qualification, { id }, { populate: ['user'] });
}

export function listAll(em: EntityManager): Promise<IQualification[]> {
	return em.find(Qualification, {}, { populate: ['user'], orderBy: { user: { name: 'asc' }, family: 'asc' } });
}

export function listForUser(em: EntityManager, userId: string): Promise<IQualification[]> {
	return em.find(Qualification, { user: userId }, { populate: ['user'], orderBy: { family: 'asc' } });
}

/** Distinct family names on record, for suggestions in the form. */
export async function listFamilies(em: EntityManager): Promise<string[]> {
	const rows = await em.find(Qualification, {}, { fields: ['family'] });
	return [...new Set(rows.map((r) => r.family))].sort((a, b) => a.localeCompare(b));
}

export function create(
	em: EntityManager,
	user: IUser,
	actor: { id: string; name: string },
	data: { family: string; trainedBy: string; trainedOn: string; expiresOn: string | null; notes: string }
): IQualification {
	return em.create(Qualification, {
		id: crypto.randomUUID(),
		user,
		...data,
		family: data.family.trim().replace(/\s+/g, ' '),
		familyKey: familyKey(data.family),
		recordedById: actor.id,
		recordedByName: actor.name
	});
}

export function listPeople(em: EntityManager): Promise<IUser[]> {
	return em.find(User, {}, { orderBy: { name: 'asc' } });
}
