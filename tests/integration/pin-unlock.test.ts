import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AdminLog, PinLock } from '../../src/lib/server/db/entities';
import { unlockPin } from '../../src/lib/server/services/pin-unlock.service';
import { magnet, submitAs, threeStepRun, viewer } from '../factories/run-records';
import { PIN, record } from '../factories/runs';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { migratedAppOrm } from './support/orm';

describe('a lead unlocks a PIN lock on a tablet', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	it('locks after five wrong PINs, unlocks with the lead’s own PIN (doubling kept), and logs it', async () => {
		const { tech, lead, lead2, runId } = await threeStepRun(orm.em.fork());
		const device = 'tablet-bench-3';
		const wrongTry = () =>
			submitRecords(
				orm.em.fork(),
				viewer(tech),
				runId,
				submitBatchSchema.parse({
					records: [record(runId, tech, 'signoff', magnet, { deviceId: device })],
					pins: { [tech.id]: '000000' }
				})
			);
		for (let i = 0; i < 5; i++) await wrongTry();
		const locked = await wrongTry();
		expect(locked.ok && locked.value.answers[0].reason).toMatch(/signing on this tablet is locked for 15 more minutes/);
		const input = { userId: tech.id, deviceId: device, leadId: lead.id, pin: PIN };

		const wrongLeadPin = await unlockPin(orm.em.fork(), viewer(tech), runId, { ...input, pin: '111111' });
		expect(wrongLeadPin).toMatchObject({ ok: false, status: 403, field: 'pin' });
		const notLead = await unlockPin(orm.em.fork(), viewer(tech), runId, { ...input, leadId: tech.id });
		expect(notLead).toMatchObject({
			ok: false,
			status: 403,
			message: `${tech.name} does not hold the lead role, so cannot unlock signing.`
		});
		const own = await unlockPin(orm.em.fork(), viewer(tech), runId, { ...input, userId: lead.id });
		expect(own).toMatchObject({
			ok: false,
			message: 'A lead cannot unlock their own signing: another lead unlocks it.'
		});
		const otherTablet = await unlockPin(orm.em.fork(), viewer(tech), runId, { ...input, deviceId: 'tablet-9' });
		expect(otherTablet).toMatchObject({ ok: false, status: 409 });

		const done = await unlockPin(orm.em.fork(), viewer(tech), runId, input);
		expect(done).toEqual({ ok: true, value: { unlocked: tech.id } });
		const row = await orm.em.fork().findOneOrFail(PinLock, { userId: tech.id, deviceId: device });
		expect([row.failures, row.lockedUntil, row.lockouts]).toEqual([0, null, 1]);
		const log = await orm.em.fork().find(AdminLog, { action: 'pin.unlocked', subjectId: tech.id });
		expect(log.map((l) => [l.actorId, (l.detail as { deviceId: string }).deviceId])).toEqual([[lead.id, device]]);
		// Signing works again on that tablet.
		const [ok] = await submitAs(
			orm,
			tech,
			runId,
			[record(runId, tech, 'signoff', magnet, { deviceId: device })],
			[tech]
		);
		expect(ok.status).toBe('accepted');
		// Not locked any more: a second unlock is refused.
		expect(await unlockPin(orm.em.fork(), viewer(tech), runId, { ...input, leadId: lead2.id })).toMatchObject({
			ok: false,
			status: 409,
			message: `${tech.name}'s signing is not locked on this tablet.`
		});
	});

	it('answers not found for a run the session may not see', async () => {
		const a = await threeStepRun(orm.em.fork());
		const b = await threeStepRun(orm.em.fork());
		const r = await unlockPin(orm.em.fork(), viewer(b.tech), a.runId, {
			userId: b.tech.id,
			deviceId: '',
			leadId: b.lead.id,
			pin: PIN
		});
		expect(r).toMatchObject({ ok: false, status: 404 });
	});
});
