import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { verifyChain } from '../../src/lib/ledger/chain';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { makePerson } from '../factories/people';
import { bore, filter, kinds, magnet, runState, submitAs, threeStepRun } from '../factories/run-records';
import { PIN, record } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

/** An N/A of `stepIndex` asked by `requester`, approved (signed) by `approver` in `role`. */
const na = (
	runId: string,
	approver: { id: string; roles: string[] },
	requesterId: string,
	stepIndex = 1,
	over: Record<string, unknown> = {},
	role = 'lead'
) =>
	record(
		runId,
		approver as never,
		'na_approval',
		{ stepIndex, reason: 'not_fitted', requestedById: requesterId, ...over },
		{ signer: { id: approver.id, role } }
	);

describe('not applicable with a lead’s approval', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	it('stores the reason, who asked and who approved, and counts the N/A step as done for completion', async () => {
		const { tech, lead, quality, runId } = await threeStepRun(orm.em.fork());
		const s0 = record(runId, tech, 'signoff', bore());
		const n = na(runId, lead, tech.id, 1, { reason: 'other', note: 'Unit has the early magnet-less pan.' });
		const s2 = record(runId, tech, 'signoff', filter);
		const answers = await submitAs(orm, tech, runId, [s0, n, s2], [tech, lead]);
		expect(answers.map((a) => a.status)).toEqual(['accepted', 'accepted', 'accepted']);
		const rows = await ledger.listForRun(orm.em.fork(), runId);
		expect(rows[1].body).toMatchObject({
			stepIndex: 1,
			reason: 'other',
			note: 'Unit has the early magnet-less pan.',
			requestedBy: { id: tech.id, name: tech.name },
			signer: { id: lead.id, name: lead.name, role: 'lead' }
		});
		// Step 1 (critical) still waits for its verification.
		expect(await runState(orm, tech, runId)).toBe('in_progress');
		const v = record(runId, quality, 'verification', { stepIndex: 0, signoffId: s0.id });
		expect((await submitAs(orm, tech, runId, [v], [quality]))[0].status).toBe('accepted');
		expect(await runState(orm, tech, runId)).toBe('awaiting_review');
		expect(verifyChain(rows.map(ledger.toStored))).toMatchObject({ ok: true });
	});

	it('completes a run with the N/A approval itself when it is the last step done', async () => {
		const { tech, lead, quality, runId } = await threeStepRun(orm.em.fork());
		const s0 = record(runId, tech, 'signoff', bore());
		const v = record(runId, quality, 'verification', { stepIndex: 0, signoffId: s0.id });
		const s1 = record(runId, tech, 'signoff', magnet);
		await submitAs(orm, tech, runId, [s0, v, s1], [tech, quality]);
		expect(await runState(orm, tech, runId)).toBe('in_progress');
		const [a] = await submitAs(orm, tech, runId, [na(runId, lead, tech.id, 2)], [lead]);
		expect(a.status).toBe('accepted');
		expect(await runState(orm, tech, runId)).toBe('awaiting_review');
	});

	it('refuses the requester approving, a non-lead, the lead role not named, and a wrong PIN', async () => {
		const { tech, lead, lead2, runId } = await threeStepRun(orm.em.fork());
		const [self] = await submitAs(orm, lead, runId, [na(runId, lead, lead.id)], [lead]);
		expect(self.reason).toBe(
			'Test Lead asked for this step to be not applicable, so cannot approve it: another lead approves.'
		);
		const other = await makePerson(orm.em.fork(), { roles: ['technician'], pin: PIN, name: 'Other Technician' });
		const [byTech] = await submitAs(orm, tech, runId, [na(runId, other, tech.id, 1, {}, 'technician')], [other]);
		expect(byTech.reason).toBe(
			'Other Technician does not hold the lead role, so cannot approve a step as not applicable.'
		);
		const both = await makePerson(orm.em.fork(), { roles: ['technician', 'lead'], pin: PIN, name: 'Dual Role' });
		const [asTech] = await submitAs(orm, tech, runId, [na(runId, both, tech.id, 1, {}, 'technician')], [both]);
		expect(asTech.reason).toBe('A not-applicable approval is signed in the lead role.');
		const wrong = na(runId, lead2, tech.id);
		const r = await submitAs(orm, tech, runId, [wrong], []);
		expect(r[0].reason).toBe("Enter Second Lead's PIN to sign.");
		expect(await kinds(orm, runId)).toEqual([]);
	});

	it('refuses a critical step, a signed step, a step already N/A, a sign-off on an N/A step, and "other" without words', async () => {
		const { tech, lead, lead2, runId } = await threeStepRun(orm.em.fork());
		const [critical] = await submitAs(orm, tech, runId, [na(runId, lead, tech.id, 0)], [lead]);
		expect(critical.reason).toBe(
			'Step 1 is a critical step: it cannot be marked not applicable, only done and verified.'
		);
		const s1 = record(runId, tech, 'signoff', magnet);
		await submitAs(orm, tech, runId, [s1], [tech]);
		const [signed] = await submitAs(orm, tech, runId, [na(runId, lead, tech.id, 1)], [lead]);
		expect(signed.reason).toBe('Step 2 is signed already: correct the sign-off first if the step does not apply.');
		expect((await submitAs(orm, tech, runId, [na(runId, lead, tech.id, 2)], [lead]))[0].status).toBe('accepted');
		const [again] = await submitAs(orm, tech, runId, [na(runId, lead2, tech.id, 2)], [lead2]);
		expect(again.reason).toBe('Step 3 is already marked not applicable.');
		const [sign] = await submitAs(orm, tech, runId, [record(runId, tech, 'signoff', filter)], [tech]);
		expect(sign.reason).toBe('Step 3 is marked not applicable: correct that first to sign it.');
		const [words] = await submitAs(orm, tech, runId, [na(runId, lead, tech.id, 1, { reason: 'other' })], [lead]);
		expect(words.reason).toBe('body.note: Say why the step does not apply.');
		const [sent] = await submitAs(
			orm,
			tech,
			runId,
			[na(runId, lead, tech.id, 1, { requestedBy: { id: lead.id, name: 'x' } })],
			[lead]
		);
		expect(sent.reason).toBe('body.requestedBy is written by the server, not sent.');
		const [nobody] = await submitAs(orm, tech, runId, [na(runId, lead, crypto.randomUUID(), 1)], [lead]);
		expect(nobody.reason).toBe('The person asking is not an active technician or lead.');
		expect(await kinds(orm, runId)).toEqual(['signoff', 'na_approval']);
	});
});
