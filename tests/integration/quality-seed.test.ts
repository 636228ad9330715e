import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedDemo } from '../../src/lib/server/db/seed';
import { verifyRun } from '../../src/lib/server/services/audit.service';
import { listFindings } from '../../src/lib/server/services/dispositions.service';
import { migratedAppOrm } from './support/orm';

describe('quality demo seed', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	it('leaves one run awaiting review with an open bore finding, its chain intact; a second seed adds nothing', async () => {
		await seedDemo(orm.em.fork());
		const open = (await listFindings(orm.em.fork(), 'open')).filter((f) => f.text.startsWith('Bore 1 reads 22.034 mm'));
		expect(open).toHaveLength(1);
		const [run] = await orm.em
			.fork()
			.execute<{ state: string; record_count: number }[]>('select state, record_count from run where id = ?', [
				open[0].runId
			]);
		expect(run).toEqual({ state: 'awaiting_review', record_count: 5 });
		expect(await verifyRun(orm.em.fork(), open[0].runId)).toMatchObject({ ok: true, count: 5 });
		await seedDemo(orm.em.fork());
		expect(
			(await listFindings(orm.em.fork(), 'open')).filter((f) => f.text.startsWith('Bore 1 reads 22.034'))
		).toHaveLength(1);
	});
});
