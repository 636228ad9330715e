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
 *   (goal ≥ 0.5).
 * Each latency is the median of several calls on random ids.
 */
import { hash } from 'node:crypto';
import { createRequire } from 'node:module';
import { LEDGER_HASH_DOMAIN } from '../../src/lib/ledger/record';
import { LedgerRecord } from '../../src/lib/server/db/entities';
import { verifyChain } from '../../src/lib/ledger/chain';
import { sha256Hex, storedTextHash } from '../../src/lib/server/ledger-hash';
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
	let chainMs = 0; // verifyChain alone (records already in memory), to show where verify all's time goes
	const domain = Buffer.from(LEDGER_HASH_DOMAIN, 'utf8');
	await ledgerRead.eachTextChain(orm.em.fork(), (chain) => {
		const c0 = performance.now();
		if (!verifyChain(chain.records, storedTextHash).ok) throw new Error(`run ${chain.runId} does not verify`);
		chainMs += performance.now() - c0;
		for (const r of chain.records) preimages.push(Buffer.concat([domain, r.canonical as Buffer]));
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
	const chainRate = hashed / (chainMs / 1000);
	console.log(
		`  of which verifyChain in memory (envelope check + node:crypto sha256 of the stored text + link checks): ${chainRate.toFixed(0)} ` +
			`records/s → ratio ${(chainRate / shaRate).toFixed(3)} (timed on a second read of the same rows)`
	);
}
