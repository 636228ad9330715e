/**
 * `npm test`: every gate, in the order that fails fastest. Starts one throwaway PostgreSQL cluster on loopback
 * (a fresh temp directory, a free port), gives each test layer its own database, and always stops and deletes it.
 *   1. static gates: ESLint, Prettier, svelte-check (types + Svelte warnings)
 *   2. vitest: unit (pure modules) and integration (real PostgreSQL, migrations applied)
 *   3. vite build, then Playwright on the built app in Debian's Chromium
 * `npm test -- --skip-static` or `--only=unit|integration|e2e` narrow it while working; `--reuse-build` skips the
 * vite build and runs Playwright on the one already in BENCHSTAMP_BUILD_DIR (when only tests changed).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { chmod, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { migrate } from './lib/migrate';
import { runDemoSeed } from './lib/demo-seed';
import { onInterrupt, signalExitCode, type EndingSignal } from './lib/interrupt';
import { freePort, startCluster, stopCluster } from './lib/postgres';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const bin = (name: string) => join(root, 'node_modules', '.bin', name);
const args = process.argv.slice(2);
// Anything after `--` goes to the test runner of the one layer asked for (Playwright unless `--only=integration`), e.g.
// `tsx scripts/test.ts --only=e2e -- tests/e2e/library.spec.ts` or `--only=integration -- tests/integration/jobs`.
const passArgs = args.includes('--') ? args.slice(args.indexOf('--') + 1) : [];
const ownArgs = args.includes('--') ? args.slice(0, args.indexOf('--')) : args;
// While working on tests only: Playwright on the build already in BENCHSTAMP_BUILD_DIR.
const reuseBuild = ownArgs.includes('--reuse-build');
const only = args.find((a) => a.startsWith('--only='))?.slice(7);
const wants = (layer: string) => !only || only.split(',').includes(layer);
const integrationArgs = only === 'integration' ? passArgs : [];
const playwrightArgs = only === 'integration' ? [] : passArgs;

// On Ctrl-C or `kill`: end the gate that is running and start no other, so `main`'s finally stops the cluster.
let interrupted: EndingSignal | null = null;
let running: ChildProcess | null = null;
onInterrupt((signal) => {
	interrupted = signal;
	console.error(`\n${signal}: stopping the running gate and the test cluster…`);
	running?.kill(signal);
});

function run(label: string, cmd: string, cmdArgs: string[], env: NodeJS.ProcessEnv = {}): Promise<void> {
	if (interrupted) return Promise.reject(new Error(`${label} not started (${interrupted})`));
	const started = Date.now();
	console.log(`\n▶ ${label}`);
	return new Promise((ok, fail) => {
		const child = spawn(cmd, cmdArgs, { cwd: root, stdio: 'inherit', env: { ...process.env, ...env } });
		running = child;
		child.on('exit', (code, signal) => {
			running = null;
			const secs = ((Date.now() - started) / 1000).toFixed(1);
			if (code === 0) {
				console.log(`✔ ${label} (${secs} s)`);
				ok();
			} else fail(new Error(`${label} failed (exit ${code ?? signal}) after ${secs} s`));
		});
	});
}

async function main() {
	if (!args.includes('--skip-static') && !only) {
		await run('svelte-kit sync', bin('svelte-kit'), ['sync']);
		await run('ESLint', bin('eslint'), ['.', '--max-warnings', '0']);
		await run('Prettier', bin('prettier'), ['--check', '.']);
		await run('svelte-check', bin('svelte-check'), [
			'--tsconfig',
			'./tsconfig.json',
			'--fail-on-warnings',
			'--threshold',
			'warning'
		]);
	}
	if (wants('unit')) await run('unit tests', bin('vitest'), ['run', '--project', 'unit']);
	if (!wants('integration') && !wants('e2e')) return;

	const baseDir = await mkdtemp(join(tmpdir(), 'benchstamp-npm-test-'));
	await chmod(baseDir, 0o755); // the postgres OS user must traverse it when we run as root
	try {
		const port = await freePort();
		const cluster = (database: string) => startCluster({ baseDir, port, database, ephemeral: true });
		if (wants('integration')) {
			const db = await cluster('benchstamp_test');
			await run(
				'integration tests (PostgreSQL)',
				bin('vitest'),
				['run', '--project', 'integration', ...integrationArgs],
				{
					TEST_DATABASE_URL: db.appUrl,
					TEST_OWNER_DATABASE_URL: db.ownerUrl,
					TEST_SUPERUSER_DATABASE_URL: db.superuserUrl
				}
			);
		}
		if (wants('e2e')) {
			const demo = await cluster('benchstamp_e2e');
			await migrate(demo.ownerUrl, demo.appUrl);
			await runDemoSeed(demo.appUrl);
			const prod = await cluster('benchstamp_prod');
			await migrate(prod.ownerUrl, prod.appUrl);
			if (!reuseBuild)
				await run('vite build', process.execPath, [join(root, 'node_modules', 'vite', 'bin', 'vite.js'), 'build']);
			await run('browser tests (Playwright, Chromium)', bin('playwright'), ['test', ...playwrightArgs], {
				E2E_DATABASE_URL: demo.appUrl,
				E2E_OWNER_DATABASE_URL: demo.ownerUrl,
				E2E_PROD_DATABASE_URL: prod.appUrl,
				E2E_PROD_OWNER_DATABASE_URL: prod.ownerUrl,
				E2E_MAIL_DIR: join(baseDir, 'mail'),
				E2E_APP_PORT: String(await freePort()),
				E2E_PROD_PORT: String(await freePort()),
				E2E_SMTP_PORT: String(await freePort())
			});
		}
	} finally {
		await stopCluster(baseDir).catch((e: unknown) => console.error('could not stop the test cluster:', e));
		await rm(baseDir, { recursive: true, force: true });
	}
}

main().then(
	() => {
		if (interrupted) process.exit(signalExitCode(interrupted));
		console.log('\nAll gates passed.');
	},
	(e: unknown) => {
		console.error(`\n✘ ${e instanceof Error ? e.message : String(e)}`);
		process.exit(interrupted ? signalExitCode(interrupted) : 1);
	}
);
