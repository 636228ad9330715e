import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IUser } from '../../src/lib/server/db/entities';
import * as runs from '../../src/lib/server/repositories/runs';
import { listHeld } from '../../src/lib/server/services/devices-held';
import { HELD_SENTENCE } from '../../src/lib/server/services/held-refusals';
import { RELEASED_REFUSAL } from '../../src/lib/server/services/release-guard';
import { releaseRun } from '../../src/lib/server/services/release.service';
import { makeTablet, type TestTablet } from '../factories/devices';
import { makePerson } from '../factories/people';
import { boreAttempt, makeRun, PIN, record, submitAs, submitWithPins, viewer } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

const magnet = { stepIndex: 1, entries: [{ checkpointId: 'magnet-1', entry: { confirmed: true }, claimed: 'pass' }] };
/** A sign-off of step 1 with no entry for bore-1: refused by the submit rules whoever sends it. */
const emptySignoff = { stepIndex: 0, entries: [] };

describe('refused records are held for the quality lead', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	/** A run, an enrolled tablet, and the offline grant the technician earned on it by signing online. */
	async function offlineReady() {
		const made = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), made.lead);
		const online = await tablet.sign({
			...record(made.runId, made.tech, 'attempt', boreAttempt('22.010')),
			signedAt: Date.now()
		});
		const [a] = await submitAs(orm, made.tech, made.runId, [online]);
		expect(a.status).toBe('accepted');
		return { ...made, tablet, grant: a.offlineGrant!.grant };
	}
	const offline = (tablet: TestTablet, runId: string, who: IUser, kind: string, body: unknown, grant: string) =>
		tablet.sign({ ...record(runId, who, kind, body), signedAt: Date.now(), signedOffline: true, offlineGrant: grant });
	const held = (runId: string) => listHeld(orm.em.fork(), { runId });

	it('holds every refusal of a record signed offline, once however often it is resent', async () => {
		const { tech, runId, tablet, grant } = await offlineReady();
		const sent = await offline(tablet, runId, tech, 'signoff', emptySignoff, grant);
		for (let i = 0; i < 3; i++) {
			const [answer] = await submitWithPins(orm, tech, runId, [sent], {});
			expect(answer.status).toBe('refused');
			expect(answer.reason).toBe(`Step 1 cannot be signed: bore-1 has no entry. ${HELD_SENTENCE}`);
		}
		const queue = await held(runId);
		expect(queue).toHaveLength(1);
		expect(queue[0]).toMatchObject({
			recordId: sent.id,
			reason: 'other',
			message: 'Step 1 cannot be signed: bore-1 has no entry.',
			deviceId: tablet.device.id,
			signerId: tech.id,
			resolution: null
		});
		expect(queue[0].submission).toEqual(JSON.parse(JSON.stringify(sent)));
	});

	it('does not hold the same refusal of a record signed online (the technician sees it at once)', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const [answer] = await submitAs(orm, tech, runId, [record(runId, tech, 'signoff', emptySignoff)]);
		expect(answer).toMatchObject({ status: 'refused', reason: 'Step 1 cannot be signed: bore-1 has no entry.' });
		expect(await held(runId)).toHaveLength(0);
	});

	it('keeps one row for a record the offline grant check already held', async () => {
		const { tech, runId, tablet } = await offlineReady();
		const sent = await tablet.sign({
			...record(runId, tech, 'attempt', boreAttempt('22.011')),
			signedAt: Date.now(),
			signedOffline: true
		});
		const [answer] = await submitWithPins(orm, tech, runId, [sent], {});
		expect(answer.reason).toMatch(/must carry the offline signing permit.*held for the quality lead\.$/);
		expect(answer.reason!.split(HELD_SENTENCE)).toHaveLength(2);
		expect((await held(runId)).map((h) => h.recordId)).toEqual([sent.id]);
	});

	it('holds a record that arrives after the run was released, online or offline, as after_release', async () => {
		const { tech, lead, runId, tablet, grant } = await offlineReady();
		const done = await submitAs(orm, tech, runId, [
			record(runId, tech, 'signoff', boreAttempt('22.010')),
			record(runId, tech, 'signoff', magnet)
		]);
		expect(done.map((a) => a.status)).toEqual(['accepted', 'accepted']);
		const quality = await makePerson(orm.em.fork(), { roles: ['quality'], pin: PIN, name: 'Test Quality Lead' });
		const released = await releaseRun(orm.em.fork(), viewer(quality), runId, { pin: PIN });
		expect(released.ok, released.ok ? '' : released.message).toBe(true);
		expect((await runs.findById(orm.em.fork(), runId))!.state).toBe('released');

		const late = await offline(
			tablet,
			runId,
			tech,
			'finding',
			{ stepIndex: 0, text: 'Late note from the bench.' },
			grant
		);
		const lateOnline = record(runId, lead, 'finding', { text: 'Late note from the desk.' });
		for (let i = 0; i < 2; i++) {
			const answers = await submitAs(orm, lead, runId, [late, lateOnline]);
			expect(answers).toMatchObject([
				{ status: 'refused', reason: RELEASED_REFUSAL },
				{ status: 'refused', reason: RELEASED_REFUSAL }
			]);
		}
		const queue = await held(runId);
		expect(queue.map((h) => [h.recordId, h.reason]).sort()).toEqual(
			[
				[late.id, 'after_release'],
				[lateOnline.id, 'after_release']
			].sort()
		);
		expect(queue.every((h) => h.reasonText === 'Arrived after release')).toBe(true);
	});
});
