/**
 * The developer's PostgreSQL cluster, kept inside the repository:
 *
 *   tsx scripts/db.ts start          start (creating on first use) the cluster; prints host and port, no passwords
 *   tsx scripts/db.ts stop           stop it (no-op if not running)
 *   tsx scripts/db.ts status         initialised / running / port
 *   tsx scripts/db.ts reset          stop, delete data and passwords, start a fresh empty cluster
 *   tsx scripts/db.ts url [--owner]  print the app role's URL (or the owner role's) for scripts: DATABASE_URL=$(…)
 *
 * Layout: .data/postgres (data directory), .data/run (socket), .data/postgres.log, .data/db-secrets.json.
 * Port: BENCHSTAMP_PG_PORT, default 54329, used when the cluster is created; afterwards the recorded port is kept
 * (`reset` to move it). If DATABASE_URL is set (OWNER_DATABASE_URL falling back to it), that external server is
 * used: `start`/`stop` do nothing and `url` prints those variables.
 * Progress goes to stderr, results to stdout.
 */
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import {
	clusterPaths,
	clusterStatus,
	clusterUrls,
	resetCluster,
	startCluster,
	stopCluster,
	type ClusterUrls
} from './lib/postgres';

const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const baseDir = join(repoRoot, '.data');
const database = 'benchstamp';
const DEFAULT_PORT = 54329;

function port(): number {
	const raw = process.env.BENCHSTAMP_PG_PORT;
	if (raw === undefined || raw === '') return DEFAULT_PORT;
	const value = Number(raw);
	if (!Number.isInteger(value) || value < 1 || value > 65535)
		throw new Error(`BENCHSTAMP_PG_PORT=${raw} is not a port`);
	return value;
}

const log = (msg: string) => process.stderr.write(`db: ${msg}\n`);

function redact(url: string): string {
	try {
		const parsed = new URL(url);
		if (parsed.password) parsed.password = '***';
		return parsed.toString();
	} catch {
		return '(unparseable URL)';
	}
}

function external(): { appUrl: string; ownerUrl: string } | undefined {
	const appUrl = process.env.DATABASE_URL;
	if (!appUrl) return undefined;
	return { appUrl, ownerUrl: process.env.OWNER_DATABASE_URL || appUrl };
}

function printUrls(urls: ClusterUrls): void {
	const rel = clusterPaths('.data');
	console.log(`PostgreSQL running on 127.0.0.1:${urls.port} (data ${rel.dataDir}, log ${rel.logFile})`);
	console.log(`  app role:   ${redact(urls.appUrl)}`);
	console.log(`  owner role: ${redact(urls.ownerUrl)}`);
	console.log('Full URLs: tsx scripts/db.ts url   /   tsx scripts/db.ts url --owner');
}

async function main(argv: string[]): Promise<number> {
	const [command, ...rest] = argv;
	const owner = rest.includes('--owner');
	const ext = external();
	const opts = { baseDir, port: port(), database, log };

	switch (command) {
		case 'start': {
			if (ext) {
				console.log(`DATABASE_URL is set: using the external server ${redact(ext.appUrl)}; nothing started`);
				return 0;
			}
			const started = Date.now();
			const urls = await startCluster(opts);
			printUrls(urls);
			log(`ready in ${Date.now() - started} ms`);
			return 0;
		}
		case 'stop': {
			if (ext) {
				console.log('DATABASE_URL is set: the external server is not managed here; nothing stopped');
				return 0;
			}
			const before = await clusterStatus(baseDir);
			await stopCluster(baseDir);
			console.log(before.running ? 'PostgreSQL stopped' : 'PostgreSQL was not running');
			return 0;
		}
		case 'status': {
			if (ext) console.log(`DATABASE_URL is set: the app uses the external server ${redact(ext.appUrl)}`);
			const status = await clusterStatus(baseDir);
			if (!status.initialised) console.log('local cluster: not initialised (tsx scripts/db.ts start)');
			else console.log(`local cluster: ${status.running ? 'running' : 'stopped'}, port ${status.port ?? 'unknown'}`);
			return status.running || ext ? 0 : 3;
		}
		case 'reset': {
			if (ext) {
				console.error('DATABASE_URL is set: refusing to reset; unset it to reset the local cluster');
				return 1;
			}
			const urls = await resetCluster(opts);
			printUrls(urls);
			return 0;
		}
		case 'url': {
			if (ext) {
				console.log(owner ? ext.ownerUrl : ext.appUrl);
				return 0;
			}
			const urls = await clusterUrls(baseDir, database);
			if (!urls) {
				console.error('no local cluster yet: run `tsx scripts/db.ts start` first');
				return 1;
			}
			console.log(owner ? urls.ownerUrl : urls.appUrl);
			return 0;
		}
		default:
			console.error('usage: tsx scripts/db.ts start|stop|status|reset|url [--owner]');
			return 2;
	}
}

main(process.argv.slice(2)).then(
	(code) => {
		process.exitCode = code;
	},
	(error: unknown) => {
		console.error(`db: ${error instanceof Error ? error.message : String(error)}`);
		process.exitCode = 1;
	}
);
