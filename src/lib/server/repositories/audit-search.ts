/**
 * Read-only SQL over runs and the jsonb bodies of their ledger records, for the quality lead's search, lot trace and
 * suspect-tool questions. Every value travels as a bound parameter (`?`); only whitelisted column names and fixed
 * SQL fragments are ever put into the text. Containment (`body @> ?::jsonb`) uses the GIN `jsonb_path_ops` index of
 * migration `…_audit_search_indexes`. A run's first/last time and finding count come from `run_summary`, and the
 * runs a person signed on given days from `run_signer_day`, both kept by a trigger on the ledger (migration
 * `…_run_summary_trigger`); dates alone use `(server_time) include (run_id)` (migration `…_audit_scale_indexes`).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { boundRows } from '../db/bound-rows';

/** Sortable columns of the search table → SQL (whitelist: the query schema only allows these keys). */
export const RUN_SORTS = {
	lastAt: 's.last_at',
	firstAt: 's.first_at',
	jobNumber: 'j.job_number',
	unitSerial: 'j.serial_key',
	procedure: 'p.title',
	technician: 'u.name',
	records: 'r.record_count',
	findings: 'coalesce(s.finding_count, 0)'
} as const;
export type RunSort = keyof typeof RUN_SORTS;

export interface RunFilter {
	signerId?: string;
	procedureId?: string;
	version?: number;
	/** Inclusive UTC day bounds, `YYYY-MM-DD`, on the server time of the records (the signer's, when one is given). */
	from?: string;
	to?: string;
	findings?: 'yes' | 'no';
	/** Offline issue: only runs where a step was signed on two tablets (a sign-off the server marked `conflictsWith`). */
	conflicts?: boolean;
	/** Part of a unit serial, compared as the job's serial key (upper case, no spaces/dashes/dots). */
	serialKey?: string;
	/** A part lot or serial number recorded in a part or fluid entry. */
	lot?: string;
	state?: string;
	sort: RunSort;
	dir: 'asc' | 'desc';
	limit: number;
	offset: number;
}

export interface RunRow {
	id: string;
	state: string;
	records: number;
	jobId: string;
	jobNumber: string;
	unitSerial: string;
	unitModel: string;
	procedureId: string;
	procedure: string;
	version: number;
	technician: string;
	findings: number;
	firstAt: string | null;
	lastAt: string | null;
}

interface RawRunRow {
	id: string;
	state: string;
	record_count: number;
	job_id: string;
	job_number: string;
	unit_serial: string;
	unit_model: string;
	procedure_id: string;
	procedure: string;
	version: number;
	technician: string;
	findings: string | number;
	first_at: Date | null;
	last_at: Date | null;
	total: string | number;
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
const nextDay = (day: string) => new Date(Date.parse(`${day}T00:00:00Z`) + 86_400_000).toISOString();
const escapeLike = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * The jsonb documents a lot/serial match is tested with: a `lot` or a `serial` in any entry, as typed, upper- or
 * lower-cased (the register keeps lot numbers upper case; patterns accept letters in either case, so a technician may
 * have typed either). Mixed-case typing is not matched: containment is exact, which is what lets the GIN index answer.
 */
export function lotProbes(lot: string): string[] {
	const forms = [...new Set([lot, lot.toUpperCase(), lot.toLowerCase()])];
	return forms.flatMap((v) => [
		JSON.stringify({ entries: [{ entry: { lot: v } }] }),
		JSON.stringify({ entries: [{ entry: { serial: v } }] })
	]);
}

/** SQL + parameters: a record of the run `alias` whose body contains one of `probes` (never an attempt). */
function containsAny(alias: string, probes: string[]): string {
	return `${alias}.kind <> 'attempt' and (${probes.map(() => `${alias}.body @> ?::jsonb`).join(' or ')})`;
}

/**
 * SQL + parameters of the runs `f.signerId` signed a record of within `f.from`–`f.to` (UTC days): a range of
 * `run_signer_day`'s primary key, index-only. Its statistics are per signer and day, so PostgreSQL estimates the
 * handful of runs it yields well and probes each by primary key.
 */
function signedBy(f: RunFilter & { signerId: string }): { sql: string; params: unknown[] } {
	const conds = ['d.signer_id = ?'];
	const params: unknown[] = [f.signerId];
	if (f.from) {
		conds.push('d.day >= ?::date');
		params.push(f.from);
	}
	if (f.to) {
		conds.push('d.day <= ?::date');
		params.push(f.to);
	}
	return { sql: `select distinct d.run_id from run_signer_day d where ${conds.join(' and ')}`, params };
}

/** The ids of the runs with a record (anyone's) within `f.from`–`f.to`: index-only on `(server_time) include (run_id)`. */
async function runsWithRecordsIn(em: EntityManager, f: RunFilter): Promise<string[]> {
	const conds: string[] = [];
	const params: unknown[] = [];
	if (f.from) {
		conds.push('l.server_time >= ?');
		params.push(`${f.from}T00:00:00.000Z`);
	}
	if (f.to) {
		conds.push('l.server_time < ?');
		params.push(nextDay(f.to));
	}
	const rows = await boundRows<{ run_id: string }>(
		em,
		`select distinct l.run_id from ledger_record l where ${conds.join(' and ')}`,
		params
	);
	return rows.map((r) => r.run_id);
}

/** One page of runs matching `f`, and how many match in all. */
export async function searchRuns(em: EntityManager, f: RunFilter): Promise<{ rows: RunRow[]; total: number }> {
	const where: string[] = [];
	const params: unknown[] = [];
	let picked = '';
	if (f.signerId) {
		// One query: the signer's runs as a materialised CTE joined by primary key. Sent as a list of ids instead
		// (a second round trip), planning the 150-element array cost as much as running the query (1M records).
		const signed = signedBy({ ...f, signerId: f.signerId });
		picked = `with picked as materialized (${signed.sql})`;
		params.push(...signed.params);
	} else if (f.from || f.to) {
		// Dates alone: the runs first, on their own. Left inside as a semi-join over the ledger, the planner could not
		// tell how few runs it yields and hashed every run and job (audit bench, 1M records).
		const runIds = await runsWithRecordsIn(em, f);
		if (!runIds.length) return { rows: [], total: 0 };
		where.push('r.id = any(?::uuid[])');
		params.push(`{${runIds.join(',')}}`);
	}
	if (f.procedureId) {
		where.push('pv.procedure_id = ?');
		params.push(f.procedureId);
	}
	if (f.version !== undefined) {
		where.push('pv.number = ?');
		params.push(f.version);
	}
	if (f.findings) where.push(f.findings === 'yes' ? 's.finding_count > 0' : 'coalesce(s.finding_count, 0) = 0');
	if (f.conflicts)
		where.push(
			`exists (select 1 from ledger_record l3 where l3.run_id = r.id and l3.kind = 'signoff' and l3.body->>'conflictsWith' is not null)`
		);
	if (f.serialKey) {
		where.push(`j.serial_key like ? escape '\\'`);
		params.push(`%${escapeLike(f.serialKey)}%`);
	}
	if (f.lot) {
		const probes = lotProbes(f.lot);
		where.push(`exists (select 1 from ledger_record l2 where l2.run_id = r.id and ${containsAny('l2', probes)})`);
		params.push(...probes);
	}
	if (f.state) {
		where.push('r.state = ?');
		params.push(f.state);
	}
	const order = `${RUN_SORTS[f.sort]} ${f.dir === 'asc' ? 'asc' : 'desc'} nulls last, r.id asc`;
	// The page is chosen joining only what its filters and order name; its 25 rows then get their job, procedure and
	// technician. Joined before the count and the limit, every matching run was joined to all four (audit bench).
	const named = `${where.join(' ')} ${order}`;
	const uses = (alias: string) => new RegExp(`\\b${alias}\\.`).test(named);
	const joins = [
		uses('j') ? 'join job j on j.id = r.job_id' : '',
		uses('pv') || uses('p') ? 'join procedure_version pv on pv.id = r.procedure_version_id' : '',
		uses('p') ? 'join procedure p on p.id = pv.procedure_id' : '',
		uses('u') ? 'join app_user u on u.id = r.assigned_to_id' : '',
		uses('s') ? 'left join run_summary s on s.run_id = r.id' : ''
	].filter(Boolean);
	const sql = `${picked}
		select r.id, r.state, r.record_count, j.id as job_id, j.job_number, j.unit_serial, j.unit_model,
			p.id as procedure_id, p.title as procedure, pv.number as version, u.name as technician,
			coalesce(s.finding_count, 0) as findings, s.first_at, s.last_at, page.total
		from (
			select r.id, count(*) over () as total, row_number() over (order by ${order}) as pos
			from ${picked ? 'picked join run r on r.id = picked.run_id' : 'run r'}
			${joins.join('\n\t\t\t')}
			${where.length ? `where ${where.join(' and ')}` : ''}
			order by ${order}
			limit ? offset ?
		) page
		join run r on r.id = page.id
		join job j on j.id = r.job_id
		join procedure_version pv on pv.id = r.procedure_version_id
		join procedure p on p.id = pv.procedure_id
		join app_user u on u.id = r.assigned_to_id
		left join run_summary s on s.run_id = r.id
		order by page.pos`;
	// A named statement when the signer's runs are picked: the commonest question, and its plan is reused (bench).
	const raw = await boundRows<RawRunRow>(em, sql, [...params, f.limit, f.offset], { prepared: picked !== '' });
	// Past the last page there is no row to carry the count: ask for the first row only.
	const total = raw.length
		? Number(raw[0].total)
		: f.offset > 0
			? (await searchRuns(em, { ...f, offset: 0, limit: 1 })).total
			: 0;
	return {
		total,
		rows: raw.map((x) => ({
			id: x.id,
			state: x.state,
			records: x.record_count,
			jobId: x.job_id,
			jobNumber: x.job_number,
			unitSerial: x.unit_serial,
			unitModel: x.unit_model,
			procedureId: x.procedure_id,
			procedure: x.procedure,
			version: x.version,
			technician: x.technician,
			findings: Number(x.findings),
			firstAt: iso(x.first_at),
			lastAt: iso(x.last_at)
		}))
	};
}

/** The bodies' `entries` of the records of `runIds` that contain the lot/serial (to show which part matched). */
export async function lotEntries(
	em: EntityManager,
	runIds: string[],
	lot: string
): Promise<{ runId: string; stepIndex: number | null; entries: unknown }[]> {
	if (!runIds.length) return [];
	const probes = lotProbes(lot);
	const rows = await boundRows<{ run_id: string; step_index: number | null; entries: unknown }>(
		em,
		`select l.run_id, (l.body->>'stepIndex')::int as step_index, l.body->'entries' as entries
			from ledger_record l where l.run_id in (${runIds.map(() => '?').join(', ')}) and ${containsAny('l', probes)}
			order by l.run_id, l.seq`,
		[...runIds, ...probes]
	);
	return rows.map((r) => ({ runId: r.run_id, stepIndex: r.step_index, entries: r.entries }));
}

export interface ToolRecordRow {
	recordId: string;
	runId: string;
	seq: number;
	kind: string;
	stepIndex: number | null;
	signer: string | null;
	serverTime: string;
	jobId: string;
	jobNumber: string;
	unitSerial: string;
	procedure: string;
	version: number;
	runState: string;
}

/**
 * Every ledger record whose tool snapshots name `toolId`, signed at or after `since` (all of them when null), in
 * time order, with its run, job and procedure.
 */
export async function recordsWithTool(em: EntityManager, toolId: string, since: Date | null): Promise<ToolRecordRow[]> {
	const probe = JSON.stringify({ toolSnapshots: [{ id: toolId }] });
	const rows = await boundRows<{
		id: string;
		run_id: string;
		seq: number;
		kind: string;
		step_index: number | null;
		signer: string | null;
		server_time: Date;
		job_id: string;
		job_number: string;
		unit_serial: string;
		procedure: string;
		version: number;
		state: string;
	}>(
		em,
		`select l.id, l.run_id, l.seq, l.kind, (l.body->>'stepIndex')::int as step_index,
			l.body->'signer'->>'name' as signer, l.server_time, j.id as job_id, j.job_number, j.unit_serial,
			p.title as procedure, pv.number as version, r.state
		from ledger_record l
		join run r on r.id = l.run_id
		join job j on j.id = r.job_id
		join procedure_version pv on pv.id = r.procedure_version_id
		join procedure p on p.id = pv.procedure_id
		where l.body @> ?::jsonb ${since ? 'and l.server_time >= ?' : ''}
		order by l.server_time asc, l.run_id, l.seq`,
		since ? [probe, since.toISOString()] : [probe]
	);
	return rows.map((r) => ({
		recordId: r.id,
		runId: r.run_id,
		seq: r.seq,
		kind: r.kind,
		stepIndex: r.step_index,
		signer: r.signer,
		serverTime: new Date(r.server_time).toISOString(),
		jobId: r.job_id,
		jobNumber: r.job_number,
		unitSerial: r.unit_serial,
		procedure: r.procedure,
		version: r.version,
		runState: r.state
	}));
}

/** The people who signed at least one record (for the signer filter), by name. */
export function signers(em: EntityManager): Promise<{ id: string; name: string }[]> {
	return boundRows<{ id: string; name: string }>(
		em,
		`select u.id, u.name from app_user u where exists (select 1 from ledger_record l where l.signer_id = u.id) order by u.name, u.id`
	);
}

/** Every procedure with its published version numbers (for the procedure and version filters). */
export async function procedureVersions(
	em: EntityManager
): Promise<{ id: string; title: string; versions: number[] }[]> {
	const rows = await boundRows<{ id: string; title: string; versions: number[] }>(
		em,
		`select p.id, p.title, array_agg(pv.number order by pv.number) as versions
			from procedure p join procedure_version pv on pv.procedure_id = p.id group by p.id, p.title order by p.title`
	);
	return rows.map((r) => ({ id: r.id, title: r.title, versions: r.versions.map(Number) }));
}
