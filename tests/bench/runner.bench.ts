/**
 * The bench runner's numbers (issue 6), each a ratio measured in this one run:
 * - the JavaScript a `/runs/[id]` page loads, gzipped, against the smallest page of the same build (goal ≤ 120 KB);
 * - records per second through `submitRecords` against one plain `INSERT` per row of the same rows into
 *   `ledger_record` (its foreign keys and summary trigger are part of writing a record), each in its own
 *   transaction, through the `pg` driver with the same pool size (goal ≥ 0.3); the same INSERTs into a bare copy of
 *   the table (no foreign keys, no trigger) printed beside it. The signer's PIN hash uses cheap argon2 parameters
 *   here so the deliberately slow KDF stays out of that ratio;
 * - PIN verifications per second with the configured argon2id parameters (src/lib/server/passwords.ts), on its own.
 * Builds the app for the first (or measures `BENCHSTAMP_KIT_DIR`) and PostgreSQL for the others (a
 * throwaway cluster in a temp directory, stopped and deleted at the end). `BENCH_RECORDS` (default 10000).
 */
import { hash } from '@node-rs/argon2';
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { readdir, readFile } from 'node:fs/promises';
import { join, relative } from 'node:path';
import { gzipSync } from 'node:zlib';
import { createRequire } from 'node:module';
import { connectClient, type PgQueryResult } from '../../scripts/lib/postgres';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import { User } from '../../src/lib/server/db/entities';
import { hashSecret, verifySecret } from '../../src/lib/server/passwords';
import { startRun } from '../../src/lib/server/services/runs.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { boreAttempt, makeRun, PIN } from '../factories/runs';
import { benchDb, POOL, type BenchDb } from './bench-db';

export const title = 'bench runner: page JavaScript, submit throughput, PIN verifications';

const ROOT = join(import.meta.dirname, '..', '..');
const JS_GOAL_KB = 120;
const THROUGHPUT_GOAL = 0.3;
const BATCH = 200;

/** The `pg` pool, typed as little as this bench uses (no @types/pg in the project). */
interface PgPool {
	query(text: string, values?: unknown[]): Promise<PgQueryResult<unknown>>;
	end(): Promise<void>;
}
const { Pool } = createRequire(import.meta.url)('pg') as {
	Pool: new (config: { connectionString: string; max: number }) => PgPool;
};

interface ManifestChunk {
	file: string;
	imports?: string[];
	isEntry?: boolean;
}

/** Gzipped bytes of the JS a page of `leaf` loads: the client entry, the app, the root layout and the leaf node. */
async function pageJs(kitDir: string) {
	const client = join(kitDir, 'output', 'client');
	const manifest = JSON.parse(await readFile(join(client, '.vite', 'manifest.json'), 'utf8')) as Record<
		string,
		ManifestChunk
	>;
	const nodesDir = join(kitDir, 'generated', 'client-optimized', 'nodes');
	const key = (file: string) => relative(ROOT, file);
	const leaves = new Map<string, string>();
	for (const f of await readdir(nodesDir)) {
		const text = await readFile(join(nodesDir, f), 'utf8');
		const m = text.match(/src\/routes(\/[^"']*)\/\+page\.svelte/);
		if (m) leaves.set(m[1] || '/', key(join(nodesDir, f)));
	}
	const entries = Object.entries(manifest)
		.filter(([, c]) => c.isEntry)
		.map(([k]) => k);
	const start = entries.filter((k) => /entry\/start|client-optimized\/app\.js/.test(k));
	const layout = key(join(nodesDir, '0.js'));
	const sizes = new Map<string, number>();
	async function gz(file: string) {
		if (!sizes.has(file)) sizes.set(file, gzipSync(await readFile(join(client, file))).length);
		return sizes.get(file)!;
	}
	async function total(leaf: string) {
		const seen = new Set<string>();
		const walk = (k: string) => {
			const c = manifest[k];
			if (!c || seen.has(c.file)) return;
			seen.add(c.file);
			for (const i of c.imports ?? []) walk(i);
		};
		for (const k of [...start, layout, leaf]) walk(k);
		let bytes = 0;
		for (const f of seen) if (f.endsWith('.js')) bytes += await gz(f);
		return bytes;
	}
	const runner = leaves.get('/runs/[id]');
	if (!runner) throw new Error('the build has no /runs/[id] page node');
	let bare = { route: '', bytes: Infinity };
	for (const [route, leaf] of leaves) {
		const bytes = await total(leaf);
		if (bytes < bare.bytes) bare = { route, bytes };
	}
	return { runner: await total(runner), bare };
}

/**
 * Records per second through `submitRecords` (4 runs at once, batches of 200) and plain INSERTs of the same rows.
 * `onPhase` is called as each timed phase starts (the profiling script hooks it).
 */
export async function submitThroughput(
	{ orm, appUrl, ownerUrl }: BenchDb,
	records: number,
	onPhase?: (phase: 'submit' | 'insert') => Promise<void>
) {
	const em = orm.em.fork();
	const base = await makeRun(em);
	// Cheap argon2 parameters for this signer only: the KDF is measured on its own below.
	await em.nativeUpdate(
		User,
		{ id: base.tech.id },
		{ pinHash: await hash(PIN, { memoryCost: 8, timeCost: 1, parallelism: 1 }) }
	);
	const viewer = { id: base.lead.id, name: base.lead.name, roles: base.lead.roles };
	const runIds = [base.runId];
	while (runIds.length < POOL) {
		const r = await startRun(orm.em.fork(), viewer, {
			jobId: base.jobId,
			procedureVersionId: base.version.id,
			contentHash: base.version.contentHash,
			assignedToId: base.tech.id
		});
		if (!r.ok) throw new Error(r.message);
		runIds.push(r.value.id);
	}
	const per = Math.ceil(records / POOL);
	const signer = { id: base.tech.id, role: 'technician' };
	await onPhase?.('submit');
	const t0 = performance.now();
	await Promise.all(
		runIds.map(async (runId) => {
			for (let done = 0; done < per; done += BATCH) {
				const batch = Array.from({ length: Math.min(BATCH, per - done) }, () => ({
					id: uuidv7(),
					runId,
					kind: 'attempt',
					body: boreAttempt('22.010'),
					signer
				}));
				const r = await submitRecords(
					orm.em.fork(),
					{ id: base.tech.id, name: base.tech.name, roles: base.tech.roles },
					runId,
					submitBatchSchema.parse({ records: batch, pins: { [base.tech.id]: PIN } })
				);
				if (!r.ok) throw new Error(r.message);
				const bad = r.value.answers.find((a) => a.status !== 'accepted');
				if (bad) throw new Error(`${bad.status}: ${bad.reason}`);
			}
		})
	);
	const submitMs = performance.now() - t0;
	await onPhase?.('insert');
	const stored = per * POOL;

	// The same rows, one INSERT each (autocommit: its own transaction), into a copy of the table.
	const owner = await connectClient(ownerUrl);
	// The same shape as ledger_record, its generated body included (PostgreSQL parses each stored text on both sides).
	await owner.query(
		`create table bench_ledger (like ledger_record including defaults including indexes including generated)`
	);
	await owner.query(`grant insert, select on bench_ledger to benchstamp_app`);
	const generated = new Set(
		(
			await owner.query(
				`select attname from pg_attribute where attrelid = 'ledger_record'::regclass and attgenerated <> ''`
			)
		).rows.map((r) => (r as { attname: string }).attname)
	);
	const rows = (await owner.query(`select * from ledger_record order by run_id, seq`)).rows as Record<
		string,
		unknown
	>[];
	const cols = Object.keys(rows[0]).filter((c) => !generated.has(c));
	const pool = new Pool({ connectionString: appUrl, max: POOL });
	const queues = Array.from({ length: POOL }, (_, i) => rows.filter((_, j) => j % POOL === i));
	/** rows/s of one autocommit INSERT per row into `table`, POOL at a time. */
	const insertEach = async (table: string) => {
		const sql = `insert into ${table} (${cols.map((c) => `"${c}"`).join(', ')}) values (${cols.map((_, i) => `$${i + 1}`).join(', ')})`;
		const t1 = performance.now();
		await Promise.all(
			queues.map(async (q) => {
				for (const row of q)
					await pool.query(
						sql,
						cols.map((c) =>
							row[c] !== null && typeof row[c] === 'object' && !(row[c] instanceof Date)
								? JSON.stringify(row[c])
								: row[c]
						)
					);
			})
		);
		return rows.length / ((performance.now() - t1) / 1000);
	};
	const insertPerS = await insertEach('bench_ledger');
	// The same rows into ledger_record itself, its foreign keys and statement trigger (run summaries) included: the
	// submit route's records are emptied out first (the owner switches the append-only triggers off to do it).
	await owner.query('begin');
	await owner.query('alter table ledger_record disable trigger ledger_record_append_only');
	await owner.query('delete from ledger_record');
	await owner.query('alter table ledger_record enable trigger ledger_record_append_only');
	await owner.query('commit');
	await owner.query('vacuum ledger_record'); // no dead rows or index entries left for the INSERTs to step over
	const ledgerInsertPerS = await insertEach('ledger_record');
	await owner.end();
	await pool.end();
	return { stored, submitPerS: stored / (submitMs / 1000), inserted: rows.length, insertPerS, ledgerInsertPerS };
}

async function pinRate(n = 10) {
	const stored = await hashSecret(PIN);
	await verifySecret(stored, PIN);
	const t0 = performance.now();
	for (let i = 0; i < n; i++) if (!(await verifySecret(stored, PIN))) throw new Error('PIN did not verify');
	return n / ((performance.now() - t0) / 1000);
}

/**
 * The build to measure: `BENCHSTAMP_KIT_DIR` when given, else a fresh build of the working tree into the bench's own
 * directories (a `.svelte-kit` left by an older build would report an older page).
 */
function kitToMeasure(): string {
	if (process.env.BENCHSTAMP_KIT_DIR) return process.env.BENCHSTAMP_KIT_DIR;
	const kitDir = join(ROOT, 'node_modules', '.cache', 'bench-kit');
	const build = spawnSync('npx', ['vite', 'build'], {
		cwd: ROOT,
		env: {
			...process.env,
			BENCHSTAMP_KIT_DIR: kitDir,
			BENCHSTAMP_BUILD_DIR: join(ROOT, 'node_modules', '.cache', 'bench-build')
		},
		stdio: ['ignore', 'ignore', 'inherit']
	});
	if (build.status !== 0) throw new Error(`vite build for the page-JS figure failed (exit ${build.status})`);
	return kitDir;
}

export async function main() {
	const kitDir = kitToMeasure();
	if (existsSync(join(kitDir, 'output', 'client', '.vite', 'manifest.json'))) {
		const js = await pageJs(kitDir);
		const kb = (b: number) => (b / 1024).toFixed(1);
		console.log(
			`runner page JS: ${kb(js.runner)} KiB gz = ${(js.runner / 1000).toFixed(1)} kB (goal ≤ ${JS_GOAL_KB} kB, ${js.runner / 1000 <= JS_GOAL_KB ? 'met' : 'NOT met'}) vs ` +
				`smallest page ${js.bare.route} ${kb(js.bare.bytes)} KiB gz → ratio ${(js.runner / js.bare.bytes).toFixed(2)}×`
		);
	} else console.log(`runner page JS: no build in ${kitDir}; skipped`);

	const records = Number(process.env.BENCH_RECORDS ?? 10_000);
	const t = await submitThroughput(await benchDb(), records);
	console.log(
		`submit: ${t.stored} records in ${POOL} runs at ${t.submitPerS.toFixed(0)} records/s; ratio ` +
			`${(t.submitPerS / t.ledgerInsertPerS).toFixed(3)} against one INSERT per row into ledger_record itself, its ` +
			`foreign keys and summary trigger included, ${t.ledgerInsertPerS.toFixed(0)} rows/s (pool ${POOL}; goal ≥ ` +
			`${THROUGHPUT_GOAL}: ${t.submitPerS / t.ledgerInsertPerS >= THROUGHPUT_GOAL ? 'met' : 'NOT met'}); into a bare ` +
			`copy of the table (no foreign keys, no trigger) ${t.insertPerS.toFixed(0)} rows/s → ` +
			`${(t.submitPerS / t.insertPerS).toFixed(3)}`
	);
	console.log(`PIN verifications (argon2id m=19456 KiB, t=2, p=1): ${(await pinRate()).toFixed(1)} per second`);
}
