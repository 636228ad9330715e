import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { verifyChain } from '../../src/lib/ledger/chain';
import { stepState } from '../../src/lib/ledger/step-state';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { makePerson } from '../factories/people';
import { bore, filter, kinds, magnet, runState, submitAs, threeStepRun } from '../factories/run-records';
import { PIN, record } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

const correct = (runId: string, who: { id: string; roles: string[] }, supersedes: string, role = who.roles[0]) =>
	record(
		runId,
		who as never,
		'supersession',
		{ supersedes, reason: 'Wrong bore entered.' },
		{
			signer: { id: who.id, role }
		}
	);

describe('corrections supersede, never edit', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	it('a superseded sign-off stops counting, with its verification: the step is signed and verified again', async () => {
		const { tech, quality, lead2, runId } = await threeStepRun(orm.em.fork());
		const s0 = record(runId, tech, 'signoff', bore('22.010'));
		const v0 = record(runId, quality, 'verification', { stepIndex: 0, signoffId: s0.id });
		const rest = [record(runId, tech, 'signoff', magnet)];
		await submitAs(orm, tech, runId, [s0, v0, ...rest], [tech, quality]);
		expect(await runState(orm, tech, runId)).toBe('in_progress');
		const c = correct(runId, tech, s0.id);
		const [a] = await submitAs(orm, tech, runId, [c], [tech]);
		expect(a.status).toBe('accepted');
		const rows = await ledger.listForRun(orm.em.fork(), runId);
		expect(rows.at(-1)!.body).toMatchObject({
			supersedes: s0.id,
			reason: 'Wrong bore entered.',
			stepIndex: 0,
			superseded: { kind: 'signoff', seq: 1, signerId: tech.id }
		});
		const state = stepState(rows);
		expect(state.signoffOf.has(0)).toBe(false);
		expect(state.verified.has(0)).toBe(false);
		expect(state.superseded.get(s0.id)).toEqual({ id: c.id, reason: 'Wrong bore entered.' });
		// The last step signed does not complete the run: step 1's sign-off was superseded.
		await submitAs(orm, tech, runId, [record(runId, tech, 'signoff', filter)], [tech]);
		expect(await runState(orm, tech, runId)).toBe('in_progress');
		// The quality lead's old verification does not carry over; and the one who signed the superseded
		// sign-off is still not a second person.
		const s0b = record(runId, lead2, 'signoff', bore('22.012'), { signer: { id: lead2.id, role: 'lead' } });
		const [byLead] = await submitAs(orm, tech, runId, [s0b], [lead2]);
		// Leads sign steps only when qualified; lead2 holds no training record.
		expect(byLead.reason).toMatch(/holds no training record in force/);
		const s0c = record(runId, tech, 'signoff', bore('22.012'));
		expect((await submitAs(orm, tech, runId, [s0c], [tech]))[0].status).toBe('accepted');
		const [v1] = await submitAs(
			orm,
			tech,
			runId,
			[record(runId, quality, 'verification', { stepIndex: 0, signoffId: s0c.id })],
			[quality]
		);
		expect(v1.status).toBe('accepted');
		expect(await runState(orm, tech, runId)).toBe('awaiting_review');
		const all = await ledger.listForRun(orm.em.fork(), runId);
		expect(verifyChain(all.map(ledger.toStored))).toMatchObject({ ok: true, count: 7 });
	});

	it('refuses a verification that names the superseded sign-off', async () => {
		const { tech, lead, quality, runId } = await threeStepRun(orm.em.fork());
		const s0 = record(runId, tech, 'signoff', bore());
		await submitAs(orm, tech, runId, [s0, correct(runId, lead, s0.id, 'lead')], [tech, lead]);
		const [old] = await submitAs(
			orm,
			tech,
			runId,
			[record(runId, quality, 'verification', { stepIndex: 0, signoffId: s0.id })],
			[quality]
		);
		expect(old.reason).toBe(`Step 1 has no sign-off ${s0.id} in this run to verify.`);
	});

	it('only the original signer or a lead corrects; a record is corrected once; findings cannot be', async () => {
		const { tech, lead, quality, runId } = await threeStepRun(orm.em.fork());
		const other = await makePerson(orm.em.fork(), { roles: ['technician'], pin: PIN, name: 'Other Technician' });
		const s1 = record(runId, tech, 'signoff', magnet);
		const f = record(runId, tech, 'finding', { stepIndex: 1, text: 'Debris on the magnet.' });
		await submitAs(orm, tech, runId, [s1, f], [tech]);
		const [byOther] = await submitAs(orm, tech, runId, [correct(runId, other, s1.id)], [other]);
		expect(byOther.reason).toBe('Only the person who signed record #1, or a lead, may correct it.');
		const [byQuality] = await submitAs(orm, tech, runId, [correct(runId, quality, s1.id)], [quality]);
		expect(byQuality.reason).toBe('Only the person who signed record #1, or a lead, may correct it.');
		const [finding] = await submitAs(orm, tech, runId, [correct(runId, tech, f.id)], [tech]);
		expect(finding.reason).toBe(
			'A finding record cannot be corrected; only sign-offs, attempts and not-applicable approvals.'
		);
		const [unknown] = await submitAs(orm, tech, runId, [correct(runId, tech, crypto.randomUUID())], [tech]);
		expect(unknown.reason).toMatch(/^This run has no record [0-9a-f-]{36} to correct\.$/);
		const [noReason] = await submitAs(
			orm,
			tech,
			runId,
			[record(runId, tech, 'supersession', { supersedes: s1.id, reason: '' })],
			[tech]
		);
		expect(noReason.reason).toBe('body.reason: Say why the record is corrected.');
		expect((await submitAs(orm, tech, runId, [correct(runId, lead, s1.id, 'lead')], [lead]))[0].status).toBe(
			'accepted'
		);
		const [twice] = await submitAs(orm, tech, runId, [correct(runId, tech, s1.id)], [tech]);
		expect(twice.reason).toBe('Record #1 is already corrected.');
		expect(await kinds(orm, runId)).toEqual(['signoff', 'finding', 'supersession']);
	});

	it('a corrected N/A lets the step be signed', async () => {
		const { tech, lead, runId } = await threeStepRun(orm.em.fork());
		const n = record(
			runId,
			lead,
			'na_approval',
			{ stepIndex: 2, reason: 'variant', requestedById: tech.id },
			{ signer: { id: lead.id, role: 'lead' } }
		);
		await submitAs(orm, tech, runId, [n], [lead]);
		// The technician asked but did not sign the approval: only the approver or a lead corrects it.
		const [byTech] = await submitAs(orm, tech, runId, [correct(runId, tech, n.id)], [tech]);
		expect(byTech.reason).toBe('Only the person who signed record #1, or a lead, may correct it.');
		const answers = await submitAs(
			orm,
			tech,
			runId,
			[correct(runId, lead, n.id, 'lead'), record(runId, tech, 'signoff', filter)],
			[lead, tech]
		);
		expect(answers.map((a) => a.status)).toEqual(['accepted', 'accepted']);
	});
});
