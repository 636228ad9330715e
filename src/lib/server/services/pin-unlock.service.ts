/**
 * A lead unlocks a person's PIN lock on a tablet, from the runner where the locked message shows. The lead signs
 * with their own PIN (checked under the same lockout policy as any signature); the unlock keeps the doubling of the
 * next lock (`$lib/signing/pin-lockout` `unlock`) and writes a `pin.unlocked` admin-log entry in the same
 * transaction.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import * as adminLog from '../repositories/admin-log';
import * as pinLocks from '../repositories/pin-locks';
import * as runs from '../repositories/runs';
import * as users from '../repositories/users';
import { maySee, type Result, type Viewer } from './runs.service';
import { checkPin } from './submit.service';

/** `POST /api/runs/:id/unlock`: whose signing, on which tablet ('' = no device id), the lead and their PIN. */
export const unlockSchema = z.strictObject({
	userId: z.uuid({ error: 'Choose the person whose signing is locked.' }),
	deviceId: z.union([
		z.literal(''),
		z.string().regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$/, 'A device id is up to 64 letters, digits, dots, dashes.')
	]),
	leadId: z.uuid({ error: 'Choose the lead who unlocks.' }),
	pin: z.string().max(16, 'A PIN is 6 to 8 digits.')
});
export type UnlockInput = z.infer<typeof unlockSchema>;

export async function unlockPin(
	em: EntityManager,
	actor: Viewer,
	runId: string,
	input: UnlockInput,
	now: Date = new Date()
): Promise<Result<{ unlocked: string }>> {
	const run = await runs.findById(em, runId);
	if (!run || !(await maySee(em, actor, run))) return { ok: false, status: 404, message: 'No such run.' };
	const lead = await users.findById(em, input.leadId);
	if (!lead || !lead.active || !lead.roles.includes('lead'))
		return {
			ok: false,
			status: 403,
			message: `${lead?.name ?? 'That person'} does not hold the lead role, so cannot unlock signing.`,
			field: 'leadId'
		};
	const locked = await users.findById(em, input.userId);
	if (!locked || !locked.active)
		return { ok: false, status: 400, message: 'The person to unlock is not an active account.', field: 'userId' };
	if (locked.id === lead.id)
		return {
			ok: false,
			status: 403,
			message: 'A lead cannot unlock their own signing: another lead unlocks it.',
			field: 'leadId'
		};
	const pin = await checkPin(em, lead, input.deviceId, input.pin, now);
	if (!pin.ok) return { ok: false, status: 403, message: pin.reason, field: 'pin' };
	return em.fork().transactional(async (tx): Promise<Result<{ unlocked: string }>> => {
		if (!(await pinLocks.unlock(tx, locked.id, input.deviceId, now)))
			return { ok: false, status: 409, message: `${locked.name}'s signing is not locked on this tablet.` };
		adminLog.append(tx, lead, {
			action: 'pin.unlocked',
			subjectType: 'user',
			subjectId: locked.id,
			detail: { deviceId: input.deviceId, runId, sessionOf: actor.id }
		});
		await tx.flush();
		return { ok: true, value: { unlocked: locked.id } };
	});
}
