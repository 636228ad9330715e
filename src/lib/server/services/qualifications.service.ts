import type { EntityManager } from '@mikro-orm/postgresql';
import { isoDate } from '../../registers/dates';
import type { QualificationInput } from '../../registers/schema';
import * as adminLog from '../repositories/admin-log';
import * as qualifications from '../repositories/qualifications';
import * as users from '../repositories/users';
import type { Actor, Result } from './accounts.service';

export { isQualified } from '../repositories/qualifications';

const refuse = (message: string, field?: string): Result<never> => ({ ok: false, message, field });

/** Records that a person was trained for a procedure family (or step qualification). */
export async function recordTraining(
	em: EntityManager,
	actor: Actor,
	input: QualificationInput,
	now: Date = new Date()
): Promise<Result<{ id: string }>> {
	const person = await users.findById(em, input.userId);
	if (!person || !person.active) return refuse('Choose an active person.', 'userId');
	if (input.trainedOn > isoDate(now)) return refuse('The training date cannot be in the future.', 'trainedOn');
	const row = qualifications.create(em, person, actor, {
		family: input.family,
		trainedBy: input.trainedBy,
		trainedOn: input.trainedOn,
		expiresOn: input.expiresOn || null,
		notes: input.notes
	});
	adminLog.append(em, actor, {
		action: 'qualification.recorded',
		subjectType: 'qualification',
		subjectId: row.id,
		detail: {
			userId: person.id,
			userName: person.name,
			family: row.family,
			trainedBy: row.trainedBy,
			trainedOn: row.trainedOn,
			expiresOn: row.expiresOn
		}
	});
	await em.flush();
	return { ok: true, value: { id: row.id } };
}

/** Withdraws a training record (kept, marked revoked) so the person can no longer sign for that family. */
export async function revokeTraining(em: EntityManager, actor: Actor, id: string): Promise<Result> {
	const row = await qualifications.findById(em, id);
	if (!row) return refuse('No such training record.');
	if (row.revokedAt) return { ok: true, value: undefined };
	row.revokedAt = new Date();
	adminLog.append(em, actor, {
		action: 'qualification.revoked',
		subjectType: 'qualification',
		subjectId: row.id,
		detail: { userId: qualifications.toRecord(row).userId, family: row.family }
	});
	await em.flush();
	return { ok: true, value: undefined };
}
