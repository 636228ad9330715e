/**
 * `npm run backup [-- <file>]`: a pg_dump custom-format archive (-Fc) of the project database, taken as the owner
 * role (OWNER_DATABASE_URL, else the local cluster's). Default file: backups/benchstamp-<UTC time>.dump. Photos live
 * in the object store and are backed up with it, not here.
 */
import { mkdir } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { dbTarget } from './lib/db-target';
import { pgTool } from './lib/pg-tools';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

async function main(argv: string[]) {
	const { ownerUrl } = await dbTarget(root);
	const stamp = new Date().toISOString().replace(/[:.]/g, '-').slice(0, 19);
	const file = resolve(argv[0] ?? join(root, 'backups', `benchstamp-${stamp}Z.dump`));
	await mkdir(dirname(file), { recursive: true });
	await pgTool('pg_dump', ['-Fc', '--no-owner', '-f', file], ownerUrl);
	console.log(`backup written: ${file}`);
}

main(process.argv.slice(2)).catch((e: unknown) => {
	console.error(e instanceof Error ? e.message : String(e));
	process.exit(1);
});
