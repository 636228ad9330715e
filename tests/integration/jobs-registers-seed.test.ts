import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Job, JobStateChange, PartLot, Qualification, Tool, User } from '../../src/lib/server/db/entities';
import { seedDemo } from '../../src/lib/server/db/seed';
import { isQualified } from '../../src/lib/server/repositories/qualifications';
import * as tools from '../../src/lib/server/repositories/tools';
import { migratedAppOrm } from './support/orm';

describe('demo seed of the registers', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	const counts = async () => {
		const em = orm.em.fork();
		return {
			tools: await em.count(Tool, { assetTag: { $in: ['TW-014', 'TW-031', 'MC-007'] } }),
			jobs: await em.count(Job, { intakeNotes: 'Demo job (invented customer and unit).' }),
			changes: await em.count(JobStateChange, {}),
			lots: await em.count(PartLot, {}),
			training: await em.count(Qualification, {})
		};
	};

	it('seeds the demo cases once; a second run changes nothing', async () => {
		await seedDemo(orm.em.fork());
		const first = await counts();
		expect(first.tools).toBe(3);
		expect(first.jobs).toBe(6);
		await seedDemo(orm.em.fork());
		expect(await counts()).toEqual(first);

		const em = orm.em.fork();
		const blocked = (await tools.listWithStatus(em)).filter((t) => ['TW-031', 'MC-007'].includes(t.assetTag));
		expect(blocked.map((t) => [t.assetTag, t.status.usable ? 'usable' : t.status.reason])).toEqual([
			['MC-007', 'out_of_tolerance'],
			['TW-031', 'past_due']
		]);
		const comeback = await em.findOne(
			Job,
			{ complaint: 'The shudder is back, worse when warm.' },
			{ populate: ['previousJob'] }
		);
		expect(comeback?.previousJob?.complaint).toBe('Shudder when pulling away in first and reverse.');
		const tech2 = await em.findOneOrFail(User, { email: 'tech2@example.com' });
		expect(await isQualified(em, tech2.id, 'valve-body rebuild')).toBe(true);
		expect(await isQualified(em, tech2.id, 'transmission control adaptation')).toBe(false);
	});
});
