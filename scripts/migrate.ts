/**
 * `npm run migrate`: applies pending migrations as the owner role (OWNER_DATABASE_URL, else the local cluster's)
 * and grants to the app role of DATABASE_URL. Tests call it as a subprocess, because MikroORM loads the
 * TypeScript migration files through Node's own import, which needs tsx's loader.
 */
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { migrate } from './lib/migrate';
import { clusterUrls } from './lib/postgres';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

async function main() {
	let appUrl = process.env.DATABASE_URL;
	let ownerUrl = process.env.OWNER_DATABASE_URL ?? appUrl;
	if (!appUrl) {
		const local = await clusterUrls(join(root, '.data'), 'benchstamp');
		if (!local) throw new Error('No DATABASE_URL and no local cluster: run `npm run db -- start` first.');
		appUrl = local.appUrl;
		ownerUrl = local.ownerUrl;
	}
	const applied = await migrate(ownerUrl!, appUrl, (m) => console.log(m));
	if (!applied.length) console.log('migrations: nothing to apply');
}

main().catch((e: unknown) => {
	console.error(e instanceof Error ? e.message : String(e));
	process.exit(1);
});
