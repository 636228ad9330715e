import { execFile } from 'node:child_process';
import { join } from 'node:path';
import { findPostgresBin } from './postgres';

/**
 * Runs pg_dump / pg_restore from the PostgreSQL binaries against `url`. The password goes in PGPASSWORD, never on
 * the command line (where `ps` would show it); the rest of the URL becomes the connection options.
 */
export async function pgTool(tool: 'pg_dump' | 'pg_restore', args: string[], url: string): Promise<string> {
	const bin = await findPostgresBin();
	if (!bin) throw new Error('PostgreSQL client tools not found (install the postgresql package).');
	const u = new URL(url);
	const conn = ['-h', u.hostname, '-p', u.port || '5432', '-U', decodeURIComponent(u.username)];
	const db = u.pathname.slice(1);
	const all = tool === 'pg_dump' ? [...conn, ...args, db] : [...conn, '-d', db, ...args];
	return new Promise((resolveRun, reject) => {
		execFile(
			join(bin, tool),
			all,
			{ env: { ...process.env, PGPASSWORD: decodeURIComponent(u.password) }, maxBuffer: 64 * 1024 * 1024 },
			(err, stdout, stderr) =>
				err ? reject(new Error(`${tool} failed: ${stderr || err.message}`)) : resolveRun(stdout)
		);
	});
}
