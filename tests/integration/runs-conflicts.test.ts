import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { verifyChain } from '../../src/lib/ledger/chain';
import { stepState } from '../../src/lib/ledger/step-state';
import type { IUser } from '../../src/lib/server/db/entities';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { listHeld } from '../../src/lib/server/services/devices-held';
import { useConflictPolicy } from '../../src/lib/server/services/run-conflicts';
import { runSearchSchema, searchRuns } from '../../src/lib/server/services/search.service';
import { makePerson } from '../factories/people';
import { bore, submitAs, threeStepRun } from '../factories/run-records';
import { PIN, qualify, record } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

// Shop rule of this product (common practice, no published source): the same step signed on two tablets keeps
// both records; the later one supersedes (policy `supersede`) or is held for the quality lead (policy `hold`).
describe('the same step signed on two tablets', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));
	afterEach(() => useConflictPolicy(undefined));

	/** The three-step run (step 1 critical), plus a second qualified technician (not assigned: a lead's session sends). */
	async function twoTechs() {
		const made = await threeStepRun(orm.em.fork());
		const tech2 = await makePerson(orm.em.fork(), { roles: ['technician'], pin: PIN, name: 'Second Technician' });
		await qualify(orm.em.fork(), tech2, made.lead);
		return { ...made, tech2 };
	}
	const rows = async (runId: string) => ledger.listForRun(orm.em.fork(), runId);
	const onTablet = (deviceId: string) => ({ deviceId, signedAt: Date.now() });
	/** Audit search's "signed on two tablets" filter: the ids of the runs it finds. */
	const clashed = async () =>
		(await searchRuns(orm.em.fork(), runSearchSchema.parse({ conflicts: 'yes', limit: 100 }))).runs.map((r) => r.id);

	it('supersede: keeps both sign-offs, the later names the earlier in its hashed body, the verification lapses', async () => {
		useConflictPolicy('supersede');
		const { tech, tech2, lead, quality, runId } = await twoTechs();
		const first = record(runId, tech, 'signoff', bore('22.010'), onTablet('bench-tablet-a'));
		const check = record(runId, quality, 'verification', { stepIndex: 0, signoffId: first.id });
		expect((await submitAs(orm, tech, runId, [first, check], [tech, quality])).map((a) => a.status)).toEqual([
			'accepted',
			'accepted'
		]);
		const later = record(runId, tech2, 'signoff', bore('22.012'), onTablet('bench-tablet-b'));
		const [answer] = await submitAs(orm, lead, runId, [later], [tech2]); // tablet B's session is the lead's
		expect(answer, answer.reason).toMatchObject({ status: 'accepted', seq: 3 });

		const stored = await rows(runId);
		expect(stored.map((r) => r.id)).toEqual([first.id, check.id, later.id]);
		expect((stored[2].body as { conflictsWith?: string }).conflictsWith).toBe(first.id);
		expect((stored[0].body as { conflictsWith?: string }).conflictsWith).toBeUndefined();
		expect(verifyChain(stored.map(ledger.toStored))).toMatchObject({ ok: true, count: 3 });
		const st = stepState(stored);
		expect(st.signoffOf.get(0)).toBe(later.id);
		expect(st.verified.has(0)).toBe(false);
		expect(st.conflicts.get(first.id)).toEqual({ id: later.id, current: true });

		// The later sign-off is verified afresh, by someone who did not work on the step (the first signer did).
		const byFirst = record(runId, quality, 'verification', { stepIndex: 0, signoffId: later.id });
		const [v] = await submitAs(orm, quality, runId, [byFirst], [quality]);
		expect(v, v.reason).toMatchObject({ status: 'accepted' });
		expect(stepState(await rows(runId)).verified.has(0)).toBe(true);
		expect(await clashed()).toContain(runId);
	});

	it('does not call it a clash when the same person signs again on the same tablet, but does on another tablet', async () => {
		useConflictPolicy('supersede');
		const { tech, runId } = await twoTechs();
		const a = record(runId, tech, 'signoff', bore('22.010'), onTablet('bench-tablet-a'));
		const again = record(runId, tech, 'signoff', bore('22.011'), onTablet('bench-tablet-a'));
		const elsewhere = record(runId, tech, 'signoff', bore('22.012'), onTablet('bench-tablet-c'));
		const answers = await submitAs(orm, tech, runId, [a, again, elsewhere], [tech]);
		expect(answers.map((x) => x.status)).toEqual(['accepted', 'accepted', 'accepted']);
		const stored = await rows(runId);
		expect(stored.map((r) => (r.body as { conflictsWith?: string }).conflictsWith ?? null)).toEqual([
			null,
			null,
			again.id
		]);
	});

	it('refuses a conflictsWith sent by a client: the server writes it', async () => {
		const { tech, runId } = await twoTechs();
		const forged = record(runId, tech, 'signoff', { ...bore('22.010'), conflictsWith: 'someone-else' });
		const [answer] = await submitAs(orm, tech, runId, [forged], [tech]);
		expect(answer).toMatchObject({
			status: 'refused',
			reason: 'body.conflictsWith is written by the server, not sent.'
		});
		expect(await rows(runId)).toHaveLength(0);
	});

	it('hold: refuses the later sign-off, holds it once for the quality lead, and leaves the chain alone', async () => {
		useConflictPolicy('hold');
		const { tech, tech2, lead, runId } = await twoTechs();
		const first = record(runId, tech, 'signoff', bore('22.010'), onTablet('bench-tablet-a'));
		expect((await submitAs(orm, tech, runId, [first], [tech]))[0].status).toBe('accepted');
		const later = record(runId, tech2, 'signoff', bore('22.012'), onTablet('bench-tablet-b'));
		for (let i = 0; i < 2; i++) {
			const [answer] = await submitAs(orm, lead, runId, [later], [tech2]); // tablet B's session is the lead's
			expect(answer.status).toBe('refused');
			expect(answer.reason).toMatch(
				/^Signed on two tablets: step 1 already has sign-off #1 by Test Technician on tablet bench-tablet-a\. This sign-off by Second Technician on tablet bench-tablet-b is held for the quality lead/
			);
		}
		expect((await rows(runId)).map((r) => r.id)).toEqual([first.id]);
		const queue = await listHeld(orm.em.fork(), { runId });
		expect(queue).toHaveLength(1);
		expect(queue[0]).toMatchObject({ recordId: later.id, kind: 'signoff', signerId: tech2.id, reason: 'other' });
		expect(queue[0].message).toMatch(/^Signed on two tablets/);
		expect(queue[0].submission).toMatchObject({ id: later.id, deviceId: 'bench-tablet-b' });
		expect(await clashed()).not.toContain(runId);
	});

	it('lets the verification rules, not the clash rule, answer a second verification (refused)', async () => {
		const { tech, quality, lead2, runId } = await twoTechs();
		const s = record(runId, tech, 'signoff', bore('22.010'));
		const v1 = record(runId, quality, 'verification', { stepIndex: 0, signoffId: s.id });
		const v2 = record(runId, lead2, 'verification', { stepIndex: 0, signoffId: s.id }, onTablet('bench-tablet-b'));
		const answers = await submitAs(orm, tech, runId, [s, v1, v2], [tech, quality, lead2 as IUser]);
		expect(answers.map((a) => a.status)).toEqual(['accepted', 'accepted', 'refused']);
		expect(answers[2].reason).toBe('Step 1 is already verified.');
	});
});
