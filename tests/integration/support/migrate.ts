import { execFile } from 'node:child_process';
import { join } from 'node:path';
import { promisify } from 'node:util';

const root = join(import.meta.dirname, '..', '..', '..');

/** Runs `scripts/migrate.ts` under tsx and returns the names it applied. */
export async function migrateDb(ownerUrl: string, appUrl: string): Promise<string[]> {
	const { stdout } = await promisify(execFile)(
		process.execPath,
		[join(root, 'node_modules', 'tsx', 'dist', 'cli.mjs'), join(root, 'scripts', 'migrate.ts')],
		{
			cwd: root,
			env: { ...process.env, DATABASE_URL: appUrl, OWNER_DATABASE_URL: ownerUrl }
		}
	);
	return stdout
		.split('\n')
		.filter((l) => l.startsWith('migrated '))
		.map((l) => l.slice('migrated '.length));
}
