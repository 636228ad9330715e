import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AdminLog } from '../../src/lib/server/db/entities';
import { getRun, maySee } from '../../src/lib/server/services/runs.service';
import { runnerView } from '../../src/lib/server/services/runner.service';
import * as runs from '../../src/lib/server/repositories/runs';
import { latestHandover } from '../../src/lib/server/services/run-records';
import { makePerson } from '../factories/people';
import { magnet, runState, submitAs, threeStepRun, viewer } from '../factories/run-records';
import { PIN, qualify, record } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

describe('handover at the end of a shift', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	it('pauses the run with the note and both names; the next record resumes it', async () => {
		const em = orm.em.fork();
		const { tech, lead, runId } = await threeStepRun(em);
		const next = await makePerson(em, { roles: ['technician'], pin: PIN, name: 'Night Technician' });
		await qualify(em, next, lead);
		// Before the handover the next technician does not see the run.
		expect((await getRun(orm.em.fork(), viewer(next), runId)).ok).toBe(false);
		const h = record(runId, tech, 'handover', {
			note: 'Bore 1 measured twice; pan gasket on the bench.',
			toId: next.id
		});
		const [a] = await submitAs(orm, tech, runId, [h], [tech]);
		expect(a.status).toBe('accepted');
		expect(await runState(orm, tech, runId)).toBe('paused');
		// Handed over to them: now it is one of their own runs, and the runner shows the note with both names.
		const view = await runnerView(orm.em.fork(), viewer(next), runId);
		if (!view.ok) throw new Error(view.message);
		expect(latestHandover(view.value.run.records)).toMatchObject({
			id: h.id,
			note: 'Bore 1 measured twice; pan gasket on the bench.',
			from: { id: tech.id, name: tech.name },
			to: { id: next.id, name: 'Night Technician' },
			takenUpBy: null
		});
		const [s] = await submitAs(orm, next, runId, [record(runId, next, 'signoff', magnet)], [next]);
		expect(s.status).toBe('accepted');
		expect(await runState(orm, next, runId)).toBe('in_progress');
		const after = await getRun(orm.em.fork(), viewer(next), runId);
		if (!after.ok) throw new Error(after.message);
		expect(latestHandover(after.value.records)?.takenUpBy).toEqual({
			id: next.id,
			name: 'Night Technician'
		});
		const log = await orm.em
			.fork()
			.find(AdminLog, { subjectId: runId, action: { $in: ['run.paused', 'run.resumed'] } });
		expect(log.map((l) => [l.action, l.actorId])).toEqual([
			['run.paused', tech.id],
			['run.resumed', next.id]
		]);
	});

	it('defines own runs: assigned, signed in, or handed over to — not other technicians', async () => {
		const em = orm.em.fork();
		const { tech, lead, runId } = await threeStepRun(em);
		const stranger = await makePerson(em, { roles: ['technician'], pin: PIN });
		const receiver = await makePerson(em, { roles: ['technician'], pin: PIN });
		const row = (await runs.findById(orm.em.fork(), runId))!;
		expect(await maySee(orm.em.fork(), viewer(tech), row)).toBe(true);
		expect(await maySee(orm.em.fork(), viewer(lead), row)).toBe(true);
		expect(await maySee(orm.em.fork(), viewer(receiver), row)).toBe(false);
		await submitAs(
			orm,
			tech,
			runId,
			[record(runId, tech, 'handover', { note: 'Over to you.', toId: receiver.id })],
			[tech]
		);
		expect(await maySee(orm.em.fork(), viewer(receiver), row)).toBe(true);
		expect(await maySee(orm.em.fork(), viewer(stranger), row)).toBe(false);
	});

	it('refuses a handover with no note, to oneself, to a non-worker, and of a run already paused', async () => {
		const em = orm.em.fork();
		const { tech, quality, runId } = await threeStepRun(em);
		const ho = (body: unknown) => record(runId, tech, 'handover', body);
		const [empty] = await submitAs(orm, tech, runId, [ho({ note: '  ' })], [tech]);
		expect(empty.reason).toBe('body.note: Write a handover note for whoever continues.');
		const [self] = await submitAs(orm, tech, runId, [ho({ note: 'x', toId: tech.id })], [tech]);
		expect(self.reason).toBe('Hand the run over to someone else than yourself.');
		const [toQuality] = await submitAs(orm, tech, runId, [ho({ note: 'x', toId: quality.id })], [tech]);
		expect(toQuality.reason).toBe('The person taking over is not an active technician or lead.');
		const [byQuality] = await submitAs(
			orm,
			tech,
			runId,
			[record(runId, quality, 'handover', { note: 'x' })],
			[quality]
		);
		expect(byQuality.reason).toBe('A handover is signed by the technician or lead leaving the run.');
		expect((await submitAs(orm, tech, runId, [ho({ note: 'End of shift.' })], [tech]))[0].status).toBe('accepted');
		const [twice] = await submitAs(orm, tech, runId, [ho({ note: 'Again.' })], [tech]);
		expect(twice.reason).toBe(
			'The run is already handed over: record on it to take it up before handing it over again.'
		);
		expect(await runState(orm, tech, runId)).toBe('paused');
	});
});
