import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { User, type IUser } from '../../src/lib/server/db/entities';
import * as qualifications from '../../src/lib/server/repositories/qualifications';
import * as ledger from '../../src/lib/server/repositories/ledger';
import * as runs from '../../src/lib/server/repositories/runs';
import { verifyRun } from '../../src/lib/server/services/audit.service';
import { dispositionSchema } from '../../src/lib/server/services/dispositions.schema';
import { dispose, listFindings } from '../../src/lib/server/services/dispositions.service';
import { changeState } from '../../src/lib/server/services/jobs.service';
import { RELEASED_REFUSAL } from '../../src/lib/server/services/release-guard';
import { releaseJob, releaseRun } from '../../src/lib/server/services/release.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { makePerson } from '../factories/people';
import { FAMILY, makeRun, PIN, record } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

// The test procedure (tests/factories/runs.ts, invented): step 1 bore 22 mm H7 = 22.000–22.021 mm (ISO 286-2: IT7 for
// 18–30 mm is 21 µm, H puts EI at 0), so 22.030 mm is out of tolerance and 22.010 mm inside; step 2 a confirmation.
const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });
const bore = (reading: string, claimed: 'pass' | 'fail') => ({
	stepIndex: 0,
	entries: [{ checkpointId: 'bore-1', entry: { readings: [reading] }, claimed }]
});
const magnet = { stepIndex: 1, entries: [{ checkpointId: 'magnet-1', entry: { confirmed: true }, claimed: 'pass' }] };

describe('dispositions, rework runs and release', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	async function send(runId: string, signer: IUser, records: ReturnType<typeof record>[]) {
		const batch = submitBatchSchema.parse({ records, pins: { [signer.id]: PIN } });
		const r = await submitRecords(orm.em.fork(), viewer(signer), runId, batch);
		if (!r.ok) throw new Error(r.message);
		return r.value.answers;
	}

	/** A completed run awaiting review with an open finding on an out-of-tolerance bore, its job awaiting review. */
	async function runWithFinding(helper?: IUser) {
		const made = await makeRun(orm.em.fork());
		const quality = await makePerson(orm.em.fork(), { roles: ['quality'], pin: PIN, name: 'Test Quality' });
		if (helper) {
			const em = orm.em.fork();
			qualifications.create(em, (await em.findOneOrFail(User, { id: helper.id })) as IUser, made.lead, {
				family: FAMILY,
				trainedBy: made.lead.name,
				trainedOn: '2026-01-05',
				expiresOn: null,
				notes: ''
			});
			await em.flush();
			const [a] = await send(made.runId, helper, [
				{
					...record(made.runId, helper, 'attempt', bore('22.012', 'pass')),
					signer: { id: helper.id, role: 'technician' }
				}
			]);
			expect(a).toMatchObject({ status: 'accepted' });
		}
		const answers = await send(made.runId, made.tech, [
			record(made.runId, made.tech, 'finding', {
				stepIndex: 0,
				checkpointId: 'bore-1',
				text: 'Bore 1 reads 22.030 mm.'
			}),
			record(made.runId, made.tech, 'signoff', bore('22.030', 'fail')),
			record(made.runId, made.tech, 'signoff', magnet)
		]);
		expect(answers.map((a) => a.status)).toEqual(['accepted', 'accepted', 'accepted']);
		expect((await runs.findById(orm.em.fork(), made.runId))!.state).toBe('awaiting_review');
		for (const to of ['in_work', 'awaiting_review'] as const)
			expect((await changeState(orm.em.fork(), viewer(made.lead), made.jobId, { to, reason: 'Test move.' })).ok).toBe(
				true
			);
		return { ...made, quality, findingId: answers[0].id };
	}

	it('a run with an open finding cannot be released: 409 with the reason', async () => {
		const { runId, quality } = await runWithFinding();
		const r = await releaseRun(orm.em.fork(), viewer(quality), runId, { pin: PIN });
		expect(r).toMatchObject({ ok: false, status: 409 });
		expect(r.ok ? [] : 'reasons' in r ? r.reasons : []).toEqual([
			'A finding on step 1 has no disposition yet: “Bore 1 reads 22.030 mm.”.'
		]);
		expect((await runs.findById(orm.em.fork(), runId))!.state).toBe('awaiting_review');
	});

	it('use as is needs a written justification; a disposition needs the right PIN and is refused to its own worker', async () => {
		const { runId, tech, quality, findingId } = await runWithFinding();
		const shrug = dispositionSchema.safeParse({ decision: 'use_as_is', justification: 'fine', pin: PIN });
		expect(shrug.success).toBe(false);
		expect(shrug.error!.issues[0]).toMatchObject({ path: ['justification'] });
		const input = dispositionSchema.parse({
			decision: 'use_as_is',
			justification: 'Within the wear limit of the invented demo spec; engineering concession noted.',
			pin: '000000'
		});
		const wrong = await dispose(orm.em.fork(), viewer(quality), findingId, input);
		expect(wrong).toMatchObject({ ok: false, status: 400, field: 'pin' });
		expect(wrong.ok ? '' : wrong.message).toMatch(/^Wrong PIN for Test Quality: 4 tries left/);

		// The technician who raised it does not decide it (the role check comes first for a plain technician).
		const own = await dispose(orm.em.fork(), { ...viewer(tech), roles: ['technician', 'quality'] }, findingId, {
			...input,
			pin: PIN
		});
		expect(own).toMatchObject({ ok: false, status: 403, message: expect.stringMatching(/raised this finding/) });

		const ok = await dispose(orm.em.fork(), viewer(quality), findingId, { ...input, pin: PIN });
		expect(ok).toMatchObject({ ok: true, value: { reworkRunId: null } });
		const rows = await ledger.listForRun(orm.em.fork(), runId);
		expect(rows.at(-1)).toMatchObject({ kind: 'disposition', signerId: quality.id, signerRole: 'quality' });
		expect(rows.at(-1)!.body).toMatchObject({ findingId, decision: 'use_as_is', justification: input.justification });
		expect((await listFindings(orm.em.fork(), 'open')).map((f) => f.id)).not.toContain(findingId);
		expect(await verifyRun(orm.em.fork(), runId)).toMatchObject({ ok: true });
		const again = await dispose(orm.em.fork(), viewer(quality), findingId, { ...input, pin: PIN });
		expect(again).toMatchObject({ ok: false, status: 409 });
	});

	it('rework opens a linked run of the affected step, completed by that step alone; then run and job release', async () => {
		const { runId, jobId, tech, lead, quality, findingId } = await runWithFinding();
		const r = await dispose(orm.em.fork(), viewer(quality), findingId, {
			decision: 'rework',
			justification: 'Hone to the oversize stage.',
			steps: [1],
			assignedToId: tech.id,
			pin: PIN
		});
		if (!r.ok) throw new Error(r.message);
		const reworkId = r.value.reworkRunId!;
		const rw = (await runs.findById(orm.em.fork(), reworkId))!;
		expect(rw).toMatchObject({ state: 'in_progress', reworkSteps: [0], reworkFindingId: findingId });
		expect((rw.reworkOf as unknown as { id: string }).id).toBe(runId);

		const early = await releaseRun(orm.em.fork(), viewer(quality), runId, { pin: PIN });
		expect(early.ok ? [] : 'reasons' in early ? early.reasons : []).toEqual([
			'The rework of step 1 (Test Technician) is not complete yet.'
		]);

		const [outside] = await send(reworkId, tech, [record(reworkId, tech, 'signoff', magnet)]);
		expect(outside).toMatchObject({ status: 'refused' });
		expect(outside.reason).toBe('This rework run covers step 1 only: step 2 is not part of the rework.');
		const [signed] = await send(reworkId, tech, [record(reworkId, tech, 'signoff', bore('22.010', 'pass'))]);
		expect(signed).toMatchObject({ status: 'accepted' });
		expect((await runs.findById(orm.em.fork(), reworkId))!.state).toBe('awaiting_review');

		// The job cannot be released before its run.
		const jobEarly = await releaseJob(orm.em.fork(), viewer(quality), jobId, { pin: PIN });
		expect(jobEarly).toMatchObject({ ok: false, status: 409 });

		const released = await releaseRun(orm.em.fork(), viewer(quality), runId, { pin: PIN });
		if (!released.ok) throw new Error(released.message);
		expect(released.value.released).toEqual([runId, reworkId]);
		for (const id of [runId, reworkId]) {
			expect((await runs.findById(orm.em.fork(), id))!.state).toBe('released');
			expect((await ledger.listForRun(orm.em.fork(), id)).at(-1)).toMatchObject({
				kind: 'release',
				signerId: quality.id
			});
			expect(await verifyRun(orm.em.fork(), id)).toMatchObject({ ok: true });
		}

		// No record is accepted after release, not even a finding.
		for (const id of [runId, reworkId]) {
			const [late] = await send(id, lead, [record(id, lead, 'finding', { text: 'Late note.' })]);
			expect(late).toMatchObject({ status: 'refused', reason: RELEASED_REFUSAL });
		}

		const job = await releaseJob(orm.em.fork(), viewer(quality), jobId, { pin: PIN });
		expect(job).toMatchObject({ ok: true });
		const state = await orm.em.fork().execute<{ state: string }[]>('select state from job where id = ?', [jobId]);
		expect(state[0].state).toBe('released');
	});

	it('the releaser must have signed none of the run’s steps (403)', async () => {
		// A quality lead who also works at the bench (technician and quality roles, trained) records an attempt.
		const both = await makePerson(orm.em.fork(), { roles: ['technician', 'quality'], pin: PIN, name: 'Bench Quality' });
		const { runId, lead, findingId } = await runWithFinding(both);
		void lead;
		const q2 = await makePerson(orm.em.fork(), { roles: ['quality'], pin: PIN, name: 'Second Quality' });
		const replace = { decision: 'replace' as const, justification: '', steps: [], assignedToId: '', pin: PIN };
		expect((await dispose(orm.em.fork(), viewer(q2), findingId, replace)).ok).toBe(true);
		const refused = await releaseRun(orm.em.fork(), viewer(both), runId, { pin: PIN });
		expect(refused).toMatchObject({ ok: false, status: 403 });
		expect(refused.ok ? '' : refused.message).toBe(
			'Bench Quality signed a attempt of step 1 on this run, so cannot release it: a release is signed by someone who signed none of its steps.'
		);
		expect(await releaseRun(orm.em.fork(), viewer(q2), runId, { pin: PIN })).toMatchObject({ ok: true });
	});

	it('a required test that failed keeps the run from release', async () => {
		const source = `---
title: Release test procedure ${Date.now().toString(36)}
family: ${FAMILY}
purpose: A procedure made by a test.
specs: Invented for tests; not service data.
---

## Hold the test pressure

\`\`\`test seal-test
prompt: Hold the test pressure for two minutes with no drop.
\`\`\`
`;
		const made = await makeRun(orm.em.fork(), { source });
		const quality = await makePerson(orm.em.fork(), { roles: ['quality'], pin: PIN });
		const [a] = await send(made.runId, made.tech, [
			record(made.runId, made.tech, 'signoff', {
				stepIndex: 0,
				entries: [{ checkpointId: 'seal-test', entry: { result: 'fail' }, claimed: 'fail' }]
			})
		]);
		expect(a).toMatchObject({ status: 'accepted' });
		const r = await releaseRun(orm.em.fork(), viewer(quality), made.runId, { pin: PIN });
		expect(r.ok ? [] : 'reasons' in r ? r.reasons : []).toEqual(['Step 1: the required test seal-test did not pass.']);
	});
});
