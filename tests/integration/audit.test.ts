import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../../scripts/lib/postgres';
import { verifyChain } from '../../src/lib/ledger/chain';
import { canonicalRecord, recordHash, type StoredRecord } from '../../src/lib/ledger/record';
import type { IUser } from '../../src/lib/server/db/entities';
import * as ledger from '../../src/lib/server/repositories/ledger';
import {
	jobNumbersOf,
	openFindings,
	recordAnchor,
	reviewQueue,
	runRecord,
	verifyAll,
	verifyRun
} from '../../src/lib/server/services/audit.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { boreAttempt, makeRun, PIN, record } from '../factories/runs';
import { testDbUrls } from './db-urls';
import { migratedAppOrm } from './support/orm';

const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });
const urls = testDbUrls();

/** The superuser, on the test database (not the maintenance one). */
function superuser(): string {
	if (!urls.superuserUrl) throw new Error('this test needs TEST_SUPERUSER_DATABASE_URL to alter the ledger');
	const u = new URL(urls.superuserUrl);
	u.pathname = new URL(urls.appUrl).pathname;
	return u.toString();
}

/** What someone with direct database access does: switch the append-only triggers off, run `sql`, switch them on. */
function asSuperuser(sql: string, params: unknown[] = []) {
	return withClient(superuser(), async (c) => {
		await c.query('begin');
		await c.query('alter table ledger_record disable trigger user');
		await c.query(sql, params);
		await c.query('alter table ledger_record enable trigger user');
		await c.query('commit');
	});
}

describe('verify: proof that a run’s ledger is unaltered', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	/** A run with three records: two bore attempts (22 mm H7 = 22.000–22.021 mm, ISO 286-2) and a finding. */
	async function runWithRecords() {
		const made = await makeRun(orm.em.fork());
		const batch = submitBatchSchema.parse({
			records: [
				record(made.runId, made.tech, 'attempt', boreAttempt('22.010')),
				record(made.runId, made.tech, 'attempt', boreAttempt('22.012')),
				record(made.runId, made.tech, 'finding', { stepIndex: 0, text: 'Light scoring in bore 1.' })
			],
			pins: { [made.tech.id]: PIN }
		});
		const r = await submitRecords(orm.em.fork(), viewer(made.tech), made.runId, batch);
		if (!r.ok) throw new Error(r.message);
		expect(r.value.answers.map((a) => a.status)).toEqual(['accepted', 'accepted', 'accepted']);
		return made;
	}
	const stored = async (runId: string) => (await ledger.listForRun(orm.em.fork(), runId)).map(ledger.toStored);

	it('an untouched run verifies intact with its head and count', async () => {
		const { runId } = await runWithRecords();
		const rows = await stored(runId);
		expect(await verifyRun(orm.em.fork(), runId)).toEqual({
			runId,
			ok: true,
			head: rows[2].hash,
			count: 3,
			anchors: 0
		});
	});

	it('a reading changed in the stored text by a superuser → hash_mismatch at exactly that record', async () => {
		const { runId } = await runWithRecords();
		const before = await stored(runId);
		// The body column is generated from the canonical text, so the change shows in both.
		await asSuperuser(
			`update ledger_record set canonical = replace(canonical, '"readings":["22.012"]', '"readings":["22.019"]') where id = $1`,
			[before[1].id]
		);
		const after = await stored(runId);
		expect((after[1].body as { entries: { entry: { readings: string[] } }[] }).entries[0].entry.readings).toEqual([
			'22.019'
		]);
		const v = await verifyRun(orm.em.fork(), runId);
		expect(v).toMatchObject({ ok: false, position: 2, recordId: before[1].id, reason: 'hash_mismatch' });
		expect(v!.ok ? '' : v!.message).toMatch(/^Record 2 \(attempt, id .+\) was changed after it was stored/);

		const all = await verifyAll(orm.em.fork());
		expect(all.failures.map((f) => f.runId)).toContain(runId);
		expect(all.intact + all.failed).toBe(all.runs);
	});

	it('an alter-and-rehash passes verifyChain but is caught by an anchor recorded earlier', async () => {
		const { runId } = await runWithRecords();
		const anchored = await recordAnchor(orm.em.fork(), runId, 'daily_digest', new Date('2026-12-01T06:00:00Z'));
		expect(anchored).toMatchObject({ ok: true, value: { count: 3 } });

		// Forge record 2's reading and recompute its hash and every later link and hash, as a superuser could.
		const forged: StoredRecord[] = (await stored(runId)).map((r) => ({ ...r }));
		(forged[1].body as { entries: { entry: { readings: string[] } }[] }).entries[0].entry.readings = ['22.019'];
		for (let i = 1; i < forged.length; i++) {
			forged[i].prevHash = forged[i - 1].hash;
			forged[i].hash = recordHash(forged[i]);
		}
		await withClient(superuser(), async (c) => {
			await c.query('begin');
			await c.query('alter table ledger_record disable trigger user');
			// Later rows first would collide on the unique (run, prev_hash); a deferred swap is not needed when the
			// new hashes are all new values, so update in chain order.
			for (const r of forged.slice(1))
				await c.query('update ledger_record set canonical = $2, prev_hash = $3, hash = $4 where id = $1', [
					r.id,
					canonicalRecord(r),
					r.prevHash,
					r.hash
				]);
			await c.query('update run set head_hash = $2 where id = $1', [runId, forged.at(-1)!.hash]);
			await c.query('alter table ledger_record enable trigger user');
			await c.query('commit');
		});

		const rows = await stored(runId);
		expect(verifyChain(rows)).toMatchObject({ ok: true, count: 3 });
		const v = await verifyRun(orm.em.fork(), runId);
		expect(v).toMatchObject({ ok: false, position: 3, reason: 'anchor_mismatch', anchors: 1 });
		expect(v!.ok ? '' : v!.message).toMatch(/the daily digest of 2026-12-01 06:00 UTC.*alter-and-rehash/);
	});

	it('a record deleted from the end after an anchor → anchor_missing_records', async () => {
		const { runId } = await runWithRecords();
		await recordAnchor(orm.em.fork(), runId, 'release_pdf');
		const rows = await stored(runId);
		await asSuperuser('delete from ledger_record where id = $1', [rows[2].id]);
		expect(await verifyRun(orm.em.fork(), runId)).toMatchObject({ ok: false, reason: 'anchor_missing_records' });
	});

	it('refuses to anchor a chain that does not verify, and answers null for an unknown run', async () => {
		const { runId } = await runWithRecords();
		const rows = await stored(runId);
		await asSuperuser(`update ledger_record set kind = 'signoff' where id = $1`, [rows[0].id]);
		expect(await recordAnchor(orm.em.fork(), runId, 'manual')).toMatchObject({ ok: false, status: 409 });
		expect(await verifyRun(orm.em.fork(), crypto.randomUUID())).toBeNull();
	});

	it('anchors are append-only: the app role may not change or delete one, nor may the owner', async () => {
		const { runId } = await runWithRecords();
		await recordAnchor(orm.em.fork(), runId, 'manual');
		for (const url of [urls.appUrl, urls.ownerUrl]) {
			await withClient(url, async (c) => {
				await expect(c.query(`update ledger_anchor set count = 1 where run_id = $1`, [runId])).rejects.toThrow();
				await expect(c.query(`delete from ledger_anchor where run_id = $1`, [runId])).rejects.toThrow();
				await expect(c.query(`truncate ledger_anchor`)).rejects.toThrow();
			});
		}
		const [row] = await withClient(urls.ownerUrl, (c) =>
			c.query<{ n: string }>('select count(*) as n from ledger_anchor where run_id = $1', [runId])
		).then((r) => r.rows);
		expect(row.n).toBe('1');
	});

	it('verify all, reading the ledger in heap order, answers for every run exactly as verifyRun does', async () => {
		// An intact run whose first record now lies after the others in the heap (rewritten in place, unchanged), an
		// anchored intact run, and an alter-and-rehash caught only by its anchor — beside the tampered runs above.
		const moved = await runWithRecords();
		const first = (await stored(moved.runId))[0];
		await asSuperuser('update ledger_record set canonical = canonical where id = $1', [first.id]);
		const heapOrder = await withClient(superuser(), (c) =>
			c.query<{ seq: number }>('select seq from ledger_record where run_id = $1 order by ctid', [moved.runId])
		);
		expect(heapOrder.rows.map((r) => r.seq)).not.toEqual([1, 2, 3]);
		const anchored = await runWithRecords();
		await recordAnchor(orm.em.fork(), anchored.runId, 'daily_digest');
		const rehashed = await runWithRecords();
		await recordAnchor(orm.em.fork(), rehashed.runId, 'manual');
		const forged = (await stored(rehashed.runId)).map((r) => ({ ...r }));
		forged[2].body = { stepIndex: 0, text: 'No scoring.' };
		forged[2].hash = recordHash(forged[2]);
		await asSuperuser('update ledger_record set canonical = $2, hash = $3 where id = $1', [
			forged[2].id,
			canonicalRecord(forged[2]),
			forged[2].hash
		]);

		// A kind column that is not the kind in the hashed text, though a misreading of its UTF-8 as latin1 would be.
		const misread = await runWithRecords();
		const last = { ...(await stored(misread.runId))[2], kind: 'findingÃ©' as StoredRecord['kind'] };
		last.hash = recordHash(last);
		await asSuperuser('update ledger_record set kind = $2, canonical = $3, hash = $4 where id = $1', [
			last.id,
			'findingé',
			canonicalRecord(last),
			last.hash
		]);

		// An anchor no chain can match, written straight into the table: reported for its run, verify goes on.
		const badAnchor = await runWithRecords();
		await withClient(superuser(), (c) =>
			c.query(
				`insert into ledger_anchor (id, run_id, head, count, recorded_at, recorded_in) values ($1, $2, $3, 0, now(), 'manual')`,
				[crypto.randomUUID(), badAnchor.runId, 'f'.repeat(64)]
			)
		);

		const all = await verifyAll(orm.em.fork());
		const ids = await withClient(urls.ownerUrl, (c) =>
			c.query<{ id: string }>('select id from run order by created_at')
		);
		const one = await Promise.all(ids.rows.map((r) => verifyRun(orm.em.fork(), r.id)));
		expect(all.failures).toEqual(one.filter((v) => v && !v.ok));
		expect([all.runs, all.intact]).toEqual([one.length, one.filter((v) => v?.ok).length]);
		const counted = await withClient(urls.ownerUrl, (c) =>
			c.query<{ n: string }>('select count(*) as n from ledger_record')
		);
		expect(all.records).toBe(Number(counted.rows[0].n));
		expect(one.find((v) => v?.runId === moved.runId)).toMatchObject({ ok: true, count: 3 });
		expect(one.find((v) => v?.runId === anchored.runId)).toMatchObject({ ok: true, anchors: 1 });
		expect(all.failures.find((f) => f.runId === rehashed.runId)).toMatchObject({
			reason: 'anchor_mismatch',
			position: 3
		});
		expect(all.failures.find((f) => f.runId === misread.runId)).toMatchObject({ reason: 'hash_mismatch', position: 3 });
		// The API names each failing run's unit by its job number.
		const jobs = await jobNumbersOf(orm.em.fork(), [misread.runId, crypto.randomUUID()]);
		const [job] = await withClient(urls.ownerUrl, (c) =>
			c.query<{ job_number: string }>('select job_number from job where id = $1', [misread.jobId])
		).then((r) => r.rows);
		expect(jobs).toEqual({ [misread.runId]: job.job_number });
		expect(all.failures.find((f) => f.runId === badAnchor.runId)).toMatchObject({
			reason: 'anchor_invalid',
			recordId: null
		});
	});

	it('the quality home lists the run with its records and the open finding; the run record shows the reading', async () => {
		const { runId, tech } = await runWithRecords();
		const queue = await reviewQueue(orm.em.fork());
		const mine = queue.find((r) => r.id === runId);
		expect(mine).toMatchObject({ technician: tech.name, records: 3, state: 'in_progress', version: 1 });
		expect(mine!.lastRecordAt).not.toBeNull();
		const findings = (await openFindings(orm.em.fork())).filter((f) => f.runId === runId);
		expect(findings).toMatchObject([{ text: 'Light scoring in bore 1.', raisedBy: tech.name, step: 1 }]);

		const view = (await runRecord(orm.em.fork(), runId))!;
		expect(view.records.map((r) => [r.seq, r.kind, r.signer])).toEqual([
			[1, 'attempt', tech.name],
			[2, 'attempt', tech.name],
			[3, 'finding', tech.name]
		]);
		// 22.010 mm inside 22 mm H7 = 22.000–22.021 mm (ISO 286-2).
		const entry = view.records[0].entries[0];
		expect(entry).toMatchObject({ checkpointId: 'bore-1', status: 'pass' });
		expect(entry.entered).toEqual(['22.010']);
		expect(entry.readings[0]).toMatchObject({ value: '22.01 mm', limits: '22 to 22.021 mm', status: 'pass' });
	});
});
