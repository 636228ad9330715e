/**
 * `npm start`: everything a fresh machine needs to show Benchstamp with its demo shop.
 * Ensures PostgreSQL (installing Debian's package when root), starts the project cluster in .data/, migrates,
 * seeds the demo scenario (unless BENCHSTAMP_MODE=production), builds when sources changed, and serves the app.
 */
import { spawn } from 'node:child_process';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildIfNeeded } from './lib/build-if-needed';
import { prepare } from './lib/prepare';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../src/lib/server/db/seed';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const log = (m: string) => console.log(`benchstamp: ${m}`);

async function main() {
	const { mode, env } = await prepare(root, log);
	buildIfNeeded(root, log);
	// HTTPS=1 or --https: the shop network (scripts/https-server.ts, its own or a generated local CA's certificate).
	const https = process.env.HTTPS === '1' || process.argv.includes('--https');
	const port = Number(process.env.PORT ?? (https ? 3443 : 3000));
	const origin =
		process.env.ORIGIN ?? (https ? `https://<this machine's LAN name>:${port}` : `http://localhost:${port}`);
	const server = https
		? spawn(process.execPath, ['--import', 'tsx', join(root, 'scripts', 'https-server.ts')], {
				cwd: root,
				stdio: 'inherit',
				// No ORIGIN unless given: over HTTPS the app takes it from the Host header (every LAN name works).
				env: { ...process.env, ...env, PORT: String(port), HOST: process.env.HOST ?? '0.0.0.0' }
			})
		: spawn(process.execPath, [join(root, 'build', 'index.js')], {
				cwd: root,
				stdio: 'inherit',
				env: { ...process.env, ...env, PORT: String(port), HOST: process.env.HOST ?? '127.0.0.1', ORIGIN: origin }
			});
	for (const signal of ['SIGINT', 'SIGTERM'] as const) process.on(signal, () => server.kill(signal));
	server.on('exit', (code) => process.exit(code ?? 0));

	log(`serving ${origin}`);
	if (mode === 'demo') {
		log(`demo sign-ins (password "${DEMO_PASSWORD}" for all; invented people of an invented shop):`);
		for (const p of DEMO_PEOPLE)
			console.log(`    ${p.email.padEnd(22)} ${p.roles.join(', ').padEnd(12)} bench PIN ${p.pin}`);
		log(`captured e-mail: ${origin}/dev/outbox (signed in as admin)`);
	}
}

main().catch((e: unknown) => {
	console.error(`benchstamp: ${e instanceof Error ? e.message : String(e)}`);
	process.exit(1);
});
