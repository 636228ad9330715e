import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { verifyChain } from '../../src/lib/ledger/chain';
import { AdminLog, type IUser } from '../../src/lib/server/db/entities';
import * as jobs from '../../src/lib/server/repositories/jobs';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { getRun } from '../../src/lib/server/services/runs.service';
import { makePerson } from '../factories/people';
import {
	boreAttempt,
	makeRun,
	makeRunOf,
	PIN,
	qualify,
	record,
	submitWithPins,
	testProcedureOf,
	testSteps,
	viewer
} from '../factories/runs';
import { migratedAppOrm } from './support/orm';

/** Step 1 (the bore, 22 mm H7 = 22.000–22.021 mm by ISO 286-2) is critical; step 2 is not. Invented for tests. */
const criticalSource = () => testProcedureOf('Critical verification test', testSteps.bore(true), testSteps.magnet);

const magnet = { stepIndex: 1, entries: [{ checkpointId: 'magnet-1', entry: { confirmed: true }, claimed: 'pass' }] };

describe('critical-step verification and completion', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	/** makeRun's people and job, with a run of the critical procedure on that job. */
	async function criticalRun() {
		const made = await makeRunOf(orm.em.fork(), criticalSource());
		expect(made.version.model.steps.map((s) => s.critical)).toEqual([true, false]);
		return made;
	}

	const submit = (actor: IUser, runId: string, records: unknown[], pins: Record<string, string>) =>
		submitWithPins(orm, actor, runId, records, pins);
	const stored = async (runId: string) => (await ledger.listForRun(orm.em.fork(), runId)).map(ledger.toStored);
	const stateOf = async (viewerUser: IUser, runId: string) => {
		const r = await getRun(orm.em.fork(), viewer(viewerUser), runId);
		if (!r.ok) throw new Error(r.message);
		return r.value.state;
	};
	const verification = (runId: string, who: IUser, signoffId: string, role = who.roles[0], stepIndex = 0) =>
		record(runId, who, 'verification', { stepIndex, signoffId }, { signer: { id: who.id, role } });

	async function signBore(runId: string, who: IUser, role = who.roles[0]) {
		const s = record(runId, who, 'signoff', boreAttempt('22.010'), { signer: { id: who.id, role } });
		const [a] = await submit(who, runId, [s], { [who.id]: PIN });
		expect(a.status).toBe('accepted');
		return s.id;
	}

	it('accepts the verification of a signed critical step by a second person', async () => {
		const { tech, quality, runId } = await criticalRun();
		const signoffId = await signBore(runId, tech);
		const v = verification(runId, quality, signoffId);
		// The quality lead verifies on the technician's tablet session: the record names the verifier, not the session.
		const [a] = await submit(tech, runId, [v], { [quality.id]: PIN });
		expect(a).toMatchObject({ id: v.id, status: 'accepted', seq: 2 });
		const rows = await stored(runId);
		expect(rows.map((r) => r.kind)).toEqual(['signoff', 'verification']);
		expect(rows[1].body).toMatchObject({
			stepIndex: 0,
			signoffId,
			signer: { id: quality.id, name: quality.name, role: 'quality' }
		});
		expect(verifyChain(rows)).toMatchObject({ ok: true, count: 2 });
		// A second verification of the same step is refused.
		const lead2 = await makePerson(orm.em.fork(), { roles: ['lead'], pin: PIN });
		const [again] = await submit(tech, runId, [verification(runId, lead2, signoffId)], { [lead2.id]: PIN });
		expect(again).toMatchObject({ status: 'refused', reason: 'Step 1 is already verified.' });
	});

	it('refuses the doer, even when they hold the lead role too, and anyone who made an attempt on the step', async () => {
		const { tech, lead, runId } = await criticalRun();
		const both = await makePerson(orm.em.fork(), { roles: ['technician', 'lead'], pin: PIN, name: 'Dual Role Tech' });
		await qualify(orm.em.fork(), both, lead);
		const signoffId = await signBore(runId, both, 'technician');
		const [own] = await submit(both, runId, [verification(runId, both, signoffId, 'lead')], { [both.id]: PIN });
		expect(own).toMatchObject({
			status: 'refused',
			reason: 'Dual Role Tech worked on step 1, so cannot verify it: a critical step is verified by a second person.'
		});
		// The lead made one (failed) attempt on the step; the technician then signed it: the lead did the step too.
		const { tech: t2, lead: l2, runId: r2 } = await criticalRun();
		await qualify(orm.em.fork(), l2, l2);
		const [att] = await submit(l2, r2, [record(r2, l2, 'attempt', boreAttempt('22.030', 'fail'))], { [l2.id]: PIN });
		expect(att.status).toBe('accepted');
		const s2 = await signBore(r2, t2);
		const [byAttempter] = await submit(t2, r2, [verification(r2, l2, s2)], { [l2.id]: PIN });
		expect(byAttempter.reason).toBe(
			'Test Lead worked on step 1, so cannot verify it: a critical step is verified by a second person.'
		);
		expect((await stored(runId)).map((r) => r.kind)).toEqual(['signoff']);
		void tech;
	});

	it('refuses a technician-only verifier, a wrong PIN, and a sign-off that is not the step’s', async () => {
		const { tech, quality, runId } = await criticalRun();
		const signoffId = await signBore(runId, tech);
		const other = await makePerson(orm.em.fork(), { roles: ['technician'], pin: PIN, name: 'Other Technician' });
		const [a] = await submit(tech, runId, [verification(runId, other, signoffId)], { [other.id]: PIN });
		expect(a).toMatchObject({
			status: 'refused',
			reason: 'Other Technician holds neither the lead nor the quality role, so cannot verify a critical step.'
		});
		const [pin] = await submit(tech, runId, [verification(runId, quality, signoffId)], { [quality.id]: '000000' });
		expect(pin.reason).toBe(`Wrong PIN for ${quality.name}: 4 tries left before signing locks.`);
		const [none] = await submit(tech, runId, [verification(runId, quality, crypto.randomUUID())], {
			[quality.id]: PIN
		});
		expect(none.reason).toMatch(/^Step 1 has no sign-off [0-9a-f-]{36} in this run to verify\.$/);
		expect((await stored(runId)).map((r) => r.kind)).toEqual(['signoff']);
	});

	it('refuses the verification of a step that is not critical', async () => {
		const { tech, quality, runId } = await criticalRun();
		const s = record(runId, tech, 'signoff', magnet);
		expect((await submit(tech, runId, [s], { [tech.id]: PIN }))[0].status).toBe('accepted');
		const [a] = await submit(tech, runId, [verification(runId, quality, s.id, 'quality', 1)], { [quality.id]: PIN });
		expect(a).toMatchObject({ status: 'refused', reason: 'Step 2 is not a critical step: it needs no verification.' });
	});

	it('moves the run to awaiting review with the record that completes it, leaving the job state alone', async () => {
		const { tech, quality, runId, jobId } = await criticalRun();
		const signoffId = await signBore(runId, tech);
		expect((await submit(tech, runId, [record(runId, tech, 'signoff', magnet)], { [tech.id]: PIN }))[0].status).toBe(
			'accepted'
		);
		// Every step signed, but the critical one not yet verified: still in progress.
		expect(await stateOf(tech, runId)).toBe('in_progress');
		const [v] = await submit(tech, runId, [verification(runId, quality, signoffId)], { [quality.id]: PIN });
		expect(v.status).toBe('accepted');
		expect(await stateOf(tech, runId)).toBe('awaiting_review');
		const log = await orm.em.fork().find(AdminLog, { subjectId: runId, action: 'run.awaiting_review' });
		expect(log.map((l) => [l.actorId, (l.detail as { completedBy: string }).completedBy])).toEqual([
			[quality.id, v.id]
		]);
		expect((await jobs.findById(orm.em.fork(), jobId))!.state).toBe('received');
		const [late] = await submit(tech, runId, [record(runId, tech, 'attempt', boreAttempt('22.010'))], {
			[tech.id]: PIN
		});
		expect(late.reason).toBe('The run is awaiting review: no more steps can be recorded on it.');

		// A run with no critical step completes with its last sign-off.
		const plainRun = await makeRun(orm.em.fork());
		const t = plainRun.tech;
		const last = await submit(
			t,
			plainRun.runId,
			[record(plainRun.runId, t, 'signoff', boreAttempt('22.010')), record(plainRun.runId, t, 'signoff', magnet)],
			{ [t.id]: PIN }
		);
		expect(last.map((a) => a.status)).toEqual(['accepted', 'accepted']);
		expect(await stateOf(t, plainRun.runId)).toBe('awaiting_review');
	});
});
