import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listRuns, runListQuerySchema } from '../../src/lib/server/services/run-list.service';
import { makePerson } from '../factories/people';
import { magnet, submitAs, threeStepRun, viewer } from '../factories/run-records';
import { PIN, qualify, record } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

describe('GET /api/runs: the run list', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	const q = (over: Record<string, unknown> = {}) => runListQuerySchema.parse(over);

	it('gives a technician their own runs only: assigned, signed in, or handed over to them', async () => {
		const em = orm.em.fork();
		const a = await threeStepRun(em); // assigned to a.tech
		const b = await threeStepRun(em); // assigned to b.tech
		const c = await threeStepRun(em);
		const helper = await makePerson(em, { roles: ['technician'], pin: PIN, name: 'Helper' });
		await qualify(em, helper, a.lead);
		// helper signs on run b, and run c is handed over to them; run a is not theirs.
		await submitAs(orm, b.tech, b.runId, [record(b.runId, helper, 'signoff', magnet)], [helper]);
		await submitAs(
			orm,
			c.tech,
			c.runId,
			[record(c.runId, c.tech, 'handover', { note: 'Yours.', toId: helper.id })],
			[c.tech]
		);
		const mine = await listRuns(orm.em.fork(), viewer(helper), q({ limit: '200' }));
		expect(mine.runs.map((r) => r.id).sort()).toEqual([b.runId, c.runId].sort());
		expect(mine.total).toBe(2);
		const own = await listRuns(orm.em.fork(), viewer(a.tech), q());
		// makeRun's own run and the three-step run, both assigned to a.tech; none of b's or c's.
		expect(own.runs).toHaveLength(2);
		expect(own.runs.map((r) => r.id)).toContain(a.runId);
		expect(own.runs.every((r) => r.assignedTo.id === a.tech.id && r.state === 'in_progress')).toBe(true);
		// A technician's filter narrows within their own runs, never widens them.
		const other = await listRuns(orm.em.fork(), viewer(a.tech), q({ assignedTo: b.tech.id }));
		expect(other.runs).toEqual([]);
	});

	it('gives leads and quality every run, filtered by state, job and assignee, paginated', async () => {
		const em = orm.em.fork();
		const a = await threeStepRun(em);
		const b = await threeStepRun(em);
		await submitAs(orm, b.tech, b.runId, [record(b.runId, b.tech, 'handover', { note: 'Shift end.' })], [b.tech]);
		const paused = await listRuns(orm.em.fork(), viewer(a.quality), q({ state: 'paused', limit: '200' }));
		expect(paused.runs.map((r) => r.id)).toContain(b.runId);
		expect(paused.runs.map((r) => r.id)).not.toContain(a.runId);
		const byJob = await listRuns(orm.em.fork(), viewer(a.lead), q({ jobId: a.jobId }));
		expect(byJob.runs.map((r) => r.id)).toEqual(expect.arrayContaining([a.runId]));
		expect(byJob.runs.every((r) => r.jobId === a.jobId)).toBe(true);
		const byTech = await listRuns(orm.em.fork(), viewer(a.lead), q({ assignedTo: b.tech.id }));
		expect(byTech.runs.map((r) => r.id).sort()).toEqual(
			byTech.runs
				.filter((r) => r.assignedTo.id === b.tech.id)
				.map((r) => r.id)
				.sort()
		);
		expect(byTech.runs.map((r) => r.id)).toContain(b.runId);
		const page1 = await listRuns(orm.em.fork(), viewer(a.lead), q({ limit: '1' }));
		const page2 = await listRuns(orm.em.fork(), viewer(a.lead), q({ limit: '1', offset: '1' }));
		expect(page1.runs).toHaveLength(1);
		expect(page2.runs).toHaveLength(1);
		expect(page1.runs[0].id).not.toBe(page2.runs[0].id);
		expect(page1.total).toBeGreaterThanOrEqual(2);
	});

	it('refuses a bad query with a message per field', () => {
		const bad = runListQuerySchema.safeParse({ state: 'done', limit: '0', jobId: 'x', extra: '1' });
		expect(bad.success).toBe(false);
		const messages = bad.error!.issues.map((i) => `${i.path.join('.') || '_'}: ${i.message}`);
		expect(messages).toEqual(
			expect.arrayContaining([
				expect.stringMatching(/^state: state is one of in_progress, paused, awaiting_review/),
				'jobId: jobId is a job id.',
				'limit: limit is at least 1.'
			])
		);
	});
});
