/**
 * The submit route's fast path (one round trip per attempt/finding, see `ledger.lockAndAppendIfHead`) must keep every
 * rule the full path keeps: a chain that verifies, the run's head on its last record, duplicates answered as such,
 * a reused id refused, a moved run refused, and concurrent batches to one run serialised by the row lock.
 */
import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { verifyChain } from '../../src/lib/ledger/chain';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import { sealNext } from '../../src/lib/server/ledger-hash';
import { Run, type IUser } from '../../src/lib/server/db/entities';
import * as adminLog from '../../src/lib/server/repositories/admin-log';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords, type SubmitOptions } from '../../src/lib/server/services/submit.service';
import { revoke } from '../../src/lib/server/services/devices.service';
import * as held from '../../src/lib/server/repositories/held-records';
import { makeTablet } from '../factories/devices';
import { boreAttempt, makeRun, PIN, record } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

describe('submit route fast path', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	async function submit(actor: IUser, runId: string, records: unknown[], opts?: SubmitOptions) {
		const batch = submitBatchSchema.parse({ records, pins: { [actor.id]: PIN } });
		const r = await submitRecords(orm.em.fork(), viewer(actor), runId, batch, opts);
		if (!r.ok) throw new Error(r.message);
		return r.value.answers;
	}
	const stored = async (runId: string) => (await ledger.listForRun(orm.em.fork(), runId)).map(ledger.toStored);

	it('stores a batch of attempts as a chain that verifies, bodies with quotes and question marks intact', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const odd = { ...boreAttempt('22.010'), note: `it's a ? and \\? and $1 "x" ; select 1` };
		const sent = [
			...Array.from({ length: 5 }, () => record(runId, tech, 'attempt', boreAttempt('22.010'))),
			record(runId, tech, 'attempt', odd)
		];
		const answers = await submit(tech, runId, sent);
		expect(answers.map((a) => [a.status, a.seq])).toEqual([1, 2, 3, 4, 5, 6].map((n) => ['accepted', n]));
		const rows = await stored(runId);
		expect(verifyChain(rows)).toMatchObject({ ok: true, count: 6 });
		expect((rows[5].body as { note: string }).note).toBe(odd.note);
		const run = await orm.em.fork().findOneOrFail(Run, { id: runId });
		expect([run.recordCount, run.headHash]).toEqual([6, rows[5].hash]);
	});

	it('answers a resend in the same batch or a later one as a duplicate, and refuses an id reused for other content', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const a = record(runId, tech, 'attempt', boreAttempt('22.010'));
		const [first, again] = await submit(tech, runId, [a, a]);
		expect(first).toMatchObject({ status: 'accepted', seq: 1 });
		expect(again).toEqual({ id: a.id, status: 'duplicate', seq: 1, hash: first.hash });
		const [later, reused] = await submit(tech, runId, [a, { ...a, body: boreAttempt('22.015') }]);
		expect(later).toMatchObject({ status: 'duplicate', seq: 1 });
		expect(reused).toMatchObject({ status: 'refused', reason: expect.stringContaining('already used') });
		expect(await stored(runId)).toHaveLength(1);
	});

	it('refuses an attempt on a run a lead moved to a newer version', async () => {
		const { tech, lead, runId } = await makeRun(orm.em.fork());
		expect((await submit(tech, runId, [record(runId, tech, 'attempt', boreAttempt('22.010'))]))[0].status).toBe(
			'accepted'
		);
		const em = orm.em.fork();
		const newRunId = uuidv7();
		adminLog.append(em, lead, {
			action: 'run.version_decision',
			subjectType: 'run',
			subjectId: runId,
			detail: { decision: 'move', fromVersion: 1, toVersion: 2, newRunId }
		});
		await em.flush();
		const [answer] = await submit(tech, runId, [record(runId, tech, 'attempt', boreAttempt('22.010'))]);
		expect(answer).toMatchObject({
			status: 'refused',
			reason: `${lead.name} moved this run to version 2 (run ${newRunId}): record on that run.`
		});
		expect(await stored(runId)).toHaveLength(1);
	});

	it('serialises concurrent batches to one run on its row lock: every record stored once, one chain', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const batches = Array.from({ length: 4 }, () =>
			Array.from({ length: 10 }, () => record(runId, tech, 'attempt', boreAttempt('22.010')))
		);
		const answers = (await Promise.all(batches.map((b) => submit(tech, runId, b)))).flat();
		expect(answers.every((a) => a.status === 'accepted')).toBe(true);
		expect(new Set(answers.map((a) => a.seq)).size).toBe(40);
		const rows = await stored(runId);
		expect(verifyChain(rows)).toMatchObject({ ok: true, count: 40 });
	});

	it('honours a tablet revoked in the middle of a batch: its row is cached for the batch, each append checks it again', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead, 'Bench 6 tablet');
		const sent = [
			await tablet.sign(record(runId, tech, 'attempt', boreAttempt('22.010'))),
			await tablet.sign(record(runId, tech, 'attempt', boreAttempt('22.012'))), // the fast path
			await tablet.sign(record(runId, tech, 'signoff', boreAttempt('22.010'))) // the full path
		];
		const afterRecord = async (_a: unknown, i: number) => {
			if (i === 0)
				await revoke(orm.em.fork(), lead, { deviceId: tablet.device.id, reason: 'Dropped in the parts washer' });
		};
		const answers = await submit(tech, runId, sent, { afterRecord });
		expect(answers.map((a) => a.status)).toEqual(['accepted', 'refused', 'refused']);
		for (const a of answers.slice(1))
			expect(a.reason).toMatch(/Tablet “Bench 6 tablet” was revoked on \d{4}-\d{2}-\d{2}.*held for the quality lead/);
		expect((await stored(runId)).map((r) => r.id)).toEqual([sent[0].id]);
		const rows = await held.list(orm.em.fork(), { runId });
		expect(rows.map((r) => [r.held.recordId, r.held.reason]).sort()).toEqual(
			[
				[sent[1].id, 'device_revoked'],
				[sent[2].id, 'device_revoked']
			].sort()
		);
	});

	it('the fast append stores nothing for a revoked tablet, and its statement says so (no write, no error)', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const a = await tablet.sign(record(runId, tech, 'attempt', boreAttempt('22.010')));
		expect((await submit(tech, runId, [a]))[0].status).toBe('accepted');
		const run = await orm.em.fork().findOneOrFail(Run, { id: runId });
		const head = { headHash: run.headHash ?? null, recordCount: run.recordCount, state: run.state, reworkSteps: null };
		const moved = {
			action: 'run.version_decision',
			subjectType: 'run',
			subjectId: runId,
			detail: { decision: 'move' }
		};
		const head0 = run.headHash ? { runId, seq: run.recordCount, hash: run.headHash } : null;
		const next = (id: string) => sealNext(head0, { id, runId, kind: 'attempt', body: boreAttempt('22.010') });
		const columns = {
			submissionHash: 'e'.repeat(64),
			signerId: tech.id,
			signerRole: 'technician',
			deviceId: tablet.device.id,
			deviceTime: null,
			serverTime: new Date(),
			engineVersion: 'test',
			signedOffline: false
		};
		await revoke(orm.em.fork(), lead, { deviceId: tablet.device.id, reason: 'Lost' });
		const guard = { unlessLogged: moved, activeDevice: tablet.device.id };
		expect(await ledger.lockAndAppendIfHead(orm.em.fork(), next(uuidv7()), columns, head, guard)).toBe(false);
		expect(await stored(runId)).toHaveLength(1);
		// The same statement for a tablet still enrolled (none named) stores the record.
		const ok = { unlessLogged: moved, activeDevice: null };
		expect(await ledger.lockAndAppendIfHead(orm.em.fork(), next(uuidv7()), columns, head, ok)).toBe(true);
		expect(await stored(runId)).toHaveLength(2);
	});
});
