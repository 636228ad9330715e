/**
 * The audit bench (issue 8), every figure from this one run on the bench cluster (`bench-db.ts`), with
 * `BENCH_LEDGER` (default 1,000,000) generated ledger records (`audit-data.ts`: valid chains, bulk-loaded):
 * - search by signer and a week's dates — `searchRuns`, what `GET /api/audit/runs` calls, first page and its total —
 *   as a ratio to a primary-key SELECT of one ledger_record through the same layer (the entity manager's connection,
 *   raw SQL) (goal ≤ 5×), once the pool is warm (its named statement past PostgreSQL's five custom plans on every
 *   connection), the cold pool's figure printed beside it;
 * - the run-record load — `runRecord`, what `/quality/runs/[id]` loads — as a ratio to a primary-key `findOne` of a
 *   ledger_record entity on a fresh entity manager (its layer) (goal ≤ 5×); a raw `pg` primary-key SELECT is printed
 *   beside them, labelled;
 * - verify throughput — `verifyAll` over every chain, records/s — against node:crypto sha256 of the same canonical
 *   bytes (domain prefix + the stored RFC 8785 text, read through the same COPY), already in memory, records/s
 *   (goal ≥ 0.5); beside it the floors under any verify that reads through PostgreSQL — a bare loop that reads each
 *   stored text and hash and compares the one's sha256 with the other, nothing else — over verify's own COPY, the
 *   same COPY in `(run_id, seq)` order, and the cheapest read (heap order, two columns).
 * Each latency is the median of several calls on random ids.
 */
import { hash } from 'node:crypto';
import { createRequire } from 'node:module';
import type { EntityManager } from '@mikro-orm/postgresql';
import { to as copyTo } from 'pg-copy-streams';
import { LEDGER_HASH_DOMAIN } from '../../src/lib/ledger/record';
import { CopyBinaryReader } from '../../src/lib/server/db/copy-binary';
import { LedgerRecord } from '../../src/lib/server/db/entities';
import { withPooledClient } from '../../src/lib/server/db/pooled-client';
import { sha256Hex } from '../../src/lib/server/ledger-hash';
import { runRecord, verifyAll } from '../../src/lib/server/services/audit.service';
import { runSearchSchema, searchRuns } from '../../src/lib/server/services/search.service';
import * as ledgerRead from '../../src/lib/server/repositories/ledger-read';
import type { medianMs as Median } from './run';
import { HISTORY_DAYS, HISTORY_END, loadLedger } from './audit-data';
import { POOL, benchDb } from './bench-db';

export const title = 'audit bench: search, run record and verify at scale';

const LATENCY_GOAL = 5;
const VERIFY_GOAL = 0.5;
const RUNS = 15;

interface PgPool {
	query(text: string, values?: unknown[]): Promise<{ rows: unknown[] }>;
	end(): Promise<void>;
}
const { Pool } = createRequire(import.meta.url)('pg') as {
	Pool: new (config: { connectionString: string; max: number }) => PgPool;
};

const pick = <T>(list: T[], i: number) => list[(i * 7919) % list.length];
const met = (ok: boolean) => (ok ? 'met' : 'NOT met');
const ms = (x: number) => `${x.toFixed(2)} ms`;

export async function main(medianMs: typeof Median) {
	const total = Number(process.env.BENCH_LEDGER ?? 1_000_000);
	const db = await benchDb();
	const data = await loadLedger(db.orm, db.ownerUrl, total);
	console.log(
		`ledger: ${data.total.toLocaleString('en')} records in ${data.runIds.length.toLocaleString('en')} runs loaded ` +
			`in ${(data.loadMs / 1000).toFixed(1)} s (generate + hash ${(data.genMs / 1000).toFixed(1)} s, INSERT … unnest ` +
			`overlapping), audit indexes + ANALYZE ` +
			`${(data.indexMs / 1000).toFixed(1)} s`
	);
	const { orm } = db;
	const [size] = await orm.em.getConnection().execute<{ text: string; body: string; table: string }[]>(
		`select round(avg(pg_column_size(canonical))) as text, round(avg(pg_column_size(body))) as body,
			pg_size_pretty(pg_total_relation_size('ledger_record')) as table from ledger_record`
	);
	console.log(
		`stored per record: canonical text ${size.text} B, generated jsonb body ${size.body} B (pg_column_size, ` +
			`average); ledger_record with its indexes ${size.table}`
	);
	let i = 0;
	const nextRecord = () => pick(data.recordIds, ++i);

	// The references: one ledger_record by primary key, through each layer.
	const pkRaw = await medianMs(
		() => orm.em.getConnection().execute(`select * from ledger_record where id = ?`, [nextRecord()]),
		RUNS
	);
	const pkEntity = await medianMs(() => orm.em.fork().findOne(LedgerRecord, { id: nextRecord() }), RUNS);
	const pool = new Pool({ connectionString: db.appUrl, max: 1 });
	const pkPg = await medianMs(() => pool.query(`select * from ledger_record where id = $1`, [nextRecord()]), RUNS);
	await pool.end();

	// Search: a signer and seven days, at a random point of the history.
	let totals = 0;
	const week = (k: number) => {
		const from = HISTORY_END - Math.floor(((k * 37) % (HISTORY_DAYS - 8)) + 1) * 86_400_000;
		const day = (t: number) => new Date(t).toISOString().slice(0, 10);
		return { from: day(from - 6 * 86_400_000), to: day(from) };
	};
	let calls = 0;
	const searchOnce = async () => {
		const k = ++i;
		const q = runSearchSchema.parse({ signer: pick(data.signers, k).id, ...week(k) });
		totals += (await searchRuns(orm.em.fork(), q)).total;
		calls++;
	};
	// Cold: the first calls of a fresh pool, each connection still planning the named statement every time.
	const searchCold = await medianMs(searchOnce, RUNS);
	// Warm: PostgreSQL keeps a generic plan for a prepared statement after five custom ones, per connection — what a
	// server that has been up a while runs. Enough calls for every pooled connection to get there.
	for (let w = 0; w < 6 * POOL; w++) await searchOnce();
	const search = await medianMs(searchOnce, RUNS);
	console.log(
		`search by signer + 7 days (first page of 25 and its total; ${Math.round(totals / calls)} runs match ` +
			`on average): ${ms(search)} vs PK SELECT through the same connection ${ms(pkRaw)} → ` +
			`${(search / pkRaw).toFixed(2)}× (goal ≤ ${LATENCY_GOAL}×: ${met(search / pkRaw <= LATENCY_GOAL)}); ` +
			`cold pool (first ${RUNS} calls) ${ms(searchCold)} → ${(searchCold / pkRaw).toFixed(2)}×`
	);

	const record = await medianMs(async () => {
		const r = await runRecord(orm.em.fork(), pick(data.runIds, ++i));
		if (!r || r.records.length < 40) throw new Error('the run record is incomplete');
	}, RUNS);
	console.log(
		`run record (${'runRecord'}, 40–60 records): ${ms(record)} vs PK findOne of a ledger_record entity ` +
			`${ms(pkEntity)} → ${(record / pkEntity).toFixed(2)}× (goal ≤ ${LATENCY_GOAL}×: ` +
			`${met(record / pkEntity <= LATENCY_GOAL)}); raw pg PK SELECT ${ms(pkPg)} (run record ÷ that: ` +
			`${(record / pkPg).toFixed(2)}×, for reference)`
	);

	// Verify all, against native sha256 over the same canonical bytes (pre-computed in memory, read in the same
	// order through the same reader, so both sides hash exactly the same preimages).
	const t0 = performance.now();
	const all = await verifyAll(orm.em.fork());
	const verifyS = (performance.now() - t0) / 1000;
	const [{ n }] = await orm.em.getConnection().execute<{ n: string }[]>(`select count(*) as n from ledger_record`);
	if (all.failed || all.records !== Number(n))
		throw new Error(`verify all: ${all.failed} failed, ${all.records} records (${n} stored)`);
	// Preimages are collected a page at a time (1M of them would not fit in memory at once); only hashing is timed.
	let hashed = 0;
	let shaMs = 0;
	let x = 0;
	let preimages: Buffer[] = [];
	for (let k = 0; k < 20_000; k++) x ^= sha256Hex(`warm-up ${k}`).charCodeAt(0); // untimed: a cold start is 10× slower
	const hashAll = () => {
		const t1 = performance.now();
		for (const p of preimages) x ^= hash('sha256', p, 'hex').charCodeAt(0);
		shaMs += performance.now() - t1;
		hashed += preimages.length;
		preimages = [];
	};
	const domain = Buffer.from(LEDGER_HASH_DOMAIN, 'utf8');
	await ledgerRead.eachTextRecord(orm.em.fork(), (r) => {
		preimages.push(Buffer.concat([domain, r.canonical as Buffer]));
		if (preimages.length >= 20_000) hashAll();
	});
	hashAll();
	if (x < 0) throw new Error('unreachable');
	const shaS = shaMs / 1000;
	const verifyRate = all.records / verifyS;
	const shaRate = hashed / shaS;
	console.log(
		`verify all: ${all.records.toLocaleString('en')} records in ${all.runs.toLocaleString('en')} chains in ` +
			`${verifyS.toFixed(1)} s = ${verifyRate.toFixed(0)} records/s, all intact; node:crypto sha256 of the same ` +
			`canonical bytes ${shaRate.toFixed(0)} records/s → ratio ${(verifyRate / shaRate).toFixed(3)} ` +
			`(goal ≥ ${VERIFY_GOAL}: ${met(verifyRate / shaRate >= VERIFY_GOAL)})`
	);
	// The floor under any verify that reads through PostgreSQL: a loop that only reads each stored text and its hash
	// and compares sha256 of the one with the other, timed end to end — nothing of verify's own checks. Once over
	// verify's own COPY (same statement, same order), once over the cheapest read there is (heap order, two columns).
	const ordered = ledgerRead.TEXT_COPY.replace(
		'from "ledger_record")',
		'from "ledger_record" order by "run_id", "seq")'
	);
	if (ordered === ledgerRead.TEXT_COPY) throw new Error("the ordered floor's COPY is verify's own: edit the bench");
	const floors = [
		{ label: "verify's COPY (heap order, all chain columns)", sql: ledgerRead.TEXT_COPY, hashAt: 5, textAt: 6 },
		{
			label: 'the same COPY in (run_id, seq) order, as verify read it before',
			sql: ordered,
			hashAt: 5,
			textAt: 6
		},
		{
			label: 'heap order, hash and text only',
			sql: `copy (select "hash", "canonical" from "ledger_record") to stdout (format binary)`,
			hashAt: 0,
			textAt: 1
		}
	];
	for (const floor of floors) {
		const t1 = performance.now();
		const read = await readAndHash(orm.em.fork(), floor.sql, floor.hashAt, floor.textAt);
		const rate = read / ((performance.now() - t1) / 1000);
		console.log(
			`  floor — read + sha256 + compare, nothing else, over ${floor.label}: ${rate.toFixed(0)} records/s → ` +
				`${(rate / shaRate).toFixed(3)} of in-memory sha256; verify all ÷ this floor ${(verifyRate / rate).toFixed(3)}`
		);
	}
}

/** Reads `sql` (a binary COPY) and checks sha256 of the text field against the hash field, row by row; the row count. */
async function readAndHash(em: EntityManager, sql: string, hashAt: number, textAt: number): Promise<number> {
	return withPooledClient(em, async (client) => {
		const stream = client.query(copyTo(sql));
		const reader = new CopyBinaryReader();
		const domain = Buffer.from(LEDGER_HASH_DOMAIN, 'utf8');
		let preimage = Buffer.alloc(64 * 1024);
		domain.copy(preimage);
		let rows = 0;
		for await (const chunk of stream as AsyncIterable<Buffer>) {
			reader.each(chunk, (buf, f) => {
				const start = f[2 * textAt];
				const length = f[2 * textAt + 1];
				if (domain.length + length > preimage.length) {
					preimage = Buffer.alloc(2 * (domain.length + length));
					domain.copy(preimage);
				}
				buf.copy(preimage, domain.length, start, start + length);
				const digest = hash('sha256', preimage.subarray(0, domain.length + length), 'hex');
				const stored = buf.toString('latin1', f[2 * hashAt], f[2 * hashAt] + f[2 * hashAt + 1]);
				if (digest !== stored) throw new Error(`floor: row ${rows + 1} does not verify`);
				rows++;
			});
		}
		reader.finish();
		return rows;
	});
}
