import { execFile } from 'node:child_process';
import { join } from 'node:path';
import { promisify } from 'node:util';

const root = join(import.meta.dirname, '..', '..', '..');

/**
 * Runs `scripts/migrate.ts` under tsx (with `args`, e.g. `--to=NAME` or `--down`) and returns the names it applied
 * or reverted.
 */
export async function migrateDb(ownerUrl: string, appUrl: string, args: string[] = []): Promise<string[]> {
	const { stdout } = await promisify(execFile)(
		process.execPath,
		[join(root, 'node_modules', 'tsx', 'dist', 'cli.mjs'), join(root, 'scripts', 'migrate.ts'), ...args],
		{
			cwd: root,
			env: { ...process.env, DATABASE_URL: appUrl, OWNER_DATABASE_URL: ownerUrl }
		}
	);
	return stdout
		.split('\n')
		.filter((l) => /^(migrated|reverted) /.test(l))
		.map((l) => l.slice(l.indexOf(' ') + 1));
}
