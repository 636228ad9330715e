import { spawn } from 'node:child_process';
import { chmod, mkdtemp, readdir, rm } from 'node:fs/promises';
import { connect } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { clusterStatus } from '../../scripts/lib/postgres';

const root = join(import.meta.dirname, '..', '..');

/** Resolves true when something accepts a TCP connection on 127.0.0.1:port. */
const listening = (port: number) =>
	new Promise<boolean>((done) => {
		const socket = connect({ host: '127.0.0.1', port }, () => (socket.destroy(), done(true)));
		socket.on('error', () => done(false));
	});

describe('npm test interrupted', () => {
	const scratch = mkdtemp(join(tmpdir(), 'interrupt-'));
	afterAll(async () => rm(await scratch, { recursive: true, force: true }));

	it('stops the gate it is running, then its throwaway cluster, deletes it and exits 143 on SIGTERM', async () => {
		const tmp = await scratch;
		await chmod(tmp, 0o755); // the postgres OS user must traverse it when the tests run as root
		const child = spawn(
			process.execPath,
			['--import', 'tsx', 'scripts/test.ts', '--only=integration', '--', 'tests/integration/postgres-cluster.test.ts'],
			{ cwd: root, env: { ...process.env, TMPDIR: tmp }, stdio: ['ignore', 'pipe', 'pipe'] }
		);
		let output = '';
		const exited = new Promise<number | null>((done) => child.on('exit', (code) => done(code)));
		// vitest's banner: the cluster is up and the integration gate is running.
		await new Promise<void>((ready, fail) => {
			const onData = (chunk: Buffer) => {
				output += chunk.toString();
				if (/\bRUN\b/.test(output)) ready();
			};
			child.stdout.on('data', onData);
			child.stderr.on('data', onData);
			void exited.then(() => fail(new Error(`npm test ended before its tests started:\n${output}`)));
		});
		const [base] = (await readdir(tmp)).filter((name) => name.startsWith('benchstamp-npm-test-'));
		expect(base).toBeDefined();
		const { running, port } = await clusterStatus(join(tmp, base));
		expect(running).toBe(true);
		// Once its directory is deleted only the port can tell whether a postmaster was left behind.
		expect(await listening(port!)).toBe(true);

		child.kill('SIGTERM');
		expect(await exited).toBe(143);
		expect(output).toContain('SIGTERM: stopping the running gate and the test cluster');
		expect(await listening(port!)).toBe(false);
		expect((await readdir(tmp)).filter((name) => name.startsWith('benchstamp-npm-test-'))).toEqual([]);
	}, 120_000);
});
