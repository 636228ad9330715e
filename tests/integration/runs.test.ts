import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../../scripts/lib/postgres';
import { verifyChain } from '../../src/lib/ledger/chain';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import type { IUser } from '../../src/lib/server/db/entities';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { retire } from '../../src/lib/server/services/procedures.service';
import { getRun, startRun } from '../../src/lib/server/services/runs.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords, type RecordAnswer } from '../../src/lib/server/services/submit.service';
import { makePerson } from '../factories/people';
import { makeCalibratedTool } from '../factories/registers';
import { boreAttempt, makeRun, PIN, record } from '../factories/runs';
import { testDbUrls } from './db-urls';
import { migratedAppOrm } from './support/orm';

const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

describe('runs and the submit route', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	async function submit(actor: IUser, runId: string, records: unknown[], pins: Record<string, string>, now?: Date) {
		const batch = submitBatchSchema.parse({ records, pins });
		const r = await submitRecords(orm.em.fork(), viewer(actor), runId, batch, now ? { now: () => now } : {});
		if (!r.ok) throw new Error(r.message);
		return r.value.answers;
	}
	const stored = async (runId: string) => (await ledger.listForRun(orm.em.fork(), runId)).map(ledger.toStored);

	it('stores a client "pass" for an out-of-limit reading as the server\'s fail, and opens a finding', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		// 22.050 mm against 22 mm H7 = 22.000–22.021 mm (ISO 286-2): 0.029 mm over the maximum.
		const sent = record(runId, tech, 'signoff', boreAttempt('22.050', 'pass'));
		const [answer] = await submit(tech, runId, [sent], { [tech.id]: PIN });
		expect(answer).toMatchObject({ id: sent.id, status: 'accepted', seq: 1 });
		expect(answer.findings).toHaveLength(1);

		const rows = await stored(runId);
		expect(rows.map((r) => r.kind)).toEqual(['signoff', 'finding']);
		const body = rows[0].body as { evaluation: { status: string; claimed: string }[]; signer: { id: string } };
		expect(body.evaluation[0]).toMatchObject({ status: 'fail', claimed: 'pass' });
		expect(body.signer.id).toBe(tech.id);
		const finding = rows[1].body as { raisedBy: string; about: string; text: string };
		expect(finding).toMatchObject({ raisedBy: 'server', about: sent.id });
		expect(finding.text).toMatch(/^The tablet showed a pass for bore-1; the server judged it a fail: .*22\.021 mm/);
		expect(rows[1].id).toBe(answer.findings![0]);
		expect(verifyChain(rows)).toMatchObject({ ok: true, count: 2 });
	});

	it('stores an in-limit reading as pass and opens no finding', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const [answer] = await submit(tech, runId, [record(runId, tech, 'signoff', boreAttempt('22.010'))], {
			[tech.id]: PIN
		});
		expect(answer.status).toBe('accepted');
		expect(answer.findings).toBeUndefined();
		const rows = await stored(runId);
		expect(rows).toHaveLength(1);
		expect((rows[0].body as { evaluation: { status: string }[] }).evaluation[0].status).toBe('pass');
	});

	it('refuses UPDATE and DELETE on the ledger for the app role, and UPDATE, DELETE, TRUNCATE even for the owner', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const [a] = await submit(tech, runId, [record(runId, tech, 'attempt', boreAttempt('22.010'))], {
			[tech.id]: PIN
		});
		expect(a.status).toBe('accepted');
		await withClient(testDbUrls().appUrl, async (c) => {
			await expect(c.query(`update ledger_record set kind = 'forged' where id = $1`, [a.id])).rejects.toThrow(
				/permission denied/
			);
			await expect(c.query(`delete from ledger_record where id = $1`, [a.id])).rejects.toThrow(/permission denied/);
			await expect(c.query(`truncate ledger_record`)).rejects.toThrow(/permission denied/);
		});
		await withClient(testDbUrls().ownerUrl, async (c) => {
			await expect(c.query(`update ledger_record set kind = 'forged' where id = $1`, [a.id])).rejects.toThrow(
				/append-only/
			);
			await expect(c.query(`delete from ledger_record where id = $1`, [a.id])).rejects.toThrow(/append-only/);
			await expect(c.query(`truncate ledger_record`)).rejects.toThrow(/append-only/);
		});
		const rows = await stored(runId);
		expect(rows.map((r) => [r.id, r.kind])).toEqual([[a.id, 'attempt']]);
	});

	it('refuses a second record after the same one at the database (unique run + prev_hash, run + seq)', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const [a] = await submit(tech, runId, [record(runId, tech, 'attempt', boreAttempt('22.010'))], {
			[tech.id]: PIN
		});
		await withClient(testDbUrls().appUrl, async (c) => {
			const insert = `insert into ledger_record (id, run_id, seq, kind, canonical, prev_hash, hash, submission_hash, signer_role, server_time, engine_version)
				values ($1, $2, $3, 'attempt', '{"body":{}}', $4, $5, $5, 'technician', now(), 'x')`;
			const h = (ch: string) => ch.repeat(64);
			// Written straight to the table (as a bug that skipped the run lock would): a second follower of record 1
			// is refused however it is numbered, and so is a second record 1.
			await expect(c.query(insert, [uuidv7(), runId, 2, a.hash, h('b')])).resolves.toBeTruthy();
			await expect(c.query(insert, [uuidv7(), runId, 3, a.hash, h('c')])).rejects.toThrow(
				/ledger_record_run_prev_hash_unique/
			);
			await expect(c.query(insert, [uuidv7(), runId, 1, null, h('d')])).rejects.toThrow(/ledger_record_run_seq_unique/);
		});
	});

	it('keeps one unbroken chain under twenty concurrent submissions to one run', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const answers = await Promise.all(
			Array.from({ length: 20 }, (_, i) =>
				submit(tech, runId, [record(runId, tech, 'attempt', boreAttempt(`22.0${10 + (i % 10)}`))], {
					[tech.id]: PIN
				})
			)
		);
		expect(answers.flat().map((a) => a.status)).toEqual(Array(20).fill('accepted'));
		const rows = await stored(runId);
		expect(verifyChain(rows)).toMatchObject({ ok: true, count: 20 });
		expect(rows.map((r) => r.seq)).toEqual(Array.from({ length: 20 }, (_, i) => i + 1));
		const run = await getRun(orm.em.fork(), viewer(tech), runId);
		expect(run.ok && [run.value.recordCount, run.value.headHash]).toEqual([20, rows[19].hash]);
	});

	it('stores each record once when the same batch is sent three times', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const batch = [
			record(runId, tech, 'attempt', boreAttempt('22.030', 'fail')),
			record(runId, tech, 'attempt', boreAttempt('22.012')),
			record(runId, tech, 'signoff', boreAttempt('22.012'))
		];
		const first = await submit(tech, runId, batch, { [tech.id]: PIN });
		expect(first.map((a) => a.status)).toEqual(['accepted', 'accepted', 'accepted']);
		for (let i = 0; i < 2; i++) {
			// A replay needs no PIN: the duplicates are recognised before any signer check.
			const again = await submit(tech, runId, batch, {});
			expect(again.map((a) => a.status)).toEqual(['duplicate', 'duplicate', 'duplicate']);
			expect(again.map((a) => a.hash)).toEqual(first.map((a) => a.hash));
		}
		const rows = await stored(runId);
		expect(rows.map((r) => r.id)).toEqual(batch.map((r) => r.id));
		expect(verifyChain(rows)).toMatchObject({ ok: true, count: 3 });
		// Each acceptance carries the server's time as stored in the record (and hashed with it): what a tablet shows.
		const entities = await ledger.listForRun(orm.em.fork(), runId);
		expect(first.map((a) => a.serverTime)).toEqual(entities.map((e) => e.serverTime.toISOString()));
		expect(first.map((a) => a.serverTime)).toEqual(rows.map((r) => (r.body as { serverTime: string }).serverTime));
	});

	it('refuses an id reused with different content', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const r = record(runId, tech, 'attempt', boreAttempt('22.010'));
		await submit(tech, runId, [r], { [tech.id]: PIN });
		const [again] = await submit(tech, runId, [{ ...r, body: boreAttempt('22.011') }], { [tech.id]: PIN });
		expect(again).toMatchObject({
			status: 'refused',
			reason: 'Refused: this record id was already used with different content.'
		});
		expect(await stored(runId)).toHaveLength(1);
	});

	it('stores the good records of a batch and names the bad one', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const good1 = record(runId, tech, 'attempt', boreAttempt('22.010'));
		const bad = record(runId, tech, 'attempt', { stepIndex: 0, entries: [{ checkpointId: 'no-such', entry: {} }] });
		const good2 = record(runId, tech, 'signoff', boreAttempt('22.010'));
		const answers = await submit(tech, runId, [good1, bad, { id: 'not-a-uuid', kind: 'attempt' }, good2], {
			[tech.id]: PIN
		});
		expect(answers.map((a: RecordAnswer) => [a.id, a.status])).toEqual([
			[good1.id, 'accepted'],
			[bad.id, 'refused'],
			['not-a-uuid', 'refused'],
			[good2.id, 'accepted']
		]);
		expect(answers[1].reason).toBe('Step 1 has no checkpoint no-such.');
		expect(answers[2].reason).toMatch(/^id: /);
		expect(answers.map((a) => a.seq)).toEqual([1, undefined, undefined, 2]);
		expect((await stored(runId)).map((r) => r.id)).toEqual([good1.id, good2.id]);
	});

	it('refuses a signer who is not qualified for the family, and a past-due tool', async () => {
		const { tech, lead, runId } = await makeRun(orm.em.fork(), { qualified: false });
		const [unq] = await submit(tech, runId, [record(runId, tech, 'signoff', boreAttempt('22.010'))], {
			[tech.id]: PIN
		});
		expect(unq.status).toBe('refused');
		expect(unq.reason).toMatch(/holds no training record in force for KTX-7/);

		const pastDue = await makeCalibratedTool(orm.em.fork(), { daysAgo: 400, dueInDays: -5 });
		const { tech: t2, runId: r2 } = await makeRun(orm.em.fork());
		const [tool] = await submit(
			t2,
			r2,
			[record(r2, t2, 'signoff', { ...boreAttempt('22.010'), tools: [pastDue.id] })],
			{ [t2.id]: PIN }
		);
		expect(tool).toMatchObject({ status: 'refused' });
		expect(tool.reason).toBe(`Tool ${pastDue.assetTag} cannot be used: Blocked: calibration past due.`);
		const good = await makeCalibratedTool(orm.em.fork());
		const [ok] = await submit(t2, r2, [record(r2, t2, 'signoff', { ...boreAttempt('22.010'), tools: [good.id] })], {
			[t2.id]: PIN
		});
		expect(ok.status).toBe('accepted');
		const snap = (await stored(r2))[0].body as { toolSnapshots: { assetTag: string; status: { usable: boolean } }[] };
		expect(snap.toolSnapshots[0]).toMatchObject({ assetTag: good.assetTag, status: { usable: true } });
		void lead;
	});

	it('refuses a wrong PIN, and the sixth wrong PIN as locked (per person per tablet)', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const now = new Date();
		const send = (pin: string, deviceId = 'tablet-1') =>
			submit(
				tech,
				runId,
				[record(runId, tech, 'attempt', boreAttempt('22.010'), { deviceId })],
				{ [tech.id]: pin },
				now
			);
		for (let i = 1; i <= 4; i++) {
			const [a] = await send('000000');
			expect(a.reason).toBe(
				`Wrong PIN for ${tech.name}: ${5 - i} ${5 - i === 1 ? 'try' : 'tries'} left before signing locks.`
			);
		}
		const [fifth] = await send('000000');
		expect(fifth.reason).toMatch(/^Wrong PIN\. .* is locked for 15 more minutes/);
		const [sixth] = await send('000000');
		expect(sixth.reason).toMatch(/^Test Technician's signing on this tablet is locked for 15 more minutes/);
		// Locked means the PIN is not even checked: the right PIN is refused too, on that tablet only.
		const [right] = await send(PIN);
		expect(right.status).toBe('refused');
		expect(right.reason).toMatch(/locked/);
		const [other] = await send(PIN, 'tablet-2');
		expect(other.status).toBe('accepted');
		// Sixteen minutes later the lock is over.
		const later = new Date(now.getTime() + 16 * 60_000);
		const [after] = await submit(
			tech,
			runId,
			[record(runId, tech, 'attempt', boreAttempt('22.010'), { deviceId: 'tablet-1' })],
			{ [tech.id]: PIN },
			later
		);
		expect(after.status).toBe('accepted');
		// No PIN in the request is refused without counting as a try.
		const [none] = await submit(tech, runId, [record(runId, tech, 'attempt', boreAttempt('22.010'))], {});
		expect(none.reason).toBe(`Enter ${tech.name}'s PIN to sign.`);
		expect(JSON.stringify(await stored(runId))).not.toContain(PIN);
	});

	it('refuses an inactive signer and a role the signer does not hold', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const gone = await makePerson(orm.em.fork(), { roles: ['technician'], pin: PIN, active: false });
		const [a] = await submit(tech, runId, [record(runId, gone, 'attempt', boreAttempt('22.010'))], { [gone.id]: PIN });
		expect(a.reason).toBe('The signer is not an active account.');
		const [b] = await submit(
			tech,
			runId,
			[record(runId, tech, 'attempt', boreAttempt('22.010'), { signer: { id: tech.id, role: 'quality' } })],
			{ [tech.id]: PIN }
		);
		expect(b.reason).toBe(`${tech.name} does not hold the quality role named in the record.`);
	});

	it("cannot start a run on a retired version, or with a content hash other than the version's", async () => {
		const { lead, tech, version, jobId } = await makeRun(orm.em.fork());
		const input = { jobId, procedureVersionId: version.id, contentHash: version.contentHash, assignedToId: tech.id };
		const wrongHash = await startRun(orm.em.fork(), viewer(lead), { ...input, contentHash: 'a'.repeat(64) });
		expect(wrongHash).toMatchObject({ ok: false, status: 409, field: 'contentHash' });
		const procedureId = (version.procedure as unknown as { id: string }).id;
		expect((await retire(orm.em.fork(), viewer(lead), procedureId, 1)).ok).toBe(true);
		const retired = await startRun(orm.em.fork(), viewer(lead), input);
		expect(retired).toMatchObject({
			ok: false,
			status: 409,
			message: 'Version 1 is retired: start the run on a current version.'
		});
		expect(await startRun(orm.em.fork(), viewer(tech), input)).toMatchObject({ ok: false, status: 409 });
	});

	it('lets a technician start a run for themselves only; a lead assigns anyone', async () => {
		const { lead, tech, version, jobId } = await makeRun(orm.em.fork());
		const other = await makePerson(orm.em.fork(), { roles: ['technician'], pin: PIN });
		const input = { jobId, procedureVersionId: version.id, contentHash: version.contentHash, assignedToId: tech.id };
		const own = await startRun(orm.em.fork(), viewer(tech), input);
		expect(own.ok).toBe(true);
		expect(await startRun(orm.em.fork(), viewer(tech), { ...input, assignedToId: other.id })).toMatchObject({
			ok: false,
			status: 403,
			field: 'assignedToId',
			message: 'A technician starts runs for themselves; a lead assigns runs to others.'
		});
		expect((await startRun(orm.em.fork(), viewer(lead), { ...input, assignedToId: other.id })).ok).toBe(true);
	});

	it('shows a technician only the runs assigned to them or signed in by them', async () => {
		const { tech, lead, runId } = await makeRun(orm.em.fork());
		const stranger = await makePerson(orm.em.fork(), { roles: ['technician'], pin: PIN });
		const quality = await makePerson(orm.em.fork(), { roles: ['quality'] });
		expect((await getRun(orm.em.fork(), viewer(tech), runId)).ok).toBe(true);
		expect((await getRun(orm.em.fork(), viewer(lead), runId)).ok).toBe(true);
		expect((await getRun(orm.em.fork(), viewer(quality), runId)).ok).toBe(true);
		expect(await getRun(orm.em.fork(), viewer(stranger), runId)).toMatchObject({ ok: false, status: 404 });
		const r = await submitRecords(orm.em.fork(), viewer(stranger), runId, submitBatchSchema.parse({ records: [{}] }));
		expect(r).toMatchObject({ ok: false, status: 404 });
		// A stranger who signs on the assignee's session (a finding of their own) sees the run from then on.
		const [f] = await submit(tech, runId, [record(runId, stranger, 'finding', { text: 'Scoring in bore 3.' })], {
			[stranger.id]: PIN
		});
		expect(f.status).toBe('accepted');
		expect((await getRun(orm.em.fork(), viewer(stranger), runId)).ok).toBe(true);
	});
});
