import { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { ormOptions } from '../../mikro-orm.config';
import { Job, LedgerRecord, Procedure, Run } from '../../src/lib/server/db/entities';
import { seedDemo } from '../../src/lib/server/db/seed';
import { seedHistory } from '../../src/lib/server/history-seed';
import * as tools from '../../src/lib/server/repositories/tools';
import { verifyAll } from '../../src/lib/server/services/audit.service';
import { runSearchSchema, searchRuns, suspectTool } from '../../src/lib/server/services/search.service';
import { trends } from '../../src/lib/server/services/trends.service';
import { migrateDb } from './support/migrate';
import { scratchDatabase } from './support/scratch-db';

// An empty database of its own: the demo library is published only into an empty one, as at a first `npm start`.
const db = scratchDatabase('benchstamp_hist');

describe('demo history seed', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		await db.create();
		await migrateDb(db.ownerUrl, db.appUrl);
		orm = await MikroORM.init(ormOptions(db.appUrl));
		const warn = vi.spyOn(console, 'warn');
		try {
			await seedDemo(orm.em.fork());
			// The seed has no mail transport and waits for what it started: no "review mail not sent" after it.
			expect(warn.mock.calls.filter((c) => /mail/i.test(String(c[0])))).toEqual([]);
		} finally {
			warn.mockRestore();
		}
	}, 120_000);
	afterAll(async () => {
		await orm?.close(true);
		await db.drop();
	});

	const procedureId = async (title: string) => (await orm.em.fork().findOneOrFail(Procedure, { title })).id;

	it('every seeded chain verifies intact, and a second seed changes nothing', async () => {
		const em = orm.em.fork();
		const before = { runs: await em.count(Run, {}), records: await em.count(LedgerRecord, {}) };
		expect(before.runs).toBeGreaterThanOrEqual(50);
		const v = await verifyAll(orm.em.fork());
		expect(v.failures).toEqual([]);
		expect(v.intact).toBe(v.runs);
		expect(v.records).toBe(before.records);
		expect(await seedHistory(orm.em.fork())).toEqual({ created: 0 });
		expect(await em.count(LedgerRecord, {})).toBe(before.records);
	});

	it('gives at least 30 signed readings per measure checkpoint, Ppk shown, and a comeback', async () => {
		const id = await procedureId('Valve body teardown and shift-piston bore inspection');
		for (const checkpoint of ['bore-1', 'piston-1']) {
			const t = (await trends(orm.em.fork(), { procedure: id, checkpoint }))!;
			expect(t.points.length).toBeGreaterThanOrEqual(30);
			expect(t.points.every((p) => p.status === 'pass')).toBe(true);
			expect(t.stats?.ppk).toBeGreaterThan(0);
			expect(t.stats?.withheld).toBeNull();
		}
		const bore = (await trends(orm.em.fork(), { procedure: id, checkpoint: 'bore-1' }))!;
		// 22 mm H7: 22.000 to 22.021 mm (ISO 286-2, IT7 = 21 µm for 18–30 mm).
		expect([bore.lsl, bore.usl]).toEqual([22, 22.021]);
		// The slow drift upward: the last ten readings' mean above the first ten's.
		const mean = (xs: number[]) => xs.reduce((a, x) => a + x, 0) / xs.length;
		expect(mean(bore.points.slice(-10).map((p) => p.value))).toBeGreaterThan(
			mean(bore.points.slice(0, 10).map((p) => p.value))
		);
		expect(bore.versions[0].comebacks).toBe(1);
		const comeback = await orm.em
			.fork()
			.findOneOrFail(Job, { serialKey: 'KTX7091755310', state: 'in_work' }, { populate: ['previousJob'] });
		expect(comeback.previousJob?.state).toBe('released');
		expect(bore.stepTimes.every((s) => s.n === 34)).toBe(true);
	});

	it('TW-019 failed its latest calibration; its suspect list is the runs it tightened, and lot trace answers', async () => {
		const em = orm.em.fork();
		const tw019 = (await tools.findByAssetTag(em, 'TW-019'))!;
		const s = (await suspectTool(em, tw019.id))!;
		expect(s.failures).toHaveLength(1);
		expect(s.lastGood).not.toBeNull();
		// 34 valve-body runs, one in three (i % 3 = 0: 12 runs) on TW-014: 22 on TW-019.
		expect(s.runs).toHaveLength(22);
		expect(s.runs.every((r) => r.steps.length === 1 && r.steps[0].startsWith('Step 6'))).toBe(true);
		const lot = await searchRuns(em, runSearchSchema.parse({ lot: 'L26-0587' }));
		// Filters runs i = 2, 5, 8, 11 took the suction filter from lot L26-0587.
		expect(lot.total).toBe(4);
		expect(lot.runs.every((r) => r.lotMatches[0]?.partNumber === 'KL-7710-01A')).toBe(true);
		const serial = await searchRuns(em, runSearchSchema.parse({ lot: 'PS26110452' }));
		expect(serial.runs.map((r) => r.lotMatches[0]?.serial)).toEqual(['PS26110452']);
	});
});
