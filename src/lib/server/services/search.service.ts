/**
 * The quality lead's questions across runs (issue 8): search by signer, procedure and version, dates, findings,
 * unit serial and part lot/serial ("which units received lot X"), and the suspect-tool list ("what did wrench T sign
 * since it was last known good"). Routes check the role; this parses nothing itself but owns the query schemas.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import type { RoleName } from '../../accounts/schema';
import type { Procedure } from '../../procedure/model';
import { ProcedureVersion } from '../db/entities';
import * as search from '../repositories/audit-search';
import { serialKey } from '../repositories/jobs';
import * as tools from '../repositories/tools';

/** Who may search runs and ask about suspect tools. */
export const AUDIT_ROLES: RoleName[] = ['quality'];

const day = z
	.string()
	.trim()
	.regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-11-30.')
	.refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), 'That is not a calendar date.');
/** Empty query parameters (an untouched filter) count as absent. */
const opt = <T extends z.ZodType>(s: T) => z.preprocess((v) => (v === '' ? undefined : v), s.optional());

/** `GET /api/audit/runs` query (and the search page's URL). */
export const runSearchSchema = z
	.object({
		signer: opt(z.uuid('Choose a signer from the list.')),
		procedure: opt(z.uuid('Choose a procedure from the list.')),
		version: opt(z.coerce.number().int('A version is a whole number.').min(1, 'Versions start at 1.')),
		from: opt(day),
		to: opt(day),
		findings: opt(z.enum(['yes', 'no'], 'Choose with findings, without, or either.')),
		conflicts: opt(z.enum(['yes'], 'Choose signed on two tablets, or leave it empty for every run.')),
		serial: opt(z.string().trim().max(60, 'A unit serial has at most 60 characters.')),
		lot: opt(z.string().trim().max(100, 'A lot or serial number has at most 100 characters.')),
		state: opt(z.enum(['in_progress', 'paused', 'awaiting_review', 'released'], 'Choose a state from the list.')),
		sort: opt(z.enum(Object.keys(search.RUN_SORTS) as [search.RunSort, ...search.RunSort[]], 'Unknown column.')),
		dir: opt(z.enum(['asc', 'desc'], 'Sort asc or desc.')),
		limit: opt(z.coerce.number().int().min(1, 'Show at least 1 row.').max(100, 'Show at most 100 rows a page.')),
		offset: opt(z.coerce.number().int().min(0, 'The offset cannot be negative.').max(1_000_000))
	})
	.refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'The end date is before the start.' })
	.refine((q) => q.version === undefined || q.procedure, {
		path: ['version'],
		message: 'Choose the procedure the version belongs to.'
	});
export type RunSearchQuery = z.output<typeof runSearchSchema>;

/** A part entry that matched the lot/serial searched for. */
export interface LotMatch {
	step: number | null;
	checkpointId: string;
	partNumber: string | null;
	lot: string | null;
	serial: string | null;
}

export interface SearchRow extends search.RunRow {
	lotMatches: LotMatch[];
}

export interface SearchAnswer {
	total: number;
	limit: number;
	offset: number;
	sort: search.RunSort;
	dir: 'asc' | 'desc';
	runs: SearchRow[];
}

const text = (v: unknown) => (typeof v === 'string' ? v : null);

function matchesIn(entries: unknown, lot: string, step: number | null): LotMatch[] {
	if (!Array.isArray(entries)) return [];
	const want = lot.toUpperCase();
	return entries.flatMap((e) => {
		const entry = (e as { entry?: Record<string, unknown> } | null)?.entry ?? {};
		const l = text(entry.lot);
		const s = text(entry.serial);
		if (l?.toUpperCase() !== want && s?.toUpperCase() !== want) return [];
		return [
			{
				step,
				checkpointId: text((e as { checkpointId?: unknown }).checkpointId) ?? '?',
				partNumber: text(entry.number),
				lot: l,
				serial: s
			}
		];
	});
}

/** One page of matching runs, newest signed first unless sorted otherwise; with the lot's part entries. */
export async function searchRuns(em: EntityManager, q: RunSearchQuery): Promise<SearchAnswer> {
	const filter: search.RunFilter = {
		signerId: q.signer,
		procedureId: q.procedure,
		version: q.version,
		from: q.from,
		to: q.to,
		findings: q.findings,
		conflicts: q.conflicts === 'yes',
		serialKey: q.serial ? serialKey(q.serial) || undefined : undefined,
		lot: q.lot || undefined,
		state: q.state,
		sort: q.sort ?? 'lastAt',
		dir: q.dir ?? (q.sort && q.sort !== 'lastAt' && q.sort !== 'firstAt' ? 'asc' : 'desc'),
		limit: q.limit ?? 25,
		offset: q.offset ?? 0
	};
	const { rows, total } = await search.searchRuns(em, filter);
	const byRun = new Map<string, LotMatch[]>();
	if (filter.lot) {
		for (const r of await search.lotEntries(
			em,
			rows.map((x) => x.id),
			filter.lot
		)) {
			const step = r.stepIndex === null ? null : r.stepIndex + 1;
			byRun.set(r.runId, [...(byRun.get(r.runId) ?? []), ...matchesIn(r.entries, filter.lot, step)]);
		}
	}
	return {
		total,
		limit: filter.limit,
		offset: filter.offset,
		sort: filter.sort,
		dir: filter.dir,
		runs: rows.map((r) => ({ ...r, lotMatches: byRun.get(r.id) ?? [] }))
	};
}

/** What the search form offers: signers, procedures and their versions. */
export async function searchOptions(em: EntityManager) {
	const [people, procedures] = await Promise.all([search.signers(em), search.procedureVersions(em)]);
	return { signers: people, procedures };
}

export const suspectToolSchema = z.object({ toolId: z.uuid('Give the id of a tool in the register.') });

export interface SuspectRun {
	runId: string;
	jobId: string;
	jobNumber: string;
	unitSerial: string;
	procedure: string;
	version: number;
	runState: string;
	/** Steps (1-based) signed with the tool, with their titles. */
	steps: string[];
	records: number;
	signers: string[];
	firstAt: string;
	lastAt: string;
}

export interface SuspectAnswer {
	tool: { id: string; assetTag: string; description: string; kind: string; usable: boolean };
	/** The latest calibration whose as-found result was in tolerance, or null when none is on record. */
	lastGood: { performedOn: string; certificateNo: string | null } | null;
	/** Register records after the last good calibration that found the tool out of tolerance (newest first). */
	failures: { performedOn: string; kind: string; certificateNo: string | null; notes: string }[];
	/** Start of the window (ISO time, 00:00 UTC of the last good calibration's day) or null: the tool's whole life. */
	since: string | null;
	until: string;
	records: number;
	runs: SuspectRun[];
}

/**
 * Every run with a record signed with the tool since its last good calibration, up to now. Defined precisely:
 * the window opens at 00:00 UTC on the performed-on date of the LATEST register record of kind `calibration` whose
 * as-found result is `in` (a date has no time of day, so records signed on that day are included: the cautious
 * reading). In-house checks never open the window — a check is not a calibration. With no such calibration, every
 * record that names the tool is listed. A record "names the tool" when its `toolSnapshots` (written by the server
 * when the record was stored, covered by the record's hash) contain the tool's id.
 */
export async function suspectTool(
	em: EntityManager,
	toolId: string,
	now: Date = new Date()
): Promise<SuspectAnswer | null> {
	const tool = await tools.findSummary(em, toolId, now);
	if (!tool) return null;
	const history = (await tools.listCalibrations(em, toolId)).map(tools.toCalibrationRecord);
	const good = history
		.filter((c) => c.kind === 'calibration' && c.asFound === 'in')
		.sort((a, b) => b.performedOn.localeCompare(a.performedOn))[0];
	const since = good ? new Date(`${good.performedOn}T00:00:00.000Z`) : null;
	const failures = history
		.filter((c) => c.asFound === 'out' && (!good || c.performedOn >= good.performedOn) && c.id !== good?.id)
		.map((c) => ({ performedOn: c.performedOn, kind: c.kind, certificateNo: c.certificateNo, notes: c.notes }));
	const rows = (await search.recordsWithTool(em, toolId, since)).filter((r) => Date.parse(r.serverTime) <= +now);

	const titles = await stepTitles(
		em,
		rows.map((r) => r.runId)
	);
	const byRun = new Map<string, SuspectRun>();
	for (const r of rows) {
		const run = byRun.get(r.runId) ?? {
			runId: r.runId,
			jobId: r.jobId,
			jobNumber: r.jobNumber,
			unitSerial: r.unitSerial,
			procedure: r.procedure,
			version: r.version,
			runState: r.runState,
			steps: [],
			records: 0,
			signers: [],
			firstAt: r.serverTime,
			lastAt: r.serverTime
		};
		run.records += 1;
		run.lastAt = r.serverTime;
		if (r.signer && !run.signers.includes(r.signer)) run.signers.push(r.signer);
		if (r.stepIndex !== null) {
			const label = `Step ${r.stepIndex + 1}${titles.get(`${r.runId}:${r.stepIndex}`) ? `: ${titles.get(`${r.runId}:${r.stepIndex}`)}` : ''}`;
			if (!run.steps.includes(label)) run.steps.push(label);
		}
		byRun.set(r.runId, run);
	}
	return {
		tool: {
			id: tool.id,
			assetTag: tool.assetTag,
			description: tool.description,
			kind: tool.kind,
			usable: tool.status.usable
		},
		lastGood: good ? { performedOn: good.performedOn, certificateNo: good.certificateNo } : null,
		failures,
		since: since ? since.toISOString() : null,
		until: now.toISOString(),
		records: rows.length,
		runs: [...byRun.values()].sort((a, b) => b.lastAt.localeCompare(a.lastAt))
	};
}

/** `runId:stepIndex` → step title, from each run's pinned version. */
async function stepTitles(em: EntityManager, runIds: string[]): Promise<Map<string, string>> {
	const out = new Map<string, string>();
	if (!runIds.length) return out;
	const unique = [...new Set(runIds)];
	const rows = await em
		.getConnection()
		.execute<{ run_id: string; version_id: string }[]>(
			`select id as run_id, procedure_version_id as version_id from run where id in (${unique.map(() => '?').join(', ')})`,
			unique
		);
	const versions = await em.find(ProcedureVersion, { id: { $in: [...new Set(rows.map((r) => r.version_id))] } });
	const models = new Map(versions.map((v) => [v.id, v.model as unknown as Procedure]));
	for (const r of rows)
		for (const s of models.get(r.version_id)?.steps ?? []) out.set(`${r.run_id}:${s.index}`, s.title);
	return out;
}
