import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../../../mikro-orm.config';
import { migrateDb } from './migrate';
import { testDbUrls } from '../db-urls';

/** The shared test database with every migration applied, and an ORM connected as the app's role. */
export async function migratedAppOrm(): Promise<MikroORM> {
	const { appUrl, ownerUrl } = testDbUrls();
	await migrateDb(ownerUrl, appUrl);
	return MikroORM.init(ormOptions(appUrl));
}

/** An ORM connected as the owner role (migrations' role), for checks the app itself may not make. */
export function ownerOrm(): Promise<MikroORM> {
	return MikroORM.init(ormOptions(testDbUrls().ownerUrl));
}
