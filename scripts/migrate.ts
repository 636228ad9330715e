/**
 * `npm run migrate`: applies pending migrations as the owner role (OWNER_DATABASE_URL, else the local cluster's)
 * and grants to the app role of DATABASE_URL. `-- --to=NAME` stops after migration NAME; `-- --down` reverts the
 * last one applied instead (take a backup first: a `down` may drop what its `up` added). Tests call it as a subprocess, because MikroORM loads the
 * TypeScript migration files through Node's own import, which needs tsx's loader.
 */
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { migrate, migrateDown } from './lib/migrate';
import { clusterUrls } from './lib/postgres';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

async function main() {
	const { values } = parseArgs({ options: { to: { type: 'string' }, down: { type: 'boolean' } } });
	let appUrl = process.env.DATABASE_URL;
	let ownerUrl = process.env.OWNER_DATABASE_URL ?? appUrl;
	if (!appUrl) {
		const local = await clusterUrls(join(root, '.data'), 'benchstamp');
		if (!local) throw new Error('No DATABASE_URL and no local cluster: run `npm run db -- start` first.');
		appUrl = local.appUrl;
		ownerUrl = local.ownerUrl;
	}
	const log = (m: string) => console.log(m);
	if (values.down) {
		if (!(await migrateDown(ownerUrl!, appUrl, log))) console.log('migrations: nothing to revert');
		return;
	}
	const applied = await migrate(ownerUrl!, appUrl, log, { to: values.to });
	if (!applied.length) console.log('migrations: nothing to apply');
}

main().catch((e: unknown) => {
	console.error(e instanceof Error ? e.message : String(e));
	process.exit(1);
});
