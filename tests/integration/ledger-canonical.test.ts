/**
 * The ledger keeps each record's canonical text and generates `body` from it (migration 20261203080000). On a
 * database of its own: the migration's backfill of records stored before it, its way back down, and what verify does
 * when someone with direct access makes `body` an ordinary column again.
 */
import { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { ormOptions } from '../../mikro-orm.config';
import { withClient } from '../../scripts/lib/postgres';
import { verifyChain } from '../../src/lib/ledger/chain';
import type { JsonValue } from '../../src/lib/ledger/jcs';
import { canonicalRecord, type LedgerRecord } from '../../src/lib/ledger/record';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import { CopyBinaryReader, CopyFormatError } from '../../src/lib/server/db/copy-binary';
import type { IUser } from '../../src/lib/server/db/entities';
import { serverRecordHash, storedTextHash } from '../../src/lib/server/ledger-hash';
import * as ledgerRead from '../../src/lib/server/repositories/ledger-read';
import { verifyAll, verifyRun } from '../../src/lib/server/services/audit.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { boreAttempt, makeRun, PIN, record } from '../factories/runs';
import { testDbUrls } from './db-urls';
import { migrateDb } from './support/migrate';
import { scratchDatabase } from './support/scratch-db';

const db = scratchDatabase('benchstamp_canon');
const BEFORE = 'Migration20261202125700_run_summary_trigger';
const CANONICAL = 'Migration20261203080000_ledger_canonical_text';

function superuserOnScratch(): string {
	const su = testDbUrls().superuserUrl;
	if (!su) throw new Error('this test needs TEST_SUPERUSER_DATABASE_URL');
	const u = new URL(su);
	u.pathname = new URL(db.ownerUrl).pathname;
	return u.toString();
}

/** Records as they were stored before the migration, in one run whose foreign keys are not checked (replica role). */
function oldRecords(
	bodies: JsonValue[] = [
		{ stepIndex: 0, text: 'Quotes " and \\ backslash, “typographic”, ü, 𝄞 and a tab\t.' },
		{ stepIndex: 1, entries: [{ checkpointId: 'bore-1', entry: { readings: ['22.010'] } }], n: 12.5, none: null },
		{ stepIndex: 2, list: [], deep: { b: 1, a: [true, false] } }
	]
): (LedgerRecord & { hash: string })[] {
	const runId = uuidv7();
	const out: (LedgerRecord & { hash: string })[] = [];
	for (const [i, body] of bodies.entries()) {
		const r: LedgerRecord = {
			id: uuidv7(),
			runId,
			seq: i + 1,
			kind: 'finding',
			body,
			prevHash: out[i - 1]?.hash ?? null
		};
		out.push({ ...r, hash: serverRecordHash(r) });
	}
	return out;
}

describe('ledger canonical text', () => {
	const old = oldRecords();
	// More than one page of the migration's backfill (2,000 rows a page).
	const many = oldRecords(Array.from({ length: 2_345 }, (_, i) => ({ stepIndex: i % 7, text: `Note ${i}.` })));

	beforeAll(async () => {
		await db.create();
		await migrateDb(db.ownerUrl, db.appUrl, [`--to=${BEFORE}`]);
		await withClient(superuserOnScratch(), async (c) => {
			await c.query(`set session_replication_role = replica`);
			for (const r of [...old, ...many])
				await c.query(
					`insert into ledger_record (id, run_id, seq, kind, body, prev_hash, hash, submission_hash, signer_role, server_time, engine_version)
					values ($1, $2, $3, $4, $5, $6, $7, $7, 'technician', now(), 'old')`,
					[r.id, r.runId, r.seq, r.kind, JSON.stringify(r.body), r.prevHash, r.hash]
				);
		});
	});
	afterAll(() => db.drop());

	const rowsOf = (runId: string) =>
		withClient(db.ownerUrl, (c) =>
			c.query<{ id: string; canonical: string; body: unknown }>(
				`select id, canonical, body from ledger_record where run_id = $1 order by seq`,
				[runId]
			)
		).then((r) => r.rows);

	it('the migration writes each stored record its canonical text, hashing to its stored hash', async () => {
		expect(await migrateDb(db.ownerUrl, db.appUrl, [`--to=${CANONICAL}`])).toEqual([CANONICAL]);
		const rows = await rowsOf(old[0].runId);
		expect(rows.map((r) => r.canonical)).toEqual(old.map((r) => canonicalRecord(r)));
		expect(rows.map((r) => r.body)).toEqual(old.map((r) => r.body));
		expect((await rowsOf(many[0].runId)).map((r) => r.canonical)).toEqual(many.map((r) => canonicalRecord(r)));
		const orm = await MikroORM.init(ormOptions(db.ownerUrl));
		try {
			expect(await ledgerRead.hashSource(orm.em.fork())).toBe('text');
			const chain = await ledgerRead.textChainOf(orm.em.fork(), old[0].runId);
			expect(chain.map(storedTextHash)).toEqual(old.map((r) => r.hash));
			expect(verifyChain(chain, storedTextHash)).toMatchObject({ ok: true, count: 3 });
		} finally {
			await orm.close(true);
		}
	});

	it('the records stay append-only after it, canonical text and body alike', async () => {
		await withClient(db.appUrl, async (c) => {
			await expect(
				c.query(`update ledger_record set canonical = '{"body":{}}' where id = $1`, [old[0].id])
			).rejects.toThrow();
		});
		await withClient(db.ownerUrl, async (c) => {
			await expect(
				c.query(`update ledger_record set canonical = '{"body":{}}' where id = $1`, [old[0].id])
			).rejects.toThrow(/append-only|may not/i);
			await expect(c.query(`update ledger_record set body = '{}' where id = $1`, [old[0].id])).rejects.toThrow(
				/can only be updated to DEFAULT/
			);
		});
	});

	it('down gives the body back as an ordinary column with the same values, and up again the same text', async () => {
		expect(await migrateDb(db.ownerUrl, db.appUrl, ['--down'])).toEqual([CANONICAL]);
		const down = await withClient(db.ownerUrl, (c) =>
			c.query<{ body: unknown; generated: string }>(
				`select body, (select attgenerated from pg_attribute where attrelid = 'ledger_record'::regclass and attname = 'body') as generated
				from ledger_record where run_id = $1 order by seq`,
				[old[0].runId]
			)
		).then((r) => r.rows);
		expect(down.map((r) => r.body)).toEqual(old.map((r) => r.body));
		expect(down[0].generated).toBe('');
		expect(await migrateDb(db.ownerUrl, db.appUrl)).toEqual([CANONICAL]);
		expect((await rowsOf(old[0].runId)).map((r) => r.canonical)).toEqual(old.map((r) => canonicalRecord(r)));
	});

	it('a COPY that stops part-way closes its connection instead of handing it back to the pool mid-COPY', async () => {
		const orm = await MikroORM.init(ormOptions(db.appUrl));
		const each = vi.spyOn(CopyBinaryReader.prototype, 'each').mockImplementationOnce(() => {
			throw new CopyFormatError('bytes that are not binary COPY (test)');
		});
		try {
			await expect(verifyAll(orm.em.fork())).rejects.toThrow(/not binary COPY \(test\)/);
			const copying = () =>
				withClient(superuserOnScratch(), (c) =>
					c.query<{ n: string }>(
						`select count(*) as n from pg_stat_activity where datname = current_database() and query like 'copy (select "run_id"%'`
					)
				).then((r) => Number(r.rows[0].n));
			for (let i = 0; i < 50 && (await copying()) > 0; i++) await new Promise((r) => setTimeout(r, 100));
			expect(await copying()).toBe(0);
			// And the pool still serves a whole verify.
			expect((await verifyAll(orm.em.fork())).failed).toBe(0);
		} finally {
			each.mockRestore();
			await orm.close(true);
		}
	});

	it('a body no longer generated from the text (changed by hand) makes verify hash the bodies, and find the edit', async () => {
		process.env.BENCHSTAMP_MODE ??= 'demo';
		process.env.AUTH_SECRET ??= 'integration-test-secret-0123456789abcdef';
		const orm = await MikroORM.init(ormOptions(db.appUrl));
		try {
			const made = await makeRun(orm.em.fork());
			const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });
			const batch = submitBatchSchema.parse({
				records: [
					record(made.runId, made.tech, 'attempt', boreAttempt('22.010')),
					record(made.runId, made.tech, 'attempt', boreAttempt('22.012'))
				],
				pins: { [made.tech.id]: PIN }
			});
			const r = await submitRecords(orm.em.fork(), viewer(made.tech), made.runId, batch);
			if (!r.ok) throw new Error(r.message);
			expect(await verifyRun(orm.em.fork(), made.runId)).toMatchObject({ ok: true, count: 2 });

			await withClient(superuserOnScratch(), async (c) => {
				await c.query(`alter table ledger_record alter column body drop expression`);
			});
			// Still intact while nothing else changed: the bodies re-encode to the same hashes.
			expect(await ledgerRead.hashSource(orm.em.fork())).toBe('body');
			expect(await verifyRun(orm.em.fork(), made.runId)).toMatchObject({ ok: true, count: 2 });

			// Now the reading shown (body) is changed while the stored text is left as it was.
			const [second] = (await rowsOf(made.runId)).slice(1);
			await withClient(superuserOnScratch(), async (c) => {
				await c.query('begin');
				await c.query('alter table ledger_record disable trigger user');
				await c.query(
					`update ledger_record set body = jsonb_set(body, '{entries,0,entry,readings,0}', '"22.019"') where id = $1`,
					[second.id]
				);
				await c.query('alter table ledger_record enable trigger user');
				await c.query('commit');
			});
			expect(await verifyRun(orm.em.fork(), made.runId)).toMatchObject({
				ok: false,
				position: 2,
				recordId: second.id,
				reason: 'hash_mismatch'
			});
			const all = await verifyAll(orm.em.fork());
			expect(all.failures.map((f) => [f.runId, f.recordId])).toEqual([[made.runId, second.id]]);
		} finally {
			await orm.close(true);
		}
	});
});
