import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../../mikro-orm.config';
import { seedDemo } from '../../src/lib/server/db/seed';

export async function runDemoSeed(appUrl: string): Promise<{ created: number }> {
	const orm = await MikroORM.init(ormOptions(appUrl));
	try {
		return await seedDemo(orm.em.fork());
	} finally {
		await orm.close(true);
	}
}
