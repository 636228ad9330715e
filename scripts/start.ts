/**
 * `npm start`: everything a fresh machine needs to show Benchstamp with its demo shop.
 * Ensures PostgreSQL (installing Debian's package when root), starts the project cluster in .data/, migrates,
 * seeds the demo scenario (unless BENCHSTAMP_MODE=production), builds when sources changed, and serves the app.
 */
import { spawn } from 'node:child_process';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildIfNeeded } from './lib/build-if-needed';
import { runDemoSeed } from './lib/demo-seed';
import { migrate } from './lib/migrate';
import { startCluster } from './lib/postgres';
import { fileSecret } from './lib/secrets';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../src/lib/server/db/seed';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const dataDir = join(root, '.data');
const log = (m: string) => console.log(`benchstamp: ${m}`);

async function main() {
	const mode = process.env.BENCHSTAMP_MODE ?? 'demo';
	const port = Number(process.env.PORT ?? 3000);
	let appUrl = process.env.DATABASE_URL;
	let ownerUrl = process.env.OWNER_DATABASE_URL ?? appUrl;
	if (!appUrl) {
		const urls = await startCluster({
			baseDir: dataDir,
			port: Number(process.env.BENCHSTAMP_PG_PORT ?? 54329),
			database: 'benchstamp',
			log
		});
		appUrl = urls.appUrl;
		ownerUrl = urls.ownerUrl;
		log(`PostgreSQL on 127.0.0.1:${urls.port} (data in .data/postgres)`);
	} else {
		log('using the PostgreSQL server in DATABASE_URL');
	}
	await migrate(ownerUrl!, appUrl, log);
	if (mode === 'demo') {
		const { created } = await runDemoSeed(appUrl);
		log(created ? `seeded ${created} demo people` : 'demo scenario already seeded');
	}
	buildIfNeeded(root, log);

	const origin = process.env.ORIGIN ?? `http://localhost:${port}`;
	const server = spawn(process.execPath, [join(root, 'build', 'index.js')], {
		cwd: root,
		stdio: 'inherit',
		env: {
			...process.env,
			BENCHSTAMP_MODE: mode,
			DATABASE_URL: appUrl,
			AUTH_SECRET: process.env.AUTH_SECRET ?? (await fileSecret(join(dataDir, 'auth-secret'))),
			PORT: String(port),
			HOST: process.env.HOST ?? '127.0.0.1',
			ORIGIN: origin,
			MAIL_DIR: process.env.MAIL_DIR ?? join(dataDir, 'mail')
		}
	});
	for (const signal of ['SIGINT', 'SIGTERM'] as const) process.on(signal, () => server.kill(signal));
	server.on('exit', (code) => process.exit(code ?? 0));

	log(`serving ${origin}`);
	if (mode === 'demo') {
		log(`demo sign-ins (password "${DEMO_PASSWORD}" for all; invented people of an invented shop):`);
		for (const p of DEMO_PEOPLE)
			console.log(`    ${p.email.padEnd(22)} ${p.roles.join(', ').padEnd(12)} bench PIN ${p.pin}`);
		log(`captured e-mail: ${origin}/dev/outbox (as admin)`);
	}
}

main().catch((e: unknown) => {
	console.error(`benchstamp: ${e instanceof Error ? e.message : String(e)}`);
	process.exit(1);
});
