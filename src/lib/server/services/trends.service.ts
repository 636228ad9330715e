/**
 * Trends for the quality lead (issue 8): every signed reading of one measure checkpoint across all runs of a
 * procedure against its limits, with the mean and the performance indices Pp/Ppk (`$lib/stats/capability`); the
 * actual time per step against the procedure's `minutes`; and finding and comeback rates per procedure version.
 * All figures come from the ledger bodies as the server stored them (its own evaluation, its own time).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import { exact, toNumber } from '../../checks/exact';
import { CHECKPOINT_ID, type Procedure } from '../../procedure/model';
import { MIN_READINGS_FOR_INDICES, performance, type Performance } from '../../stats/capability';
import { ProcedureVersion } from '../db/entities';

export const trendsQuerySchema = z.object({
	procedure: z.uuid('Choose a procedure from the list.'),
	checkpoint: z.preprocess(
		(v) => (v === '' ? undefined : v),
		z.string().regex(CHECKPOINT_ID, 'Choose a measure checkpoint from the list.').optional()
	)
});
export type TrendsQuery = z.output<typeof trendsQuerySchema>;

export interface TrendPoint {
	/** Server time of the sign-off, ISO. */
	at: string;
	value: number;
	/** The value as judged, exact decimal text, with its unit. */
	text: string;
	label: string;
	status: string;
	runId: string;
	jobNumber: string;
	version: number;
}

export interface StepTime {
	step: number;
	title: string;
	estimate: number | null;
	/** Runs with a sign-off of this step. */
	n: number;
	median: number | null;
	mean: number | null;
}

export interface VersionRate {
	version: number;
	runs: number;
	runsWithFindings: number;
	findingRate: number | null;
	jobs: number;
	comebacks: number;
	comebackRate: number | null;
}

export interface TrendsAnswer {
	procedure: { id: string; title: string };
	/** Measure checkpoints of the latest version, to choose from. */
	checkpoints: { id: string; label: string }[];
	checkpoint: string | null;
	unit: string | null;
	lsl: number | null;
	usl: number | null;
	points: TrendPoint[];
	/** Readings left out because their limits differ from the chosen series' (another stage or unit). */
	otherLimits: number;
	stats: (Performance & { minReadings: number }) | null;
	stepTimes: StepTime[];
	versions: VersionRate[];
}

type Body = Record<string, unknown>;
const str = (v: unknown) => (typeof v === 'string' ? v : undefined);

/** Exact decimal (or "n/d") text → nearest double; undefined when it is not a number. */
function toNum(text: string | undefined): number | undefined {
	if (!text) return undefined;
	const [n, d] = text.split('/');
	const a = exact(n);
	if (!a) return undefined;
	if (d === undefined) return toNumber(a);
	const b = exact(d);
	return b ? toNumber(a) / toNumber(b) : undefined;
}

const median = (xs: number[]) => {
	if (!xs.length) return null;
	const s = [...xs].sort((a, b) => a - b);
	const m = Math.floor(s.length / 2);
	return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};
const round = (x: number | null, places = 1) => (x === null ? null : Math.round(x * 10 ** places) / 10 ** places);

/** The trends of one procedure (null when there is no such procedure). */
export async function trends(em: EntityManager, q: TrendsQuery): Promise<TrendsAnswer | null> {
	const versions = await em.find(
		ProcedureVersion,
		{ procedure: q.procedure },
		{ populate: ['procedure'], orderBy: { number: 'asc' } }
	);
	if (!versions.length) return null;
	const latest = versions.at(-1)!;
	const model = latest.model as unknown as Procedure;
	const measures = model.steps.flatMap((s) =>
		s.checkpoints
			.filter((c) => c.kind === 'measure')
			.map((c) => ({ id: c.id, label: `Step ${s.index + 1}: ${c.prompt ?? c.id}` }))
	);
	const checkpoint = q.checkpoint ?? measures[0]?.id ?? null;
	const series = checkpoint ? await readings(em, q.procedure, checkpoint) : { points: [], limits: null, other: 0 };
	const stats = series.points.length
		? performance(
				series.points.map((p) => p.value),
				series.limits?.lsl ?? null,
				series.limits?.usl ?? null
			)
		: null;
	return {
		procedure: { id: q.procedure, title: (latest.procedure as unknown as { title: string }).title },
		checkpoints: measures,
		checkpoint,
		unit: series.limits?.unit ?? null,
		lsl: series.limits?.lsl ?? null,
		usl: series.limits?.usl ?? null,
		points: series.points,
		otherLimits: series.other,
		stats: stats ? { ...stats, minReadings: MIN_READINGS_FOR_INDICES } : null,
		stepTimes: await stepTimes(em, q.procedure, model),
		versions: await versionRates(em, q.procedure)
	};
}

interface Limits {
	unit: string;
	lsl: number | null;
	usl: number | null;
	key: string;
}

/**
 * The individual readings (`reading-N`, not ovality or taper) of `checkpointId` in every sign-off of the procedure's
 * runs, in time order. Readings are kept in the series whose limits (entry unit, min, max) are the most common —
 * a repair stage or another unit has other limits and would not belong on the same chart.
 */
async function readings(em: EntityManager, procedureId: string, checkpointId: string) {
	const probe = JSON.stringify({ evaluation: [{ checkpointId, kind: 'measure' }] });
	const rows = await em
		.getConnection()
		.execute<{ run_id: string; server_time: Date; evaluation: unknown; job_number: string; version: number }[]>(
			`select l.run_id, l.server_time, l.body->'evaluation' as evaluation, j.job_number, pv.number as version
		from ledger_record l
		join run r on r.id = l.run_id
		join job j on j.id = r.job_id
		join procedure_version pv on pv.id = r.procedure_version_id
		where pv.procedure_id = ? and l.kind = 'signoff' and l.body @> ?::jsonb
		order by l.server_time asc, l.seq asc`,
			[procedureId, probe]
		);
	const all: (TrendPoint & { limits: Limits })[] = [];
	for (const row of rows) {
		const evaluations = Array.isArray(row.evaluation) ? (row.evaluation as Body[]) : [];
		const ev = evaluations.find((e) => e?.checkpointId === checkpointId);
		const lines = Array.isArray(ev?.readings) ? (ev.readings as Body[]) : [];
		for (const r of lines) {
			if (!str(r.key)?.startsWith('reading-')) continue;
			const value = toNum(str(r.value));
			if (value === undefined) continue;
			const l = (r.limitsInEntryUnit ?? r.limits ?? {}) as Body;
			const unit = str(r.unit) ?? str(l.unit) ?? '';
			const limits: Limits = {
				unit,
				lsl: toNum(str(l.min)) ?? null,
				usl: toNum(str(l.max)) ?? null,
				key: `${unit}|${str(l.min) ?? ''}|${str(l.max) ?? ''}`
			};
			all.push({
				at: new Date(row.server_time).toISOString(),
				value,
				text: `${str(r.value)} ${unit}`.trim(),
				label: str(r.label) ?? '',
				status: str(r.status) ?? '?',
				runId: row.run_id,
				jobNumber: row.job_number,
				version: Number(row.version),
				limits
			});
		}
	}
	const counts = new Map<string, number>();
	for (const p of all) counts.set(p.limits.key, (counts.get(p.limits.key) ?? 0) + 1);
	const top = [...counts.entries()].sort((a, b) => b[1] - a[1])[0]?.[0];
	const kept = all.filter((p) => p.limits.key === top);
	return {
		points: kept.map(({ limits: _limits, ...p }) => p),
		limits: kept[0]?.limits ?? null,
		other: all.length - kept.length
	};
}

/**
 * Actual minutes per step from server times: for each run, a step's time runs from the run's previous sign-off (or,
 * for the first step signed, from the run's start) to the step's sign-off. Median and mean over runs (the median is
 * the honest figure: a run left overnight makes one very long step). Rework runs are left out.
 */
async function stepTimes(em: EntityManager, procedureId: string, model: Procedure): Promise<StepTime[]> {
	const rows = await em
		.getConnection()
		.execute<{ run_id: string; started: Date; step_index: number | null; server_time: Date }[]>(
			`select l.run_id, r.created_at as started, (l.body->>'stepIndex')::int as step_index, l.server_time
		from ledger_record l
		join run r on r.id = l.run_id
		join procedure_version pv on pv.id = r.procedure_version_id
		where pv.procedure_id = ? and l.kind = 'signoff' and r.rework_of_id is null
		order by l.run_id, l.server_time, l.seq`,
			[procedureId]
		);
	const minutes = new Map<number, number[]>();
	let run = '';
	let prev = 0;
	for (const r of rows) {
		if (r.run_id !== run) {
			run = r.run_id;
			prev = new Date(r.started).getTime();
		}
		const t = new Date(r.server_time).getTime();
		if (r.step_index !== null) minutes.set(r.step_index, [...(minutes.get(r.step_index) ?? []), (t - prev) / 60_000]);
		prev = t;
	}
	return model.steps.map((s) => {
		const xs = minutes.get(s.index) ?? [];
		return {
			step: s.index + 1,
			title: s.title,
			estimate: s.minutes ?? null,
			n: xs.length,
			median: round(median(xs)),
			mean: round(xs.length ? xs.reduce((a, x) => a + x, 0) / xs.length : null)
		};
	});
}

/**
 * Per version: runs (rework runs left out), the share with at least one finding, and the comeback rate — the share
 * of the jobs with a run of this version that a later job names as its previous job (the unit came back).
 */
async function versionRates(em: EntityManager, procedureId: string): Promise<VersionRate[]> {
	const rows = await em
		.getConnection()
		.execute<{ number: number; runs: string; with_findings: string; jobs: string; comebacks: string }[]>(
			`select pv.number,
			count(distinct r.id) as runs,
			count(distinct r.id) filter (
				where exists (select 1 from ledger_record f where f.run_id = r.id and f.kind = 'finding')
			) as with_findings,
			count(distinct r.job_id) as jobs,
			count(distinct r.job_id) filter (
				where exists (select 1 from job c where c.previous_job_id = r.job_id)
			) as comebacks
		from procedure_version pv
		left join run r on r.procedure_version_id = pv.id and r.rework_of_id is null
		where pv.procedure_id = ?
		group by pv.number order by pv.number`,
			[procedureId]
		);
	return rows.map((r) => {
		const runs = Number(r.runs);
		const jobs = Number(r.jobs);
		return {
			version: Number(r.number),
			runs,
			runsWithFindings: Number(r.with_findings),
			findingRate: runs ? Number(r.with_findings) / runs : null,
			jobs,
			comebacks: Number(r.comebacks),
			comebackRate: jobs ? Number(r.comebacks) / jobs : null
		};
	});
}

/** The procedures to choose from (every procedure with a published version), by title. */
export async function trendProcedures(em: EntityManager): Promise<{ id: string; title: string }[]> {
	return em
		.getConnection()
		.execute<{ id: string; title: string }[]>(
			`select p.id, p.title from procedure p where exists (select 1 from procedure_version pv where pv.procedure_id = p.id) order by p.title`
		);
}
