import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { runSearchSchema, searchRuns } from '../../src/lib/server/services/search.service';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { makeTraceFixture, signTraceRun, type TraceFixture } from '../factories/audit';
import { PIN, record, viewer } from '../factories/runs';
import { migratedAppOrm, ownerOrm } from './support/orm';

const DAY = 86_400_000;
const day = (d: Date) => d.toISOString().slice(0, 10);

/** What `run_summary` and `run_signer_day` must say about a run: its records' aggregate, read from the ledger. */
async function fromLedger(orm: MikroORM, runId: string) {
	const [agg] = await orm.em.fork().execute<{ first_at: string; last_at: string; findings: string }[]>(
		`select min(server_time) as first_at, max(server_time) as last_at, count(*) filter (where kind = 'finding') as findings
			from ledger_record where run_id = ?`,
		[runId]
	);
	const days = await orm.em.fork().execute<{ signer_id: string; day: string }[]>(
		`select distinct signer_id, to_char(server_time at time zone 'UTC', 'YYYY-MM-DD') as day
			from ledger_record where run_id = ? and signer_id is not null order by 1, 2`,
		[runId]
	);
	return {
		first: new Date(agg.first_at).toISOString(),
		last: new Date(agg.last_at).toISOString(),
		findings: Number(agg.findings),
		days
	};
}

async function fromSummary(orm: MikroORM, runId: string) {
	const [s] = await orm.em
		.fork()
		.execute<{ first_at: string; last_at: string; finding_count: number }[]>(
			`select first_at, last_at, finding_count from run_summary where run_id = ?`,
			[runId]
		);
	const days = await orm.em
		.fork()
		.execute<{ signer_id: string; day: string }[]>(
			`select signer_id, to_char(day, 'YYYY-MM-DD') as day from run_signer_day where run_id = ? order by 1, 2`,
			[runId]
		);
	return {
		first: new Date(s.first_at).toISOString(),
		last: new Date(s.last_at).toISOString(),
		findings: s.finding_count,
		days
	};
}

describe('run summary kept by the ledger trigger (real PostgreSQL)', () => {
	let orm: MikroORM;
	let f: TraceFixture;
	let runId = '';
	// Two batches on different UTC days: the first signs both steps, the second (by the lead) opens a finding.
	const first = new Date(Date.now() - 12 * DAY);
	const second = new Date(Date.now() - 3 * DAY);

	beforeAll(async () => {
		orm = await migratedAppOrm();
		f = await makeTraceFixture(orm.em.fork());
		({ runId } = await signTraceRun(orm.em.fork(), f, { lot: 'LOT-SUMMARY-1', at: first }));
		const batch = submitBatchSchema.parse({
			records: [record(runId, f.lead, 'finding', { stepIndex: 0, text: 'Light scoring seen at review.' })],
			pins: { [f.lead.id]: PIN }
		});
		const r = await submitRecords(orm.em.fork(), viewer(f.lead), runId, batch, { now: () => second });
		if (!r.ok) throw new Error(r.message);
		const refused = r.value.answers.find((a) => a.status !== 'accepted');
		if (refused) throw new Error(`record refused: ${refused.reason}`);
	});
	afterAll(() => orm.close(true));

	it('folds every appended batch into the run: first/last time, finding count, signer days', async () => {
		const expected = await fromLedger(orm, runId);
		expect(expected.findings).toBe(1);
		expect(expected.first).toBe(first.toISOString());
		expect(expected.last).toBe(second.toISOString());
		expect(expected.days).toEqual(
			[
				{ signer_id: f.tech.id, day: day(first) },
				{ signer_id: f.lead.id, day: day(second) }
			].sort((a, b) => a.signer_id.localeCompare(b.signer_id))
		);
		expect(await fromSummary(orm, runId)).toEqual(expected);
	});

	it('finds the run by signer and UTC day from the summary, and shows its times and findings', async () => {
		const search = (over: Record<string, unknown>) => searchRuns(orm.em.fork(), runSearchSchema.parse(over));
		const hit = await search({ signer: f.tech.id, from: day(first), to: day(first) });
		expect(hit.runs.map((r) => r.id)).toEqual([runId]);
		expect(hit.runs[0]).toMatchObject({ findings: 1, firstAt: first.toISOString(), lastAt: second.toISOString() });
		// The technician signed nothing on the day of the finding; the lead signed only then.
		expect((await search({ signer: f.tech.id, from: day(second), to: day(second) })).total).toBe(0);
		expect((await search({ signer: f.lead.id, from: day(first), to: day(first) })).total).toBe(0);
		expect((await search({ signer: f.lead.id, from: day(second) })).runs.map((r) => r.id)).toEqual([runId]);
	});

	it('lets the app role read the summary but never write it; the trigger that keeps it is enabled', async () => {
		const em = orm.em.fork();
		await expect(em.execute(`update run_summary set finding_count = 0 where run_id = ?`, [runId])).rejects.toThrow(
			/permission denied/
		);
		await expect(em.execute(`delete from run_signer_day where run_id = ?`, [runId])).rejects.toThrow(
			/permission denied/
		);
		const owner = await ownerOrm();
		try {
			const [t] = await owner.em
				.fork()
				.execute<{ tgenabled: string }[]>(
					`select tgenabled from pg_trigger where tgname = 'ledger_record_run_summary'`
				);
			expect(t.tgenabled).toBe('O');
		} finally {
			await owner.close(true);
		}
	});
});
