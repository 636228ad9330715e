/**
 * `npm run restore -- <file>`: restores a `npm run backup` archive into the project database as the owner role —
 * every object is dropped and recreated (`--clean --if-exists`) in one transaction, so a failed restore changes
 * nothing — then verifies every run's chain against its anchors and prints "intact" or the first broken record.
 * Stop the app first. Exit 0 when intact, 2 when a chain does not verify, 1 on an error.
 */
import { randomBytes } from 'node:crypto';
import { access } from 'node:fs/promises';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../mikro-orm.config';
import { verifyAll } from '../src/lib/server/services/audit.service';
import { dbTarget } from './lib/db-target';
import { pgTool } from './lib/pg-tools';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

async function main(argv: string[]): Promise<number> {
	const file = argv[0];
	if (!file) throw new Error('usage: npm run restore -- <backup file>');
	await access(file).catch(() => {
		throw new Error(`no such backup file: ${file}`);
	});
	const { appUrl, ownerUrl } = await dbTarget(root);
	process.env.AUTH_SECRET ??= randomBytes(33).toString('base64');
	await pgTool(
		'pg_restore',
		['--clean', '--if-exists', '--no-owner', '--single-transaction', '--exit-on-error', resolve(file)],
		ownerUrl
	);
	console.log(`restored ${file}`);
	const orm = await MikroORM.init(ormOptions(appUrl));
	try {
		const v = await verifyAll(orm.em.fork());
		if (!v.failed) {
			console.log(`verify: intact — ${v.runs} runs, ${v.records} records`);
			return 0;
		}
		const first = v.failures[0];
		console.log(`verify: ${v.failed} of ${v.runs} runs do not verify. First: run ${first.runId}: ${first.message}`);
		return 2;
	} finally {
		await orm.close(true);
	}
}

main(process.argv.slice(2)).then(
	(code) => process.exit(code),
	(e: unknown) => {
		console.error(e instanceof Error ? e.message : String(e));
		process.exit(1);
	}
);
