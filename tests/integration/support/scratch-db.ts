import { withClient } from '../../../scripts/lib/postgres';
import { testDbUrls } from '../db-urls';

/**
 * An empty database of its own on the test cluster, for tests that must start from nothing (migrations up from empty,
 * the demo seed into an empty library). Owned by the owner role; the app role may connect. Needs the superuser URL.
 */
export function scratchDatabase(prefix: string) {
	const name = `${prefix}_${process.pid}_${Date.now().toString(36)}`;
	const urls = testDbUrls();
	/** `url` pointed at the scratch database. */
	const withDb = (url: string) => {
		const u = new URL(url);
		u.pathname = `/${name}`;
		return u.toString();
	};
	return {
		ownerUrl: withDb(urls.ownerUrl),
		appUrl: withDb(urls.appUrl),
		async create() {
			if (!urls.superuserUrl)
				throw new Error('this test needs TEST_SUPERUSER_DATABASE_URL to create an empty database');
			await withClient(urls.superuserUrl, async (c) => {
				await c.query(`create database ${name} owner benchstamp_owner`);
				await c.query(`revoke all on database ${name} from public`);
				await c.query(`grant connect on database ${name} to benchstamp_app`);
			});
		},
		async drop() {
			await withClient(urls.superuserUrl!, (c) => c.query(`drop database if exists ${name} with (force)`));
		}
	};
}
