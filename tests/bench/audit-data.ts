/**
 * The audit bench's data: `total` ledger records in runs of 40–60 records each (one job per run, six signers, server
 * times spread over six months), bodies shaped like the submit path's (readings with the server's evaluation and the
 * tool snapshots it stores), every run a VALID chain (RFC 8785 + sha256 as `appendTo` + `serverRecordHash` give it;
 * a sample is re-derived through them while loading), loaded in bulk as the owner
 * (`INSERT … SELECT FROM unnest(…)`) with the ledger's indexes and constraints (but its primary key) dropped during
 * the load and re-created after, then ANALYZE. Every value is invented (the KTX-7 is an invented transaxle; not service data).
 */
import type { MikroORM } from '@mikro-orm/postgresql';
import { appendTo, type ChainHead } from '../../src/lib/ledger/chain';
import { canonicalize } from '../../src/lib/ledger/jcs';
import type { JsonValue } from '../../src/lib/ledger/jcs';
import { LEDGER_HASH_DOMAIN, type RecordKind, type StoredRecord } from '../../src/lib/ledger/record';
import { createUuidV7 } from '../../src/lib/ledger/uuid-v7';
import type { IUser } from '../../src/lib/server/db/entities';
import { serverRecordHash, sha256Hex } from '../../src/lib/server/ledger-hash';
import { connectClient, type PgClient } from '../../scripts/lib/postgres';
import { makePerson } from '../factories/people';
import { makeRun, PIN } from '../factories/runs';

const DAY = 86_400_000;
/** The generated history ends here and reaches six months back. */
export const HISTORY_END = Date.parse('2026-11-30T18:00:00Z');
export const HISTORY_DAYS = 182;

/** A small deterministic generator (LCG, Numerical Recipes constants): the same data at every run. */
function random(seed: number) {
	let s = seed >>> 0;
	return () => {
		s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
		return s / 2 ** 32;
	};
}

/**
 * The ledger's indexes and constraints other than the primary key (the unique chain constraints, the run foreign key,
 * the audit indexes), as PostgreSQL itself defines them: dropped for the bulk load and re-created after from these
 * very definitions — building a b-tree by one sort is far cheaper than a million random inserts into it.
 */
async function ledgerDefinitions(owner: PgClient) {
	const constraints = (
		await owner.query<{ name: string; def: string }>(
			`select conname as name, pg_get_constraintdef(oid) as def from pg_constraint
			where conrelid = 'ledger_record'::regclass and contype in ('u', 'f') order by contype desc, conname`
		)
	).rows;
	const indexes = (
		await owner.query<{ name: string; def: string }>(
			`select indexname as name, indexdef as def from pg_indexes where tablename = 'ledger_record'
			and indexname not in (select conname from pg_constraint where conrelid = 'ledger_record'::regclass)`
		)
	).rows;
	return { constraints, indexes };
}

/** A type alias, not an interface, so it is assignable to `JsonValue`. */
type Signer = { id: string; name: string; role: string };
const asSigner = (u: IUser): Signer => ({ id: u.id, name: u.name, role: u.roles[0] });

// The bore is 22 mm H7: 22.000–22.021 mm by ISO 286-2 (IT7 for 18–30 mm is 21 µm, H puts the lower deviation at 0).

const q = (s: string) => JSON.stringify(s); // the RFC 8785 form of the plain strings written here
const GAUGE_TEXT = `{"assetTag":"BG-104 (invented)","id":"00000000-0000-7000-8000-00000000b0e4","kind":"bore_gauge","lastCalibratedOn":"2026-05-04","status":{"dueOn":"2027-05-04","reason":null,"usable":true}}`;
const H7_TEXT = `{"max":"22.021","min":"22","unit":"mm"}`;

/**
 * A bore attempt's body — readings, the server's evaluation against 22 mm H7, the gauge's snapshot — written directly
 * as its RFC 8785 text (keys in code-unit order at every level): `canonicalize` over a million bodies was most of the
 * load's time. A sample is re-derived through `appendTo` + `serverRecordHash` while loading, and `verifyAll` re-checks
 * every record afterwards, so a text that were not canonical would fail the bench.
 */
function boreText(signer: Signer, readings: string[], status: 'pass' | 'fail', extra = ''): string {
	const evaluated = readings.map((r, i) => {
		const ok = Number(r) >= 22 && Number(r) <= 22.021;
		return `{"label":"Reading ${i + 1}","limits":${H7_TEXT},"reason":${ok ? 'null' : q('above 22.021 mm')},"status":"${ok ? 'pass' : 'fail'}","unit":"mm","value":${q(String(Number(r)))}}`;
	});
	const reasons = status === 'pass' ? '[]' : `[${q('A reading is outside 22 mm H7.')}]`;
	return (
		`{"entries":[{"checkpointId":"bore-1","claimed":"${status}","entry":{"readings":[${readings.map(q).join(',')}],"unit":"mm","zeroed":true}}]` +
		`,"evaluation":[{"checkpointId":"bore-1","claimed":"${status}","readings":[${evaluated.join(',')}],"reasons":${reasons},"status":"${status}"}]` +
		`,"signer":{"id":${q(signer.id)},"name":${q(signer.name)},"role":${q(signer.role)}},"stepIndex":0,"toolSnapshots":[${GAUGE_TEXT}]${extra}}`
	);
}

/** The records of one run, in chain order, as drafts with their signer and server time. */
function planRun(rnd: () => number, techs: Signer[], lead: Signer, start: number) {
	const tech = techs[Math.floor(rnd() * techs.length)];
	const other = techs[(techs.indexOf(tech) + 1) % techs.length];
	const n = 40 + Math.floor(rnd() * 21);
	const out: { kind: RecordKind; body: JsonValue | string; signer: Signer; at: number }[] = [];
	let t = start;
	const push = (kind: RecordKind, body: JsonValue | string, signer: Signer) => {
		t += Math.round(20_000 + rnd() * 160_000);
		out.push({ kind, body, signer, at: t });
	};
	push('run_start', { procedureTitle: 'KTX-7 valve body bores (invented)', version: 1, assignedTo: tech }, lead);
	let by = tech;
	const finding = rnd() < 0.08;
	const handoverAt = rnd() < 0.15 ? 10 + Math.floor(rnd() * 20) : -1;
	while (out.length < n - 3) {
		if (out.length === handoverAt) {
			push('handover', { to: other, note: 'End of shift; bore 3 onward left to measure.' }, by);
			by = other;
			continue;
		}
		const readings = [0, 1, 2, 3].map(() => (22.004 + rnd() * 0.014).toFixed(3));
		const fail = rnd() < 0.04;
		if (fail) readings[3] = '22.024';
		push('attempt', boreText(by, readings, fail ? 'fail' : 'pass'), by);
		if (fail && finding)
			push('finding', { stepIndex: 0, signer: by, text: 'Bore 1 worn past H7 along the stroke; scoring.' }, by);
	}
	const tools = `,"tools":["00000000-0000-7000-8000-00000000b0e4"]`;
	push('signoff', boreText(by, ['22.010', '22.011', '22.009', '22.012'], 'pass', tools), by);
	push('verification', { stepIndex: 0, signoffId: 'see-previous' }, lead);
	push(
		'signoff',
		{ stepIndex: 1, signer: by, entries: [{ checkpointId: 'magnet-1', entry: { confirmed: true } }] },
		by
	);
	return { tech, records: out };
}

export interface AuditData {
	runIds: string[];
	recordIds: string[];
	signers: Signer[];
	loadMs: number;
	/** Of `loadMs`, the time spent generating and hashing (the rest waits for PostgreSQL). */
	genMs: number;
	indexMs: number;
	total: number;
}

/** Column arrays of one `unnest` INSERT. */
class Batch {
	cols: unknown[][] = Array.from({ length: 15 }, () => []);
	get size() {
		return this.cols[0].length;
	}
	add(r: Omit<StoredRecord, 'body'>, canonical: string, signer: Signer, at: number) {
		const time = new Date(at).toISOString();
		const values = [
			r.id,
			r.runId,
			r.seq,
			r.kind,
			canonical,
			r.prevHash,
			r.hash,
			sha256Hex(r.hash),
			signer.id,
			signer.role,
			'bench-tablet-1',
			time,
			time,
			'bench',
			false
		];
		for (let i = 0; i < values.length; i++) this.cols[i].push(values[i]);
	}
}
const LEDGER_INSERT = `insert into ledger_record (id, run_id, seq, kind, canonical, prev_hash, hash, submission_hash, signer_id,
	signer_role, device_id, device_time, server_time, engine_version, signed_offline)
	select * from unnest($1::uuid[], $2::uuid[], $3::int[], $4::text[], $5::text[], $6::text[], $7::text[], $8::text[],
	$9::uuid[], $10::text[], $11::text[], $12::timestamptz[], $13::timestamptz[], $14::text[], $15::boolean[])`;

/** Generates and loads `total` records (see the module comment); the ids a bench samples from. */
export async function loadLedger(orm: MikroORM, ownerUrl: string, total: number): Promise<AuditData> {
	const em = orm.em.fork();
	const base = await makeRun(em);
	const techs = [asSigner(base.tech)];
	for (const name of ['Ilse Marrow', 'Tavi Quell', 'Oren Brask', 'Pell Standish', 'Wyn Harrowgate'])
		techs.push(asSigner(await makePerson(em, { roles: ['technician'], pin: PIN, name: `${name} (invented)` })));
	const lead = asSigner(base.lead);
	const rnd = random(20261202);
	const t0 = performance.now();
	let genMs = 0;
	const owners = await Promise.all([connectClient(ownerUrl), connectClient(ownerUrl)]);
	const [owner] = owners;
	if (process.env.BENCH_DEBUG) console.log(`setup done ${(performance.now() - t0).toFixed(0)} ms`);
	const defs = await ledgerDefinitions(owner);
	for (const c of defs.constraints) await owner.query(`alter table ledger_record drop constraint "${c.name}"`);
	for (const i of defs.indexes) await owner.query(`drop index "${i.name}"`);
	const runIds: string[] = [];
	const recordIds: string[] = [];
	let stored = 0;
	let sampled = 0;
	const inFlight: Promise<unknown>[] = [Promise.resolve(), Promise.resolve()];
	let turn = 0;
	while (stored < total) {
		// One batch: ~200 runs, their jobs first (the run's foreign key), then the runs, then the records.
		const jobs: unknown[][] = [[], [], [], []];
		const runsCols: unknown[][] = [[], [], [], [], [], [], []];
		const batch = new Batch();
		const g0 = performance.now();
		while (batch.size < 10_000 && stored < total) {
			const start = HISTORY_END - Math.floor(rnd() * HISTORY_DAYS * DAY);
			const newId = createUuidV7({ now: () => start, random: (b) => crypto.getRandomValues(b) });
			const runId = newId();
			const jobId = newId();
			const plan = planRun(rnd, techs, lead, start);
			const records = plan.records.slice(0, total - stored);
			let head: ChainHead | null = null;
			for (const p of records) {
				const id = newId();
				const text = typeof p.body === 'string' ? p.body : canonicalize(p.body);
				const seq: number = head ? head.seq + 1 : 1;
				const prevHash: string | null = head ? head.hash : null;
				const envelope = `{"body":${text},"id":"${id}","kind":"${p.kind}","prevHash":${prevHash ? `"${prevHash}"` : 'null'},"runId":"${runId}","seq":${seq}}`;
				const hash: string = sha256Hex(LEDGER_HASH_DOMAIN + envelope);
				if (sampled++ % 500 === 0) {
					const again = appendTo(
						head,
						{ id, runId, kind: p.kind, body: JSON.parse(text) as JsonValue },
						serverRecordHash
					);
					if (again.hash !== hash) throw new Error(`generated record ${id} is not canonical: ${envelope}`);
				}
				head = { runId, seq, hash };
				batch.add({ id, runId, seq, kind: p.kind, prevHash, hash }, envelope, p.signer, p.at);
				if (rnd() < 0.002) recordIds.push(id);
			}
			stored += records.length;
			const serial = `KX7${String(runIds.length).padStart(7, '0')}`;
			jobs[0].push(jobId);
			jobs[1].push(`B-${String(runIds.length).padStart(7, '0')}`);
			jobs[2].push(serial);
			jobs[3].push(new Date(start).toISOString());
			runsCols[0].push(runId);
			runsCols[1].push(jobId);
			runsCols[2].push(plan.tech.id);
			runsCols[3].push(head!.hash);
			runsCols[4].push(records.length);
			runsCols[5].push(new Date(start).toISOString());
			runsCols[6].push(new Date(records.at(-1)!.at).toISOString());
			runIds.push(runId);
		}
		genMs += performance.now() - g0;
		const client = owners[turn];
		const previous = inFlight[turn];
		inFlight[turn] = previous.then(async () => {
			await client.query(
				`insert into job (id, job_number, customer_name, unit_model, unit_serial, serial_key, complaint, fault_codes,
					received_on, state, created_at, updated_at)
				select id, num, 'Bench customer (invented)', 'KTX-7 (invented)', serial, serial, 'Harsh 2–3 shift.', '{}',
					t::date, 'in_work', t, t from unnest($1::uuid[], $2::text[], $3::text[], $4::timestamptz[]) as x(id, num, serial, t)`,
				jobs
			);
			await client.query(
				`insert into run (id, job_id, procedure_version_id, content_hash, assigned_to_id, started_by_id, state,
					head_hash, record_count, created_at, updated_at)
				select id, job, $8, $9, tech, $10, 'awaiting_review', head, n, c, u
				from unnest($1::uuid[], $2::uuid[], $3::uuid[], $4::text[], $5::int[], $6::timestamptz[], $7::timestamptz[])
					as x(id, job, tech, head, n, c, u)`,
				[...runsCols, base.version.id, base.version.contentHash, base.lead.id]
			);
			const q0 = performance.now();
			await client.query(LEDGER_INSERT, batch.cols);
			if (process.env.BENCH_DEBUG)
				console.log(`ledger insert ${batch.size} rows ${(performance.now() - q0).toFixed(0)} ms`);
		});
		turn = 1 - turn;
		await inFlight[turn]; // at most one batch queued per connection while the next one is generated
	}
	await Promise.all(inFlight);
	const loadMs = performance.now() - t0;
	const t1 = performance.now();
	for (const c of owners) await c.query(`set maintenance_work_mem = '256MB'`);
	// Two at a time, one per connection; then the constraints (unique ones build their index; the foreign key
	// validates every row in one pass).
	const onEach = async (sqls: string[]) =>
		Promise.all(
			owners.map(async (c, k) => {
				for (const sql of sqls.filter((_, j) => j % owners.length === k)) await c.query(sql);
			})
		);
	await onEach(defs.indexes.map((i) => i.def));
	const unique = defs.constraints.filter((c) => c.def.startsWith('UNIQUE'));
	await onEach(unique.map((c) => `alter table ledger_record add constraint "${c.name}" ${c.def}`));
	for (const c of defs.constraints.filter((x) => !unique.includes(x)))
		await owner.query(`alter table ledger_record add constraint "${c.name}" ${c.def}`);
	await owner.query('vacuum analyze'); // sets the visibility map too: index-only scans, as autovacuum would leave them
	const indexMs = performance.now() - t1;
	await Promise.all(owners.map((c: PgClient) => c.end()));
	return { runIds, recordIds, signers: techs, loadMs, genMs, indexMs, total: stored };
}
