import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../../../mikro-orm.config';
import { migrateDb } from './migrate';
import { testDbUrls } from '../db-urls';

/** The shared test database with every migration applied, and an ORM connected as the app's role. */
export async function migratedAppOrm(): Promise<MikroORM> {
	const { appUrl, ownerUrl } = testDbUrls();
	// Services read the app's settings through env() (the offline-grant key, mail sender): the test's own.
	process.env.DATABASE_URL ??= appUrl;
	process.env.AUTH_SECRET ??= 'integration-test-secret-0123456789abcdef';
	process.env.BENCHSTAMP_MODE ??= 'demo';
	await migrateDb(ownerUrl, appUrl);
	return MikroORM.init(ormOptions(appUrl));
}

/** An ORM connected as the owner role (migrations' role), for checks the app itself may not make. */
export function ownerOrm(): Promise<MikroORM> {
	return MikroORM.init(ormOptions(testDbUrls().ownerUrl));
}
