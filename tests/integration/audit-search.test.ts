import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addDays, isoDate } from '../../src/lib/registers/dates';
import * as tools from '../../src/lib/server/repositories/tools';
import { runSearchSchema, searchRuns, suspectTool } from '../../src/lib/server/services/search.service';
import { trends } from '../../src/lib/server/services/trends.service';
import { makeTraceFixture, signTraceRun, type TraceFixture } from '../factories/audit';
import { makeCalibratedTool, toolInput } from '../factories/registers';
import { migratedAppOrm } from './support/orm';

const DAY = 86_400_000;
const daysAgo = (n: number) => new Date(Date.now() - n * DAY);
const unique = () =>
	Date.now().toString(36).toUpperCase() +
	Math.floor(Math.random() * 1e6)
		.toString(36)
		.toUpperCase();
const toolInputFor = (kind: 'bore_gauge') => toolInput({ kind, unit: 'mm', rangeMin: '18', rangeMax: '35' });
const q = (over: Record<string, unknown>) => runSearchSchema.parse(over);

describe('audit search, lot trace and suspect tool (real PostgreSQL)', () => {
	let orm: MikroORM;
	let f: TraceFixture;
	const lotA = `L${unique()}`.slice(0, 12);
	const lotB = `M${unique()}`.slice(0, 12);
	const made: Record<string, { runId: string; jobNumber: string }> = {};
	let toolId = '';

	beforeAll(async () => {
		orm = await migratedAppOrm();
		const em = orm.em.fork();
		f = await makeTraceFixture(em);
		// A gauge calibrated 60 days ago (in), used 40 days ago, recalibrated 30 days ago (as found in: the last good
		// calibration), used 10 days ago and today, then found out of tolerance today.
		const tool = await makeCalibratedTool(em, {
			daysAgo: 60,
			dueInDays: 300,
			over: { kind: 'bore_gauge', unit: 'mm', rangeMin: '18', rangeMax: '35' }
		});
		toolId = tool.id;
		const today = isoDate();
		made.beforeWindow = await signTraceRun(em.fork(), f, { lot: lotA, toolId, at: daysAgo(40) });
		tools.addCalibration(
			em,
			tool,
			{ id: f.lead.id, name: f.lead.name },
			{
				kind: 'calibration',
				performedOn: addDays(today, -30),
				certificateNo: 'CERT-RECAL',
				asFound: 'in',
				asLeft: 'in',
				nextDueOn: addDays(today, 330),
				notes: ''
			}
		);
		await em.flush();
		made.inWindow1 = await signTraceRun(em.fork(), f, {
			lot: lotA,
			toolId,
			at: daysAgo(10),
			finding: 'Light scoring.'
		});
		made.noTool = await signTraceRun(em.fork(), f, { lot: lotB, at: daysAgo(5) });
		made.inWindow2 = await signTraceRun(em.fork(), f, { lot: lotB.toLowerCase(), toolId, at: daysAgo(1) });
		tools.addCalibration(
			em,
			tool,
			{ id: f.lead.id, name: f.lead.name },
			{
				kind: 'calibration',
				performedOn: today,
				certificateNo: 'CERT-FAIL',
				asFound: 'out',
				asLeft: 'in',
				nextDueOn: addDays(today, 365),
				notes: 'Read 0.004 mm high as found; adjusted.'
			}
		);
		await em.flush();
	});
	afterAll(() => orm.close(true));

	it('trace by lot returns exactly the units that received it (lot matched as typed, upper or lower case)', async () => {
		const a = await searchRuns(orm.em.fork(), q({ lot: lotA }));
		expect(a.total).toBe(2);
		expect(a.runs.map((r) => r.id).sort()).toEqual([made.beforeWindow.runId, made.inWindow1.runId].sort());
		expect(a.runs[0].lotMatches).toEqual([
			{ step: 2, checkpointId: 'filter', partNumber: 'KL-7710-01A', lot: lotA, serial: null }
		]);
		// lotB was typed once upper case and once lower case: both units received it.
		const b = await searchRuns(orm.em.fork(), q({ lot: lotB }));
		expect(b.runs.map((r) => r.id).sort()).toEqual([made.noTool.runId, made.inWindow2.runId].sort());
		expect((await searchRuns(orm.em.fork(), q({ lot: `${lotA}X` }))).total).toBe(0);
	});

	it('the suspect-tool query returns exactly the runs signed with the tool since its last good calibration', async () => {
		const s = (await suspectTool(orm.em.fork(), toolId))!;
		expect(s.lastGood).toEqual({ performedOn: addDays(isoDate(), -30), certificateNo: 'CERT-RECAL' });
		expect(s.since).toBe(`${addDays(isoDate(), -30)}T00:00:00.000Z`);
		expect(s.failures).toEqual([expect.objectContaining({ certificateNo: 'CERT-FAIL', kind: 'calibration' })]);
		expect(s.runs.map((r) => r.runId)).toEqual([made.inWindow2.runId, made.inWindow1.runId]);
		expect(s.records).toBe(2);
		expect(s.runs[0]).toMatchObject({ steps: ['Step 1: Measure the bore'], signers: [f.tech.name], records: 1 });
		expect(await suspectTool(orm.em.fork(), crypto.randomUUID())).toBeNull();
	});

	it('with no calibration found in tolerance on record, every record naming the tool is suspect', async () => {
		const em = orm.em.fork();
		// Arrived out of tolerance and was adjusted (as left in): usable, but never known good as found.
		const tool = tools.create(em, { ...toolInputFor('bore_gauge') });
		tools.addCalibration(
			em,
			tool,
			{ id: f.lead.id, name: f.lead.name },
			{
				kind: 'calibration',
				performedOn: addDays(isoDate(), -20),
				certificateNo: 'CERT-ARRIVED-OUT',
				asFound: 'out',
				asLeft: 'in',
				nextDueOn: addDays(isoDate(), 300),
				notes: ''
			}
		);
		await em.flush();
		const r = await signTraceRun(em.fork(), f, { lot: lotB, toolId: tool.id, at: daysAgo(2) });
		const s = (await suspectTool(orm.em.fork(), tool.id))!;
		expect(s.lastGood).toBeNull();
		expect(s.since).toBeNull();
		expect(s.failures.map((x) => x.certificateNo)).toEqual(['CERT-ARRIVED-OUT']);
		expect(s.runs.map((x) => x.runId)).toEqual([r.runId]);
	});

	it('filters by signer and dates, procedure and version, findings and serial', async () => {
		const em = orm.em.fork();
		const base = { procedure: f.procedureId };
		expect((await searchRuns(em, q(base))).total).toBeGreaterThanOrEqual(4);
		const signed = await searchRuns(
			em,
			q({ ...base, signer: f.tech.id, from: isoDate(daysAgo(11)), to: isoDate(daysAgo(4)) })
		);
		expect(signed.runs.map((r) => r.id).sort()).toEqual([made.inWindow1.runId, made.noTool.runId].sort());
		expect((await searchRuns(em, q({ ...base, signer: f.lead.id }))).total).toBe(0);
		const findings = await searchRuns(em, q({ ...base, findings: 'yes' }));
		expect(findings.runs.map((r) => r.id)).toEqual([made.inWindow1.runId]);
		expect(findings.runs[0].findings).toBe(1);
		expect((await searchRuns(em, q({ ...base, version: '1', findings: 'no' }))).runs.map((r) => r.id)).not.toContain(
			made.inWindow1.runId
		);
		expect((await searchRuns(em, q({ ...base, version: '2' }))).total).toBe(0);
		const run = (await searchRuns(em, q({ lot: lotA }))).runs.find((r) => r.id === made.inWindow1.runId)!;
		// Part of the serial, typed with other dashes and case, still finds the unit.
		const part = run.unitSerial.toLowerCase().replace(/-/g, ' ').slice(2);
		expect((await searchRuns(em, q({ serial: part }))).runs.map((r) => r.id)).toEqual([made.inWindow1.runId]);
	});

	it('sorts and pages, and counts every match', async () => {
		const em = orm.em.fork();
		const all = await searchRuns(em, q({ procedure: f.procedureId, sort: 'lastAt', dir: 'asc', limit: '100' }));
		const times = all.runs.map((r) => r.lastAt!);
		expect(times).toEqual([...times].sort());
		const p1 = await searchRuns(em, q({ procedure: f.procedureId, sort: 'lastAt', dir: 'asc', limit: '2' }));
		const p2 = await searchRuns(
			em,
			q({ procedure: f.procedureId, sort: 'lastAt', dir: 'asc', limit: '2', offset: '2' })
		);
		expect(p1.total).toBe(all.total);
		expect(p2.total).toBe(all.total);
		expect([...p1.runs, ...p2.runs].map((r) => r.id)).toEqual(all.runs.slice(0, 4).map((r) => r.id));
		// Every sort joins what it names: the same runs, counted the same, in its order.
		const ids = all.runs.map((r) => r.id).sort();
		for (const sort of ['jobNumber', 'unitSerial', 'procedure', 'technician', 'records', 'findings', 'firstAt']) {
			const got = await searchRuns(em, q({ procedure: f.procedureId, sort, dir: 'asc', limit: '100' }));
			expect(got.total, sort).toBe(all.total);
			expect(got.runs.map((r) => r.id).sort(), sort).toEqual(ids);
		}
		const byFindings = await searchRuns(
			em,
			q({ procedure: f.procedureId, sort: 'findings', dir: 'desc', limit: '100' })
		);
		const counts = byFindings.runs.map((r) => r.findings);
		expect(counts).toEqual([...counts].sort((a, b) => b - a));
		const byFirst = await searchRuns(em, q({ procedure: f.procedureId, sort: 'firstAt', dir: 'asc', limit: '100' }));
		const firsts = byFirst.runs.map((r) => r.firstAt!);
		expect(firsts).toEqual([...firsts].sort());
		const past = await searchRuns(em, q({ procedure: f.procedureId, offset: '500' }));
		expect(past.runs).toEqual([]);
		expect(past.total).toBe(all.total);
	});

	it('refuses bad queries with a message per field', () => {
		const r = runSearchSchema.safeParse({ from: '2026-13-01', to: 'x', version: '2', limit: '500', sort: 'hash' });
		expect(r.success).toBe(false);
		const paths = r.error!.issues.map((i) => i.path.join('.'));
		expect(paths).toEqual(expect.arrayContaining(['from', 'to', 'limit', 'sort']));
		const v = runSearchSchema.safeParse({ version: '2' });
		expect(v.error!.issues[0]).toMatchObject({
			path: ['version'],
			message: 'Choose the procedure the version belongs to.'
		});
	});

	it('trends read every signed bore reading against 22.000–22.021 mm with the step time', async () => {
		const t = (await trends(orm.em.fork(), { procedure: f.procedureId }))!;
		expect(t.checkpoint).toBe('bore-1');
		expect([t.lsl, t.usl, t.unit]).toEqual([22, 22.021, 'mm']);
		expect(t.points.length).toBeGreaterThanOrEqual(4);
		expect(t.points.every((p) => p.value === 22.01)).toBe(true);
		// Fewer than 25 readings: no indices.
		expect(t.stats).toMatchObject({ pp: null, ppk: null, mean: 22.01 });
		expect(t.stepTimes[0]).toMatchObject({ step: 1, estimate: 10 });
		expect(t.versions[0]).toMatchObject({ version: 1, comebacks: 0 });
		expect(t.versions[0].runsWithFindings).toBe(1);
	});
});
