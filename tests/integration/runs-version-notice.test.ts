import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IProcedure, IUser } from '../../src/lib/server/db/entities';
import * as adminLog from '../../src/lib/server/repositories/admin-log';
import * as procedures from '../../src/lib/server/repositories/procedures';
import * as runsRepo from '../../src/lib/server/repositories/runs';
import * as library from '../../src/lib/server/services/procedures.service';
import { decideVersion, versionNotice } from '../../src/lib/server/services/run-versions.service';
import { runsOfJob } from '../../src/lib/server/services/runner.service';
import { getRun } from '../../src/lib/server/services/runs.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { makePerson } from '../factories/people';
import { boreAttempt, makeRun, PIN, record } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

describe('a newer published version while a run is in progress', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	/** v1 with a run on it (makeRun), then v2 written by the run's lead and approved by a second lead. */
	async function runThenV2() {
		const made = await makeRun(orm.em.fork());
		const procedureId = (made.version.procedure as unknown as IProcedure).id;
		const lead2 = await makePerson(orm.em.fork(), { roles: ['lead'], pin: PIN, name: 'Second Lead' });
		const source = (await procedures.findVersion(orm.em.fork(), procedureId, 1))!.source;
		const saved = await library.saveDraft(orm.em.fork(), viewer(made.lead), procedureId, {
			source: source + '\nWipe the bore with a lint-free cloth first.\n'
		});
		if (!saved.ok) throw new Error(saved.message);
		const sub = await library.submit(orm.em.fork(), viewer(made.lead), procedureId);
		if (!sub.ok) throw new Error(sub.message);
		const ap = await library.approve(orm.em.fork(), viewer(lead2), procedureId, {
			changeNote: 'Clean the bore first.'
		});
		if (!ap.ok) throw new Error(ap.message);
		const v2 = (await procedures.findVersion(orm.em.fork(), procedureId, 2))!;
		return { ...made, lead2, procedureId, v2 };
	}
	const noticeOf = async (u: IUser, runId: string) =>
		versionNotice(orm.em.fork(), viewer(u), (await runsRepo.findById(orm.em.fork(), runId))!);

	it('shows no notice while the run is on the newest version', async () => {
		const { lead, runId } = await makeRun(orm.em.fork());
		expect(await noticeOf(lead, runId)).toBeNull();
	});

	it('reports v2 on a run still on v1; only a lead or admin may decide', async () => {
		const { lead, tech, runId, v2, jobId } = await runThenV2();
		const n = await noticeOf(lead, runId);
		expect(n).toMatchObject({
			runVersion: 1,
			newer: { id: v2.id, number: 2, changeNote: 'Clean the bore first.' },
			decision: null,
			canDecide: true
		});
		expect((await noticeOf(tech, runId))?.canDecide).toBe(false);
		expect(
			await decideVersion(orm.em.fork(), viewer(tech), runId, { decision: 'move', toVersionId: v2.id })
		).toMatchObject({ ok: false, status: 403 });
		const [row] = await runsOfJob(orm.em.fork(), viewer(lead), jobId);
		expect(row.versionNote).toBe('version 2 published: a lead decides whether this run continues or moves');
	});

	it('records "continue" in the admin log and the notice then says who decided', async () => {
		const { lead, lead2, runId, v2 } = await runThenV2();
		expect(
			await decideVersion(orm.em.fork(), viewer(lead2), runId, { decision: 'continue', toVersionId: v2.id })
		).toMatchObject({ ok: true, value: { decision: 'continue', runId } });
		const [entry] = await adminLog.forSubject(orm.em.fork(), 'run.version_decision', 'run', runId);
		expect(entry).toMatchObject({ actorId: lead2.id, detail: { decision: 'continue', fromVersion: 1, toVersion: 2 } });
		expect(await noticeOf(lead, runId)).toMatchObject({
			decision: { decision: 'continue', by: 'Second Lead', toVersion: 2 },
			canDecide: false
		});
		// Deciding about a version other than the newest (a stale screen) is refused.
		expect(
			await decideVersion(orm.em.fork(), viewer(lead), runId, { decision: 'move', toVersionId: runId })
		).toMatchObject({ ok: false, status: 409, message: expect.stringMatching(/Version 2 is now the newest/) });
	});

	it('"move" starts a run on v2 for the same job and assignee; the old run then refuses records', async () => {
		const { lead, tech, runId, v2, jobId } = await runThenV2();
		const moved = await decideVersion(orm.em.fork(), viewer(lead), runId, { decision: 'move', toVersionId: v2.id });
		if (!moved.ok) throw new Error(moved.message);
		const newRun = await getRun(orm.em.fork(), viewer(lead), moved.value.runId);
		if (!newRun.ok) throw new Error(newRun.message);
		expect(newRun.value).toMatchObject({
			jobId,
			versionNumber: 2,
			contentHash: v2.contentHash,
			assignedTo: { id: tech.id },
			state: 'in_progress'
		});
		const [entry] = await adminLog.forSubject(orm.em.fork(), 'run.version_decision', 'run', runId);
		expect(entry.detail).toMatchObject({ decision: 'move', toVersion: 2, newRunId: moved.value.runId });
		expect(await noticeOf(lead, runId)).toMatchObject({ decision: { decision: 'move', newRunId: moved.value.runId } });
		expect(await noticeOf(lead, moved.value.runId)).toBeNull();
		expect(
			await decideVersion(orm.em.fork(), viewer(lead), runId, { decision: 'move', toVersionId: v2.id })
		).toMatchObject({ ok: false, status: 409 });

		const submit = async (id: string) => {
			const batch = submitBatchSchema.parse({
				records: [record(id, tech, 'signoff', boreAttempt('22.010'))],
				pins: { [tech.id]: PIN }
			});
			const r = await submitRecords(orm.em.fork(), viewer(tech), id, batch);
			if (!r.ok) throw new Error(r.message);
			return r.value.answers[0];
		};
		expect(await submit(runId)).toMatchObject({
			status: 'refused',
			reason: `Test Lead moved this run to version 2 (run ${moved.value.runId}): record on that run.`
		});
		expect(await submit(moved.value.runId)).toMatchObject({ status: 'accepted', seq: 1 });
	});
});
