/**
 * An app server of the test's own, on the shared demo database: the offline tests stop it to cut the network at the
 * SERVER side (no request can reach a server that is not running, service worker or not) and start it again.
 * Same settings as playwright.config.ts's demo server, its own port and mail port.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';

const SECRET = 'e2e-auth-secret-that-is-long-enough-0123456789';

export async function freeTcpPort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const srv = createServer();
		srv.once('error', reject);
		srv.listen(0, '127.0.0.1', () => {
			const { port } = srv.address() as { port: number };
			srv.close(() => resolve(port));
		});
	});
}

export interface AppServer {
	readonly url: string;
	readonly port: number;
	/** Starts the server (again) and waits until /api/health answers. */
	start(): Promise<void>;
	/** SIGTERM and wait for the process to exit: afterwards nothing listens on the port. */
	stop(): Promise<void>;
	/** Sends `signal` (a crash: SIGKILL) and waits for the process to exit; `start()` brings it back. */
	kill(signal: NodeJS.Signals): Promise<void>;
}

export async function appServer(): Promise<AppServer> {
	const port = await freeTcpPort();
	const smtpPort = await freeTcpPort();
	const url = `http://localhost:${port}`;
	let child: ChildProcess | undefined;
	const env = {
		...process.env,
		BENCHSTAMP_MODE: 'demo',
		DATABASE_URL: process.env.E2E_DATABASE_URL ?? '',
		AUTH_SECRET: SECRET,
		PORT: String(port),
		HOST: '127.0.0.1',
		ORIGIN: url,
		MAIL_DIR: `${process.env.E2E_MAIL_DIR ?? '.data/e2e-mail'}-own`,
		FAKE_SMTP_PORT: String(smtpPort),
		FAKE_S3_PORT: '0',
		FAKE_S3_DIR: process.env.E2E_MAIL_DIR ? `${process.env.E2E_MAIL_DIR}-s3` : '.data/e2e-s3',
		BODY_SIZE_LIMIT: '11M',
		// As playwright.config.ts: no keep-alive race between a starved test process and the server's 5 s default.
		KEEP_ALIVE_TIMEOUT: '600'
	};
	const server: AppServer = {
		url,
		port,
		async start() {
			if (child) return;
			child = spawn(process.execPath, [process.env.BENCHSTAMP_BUILD_DIR ?? 'build'], { env, stdio: 'ignore' });
			const started = Date.now();
			for (;;) {
				if (child.exitCode !== null) throw new Error(`The test's app server exited with ${child.exitCode}.`);
				const ok = await fetch(`${url}/api/health`)
					.then((r) => r.ok)
					.catch(() => false);
				if (ok) return;
				if (Date.now() - started > 60_000) throw new Error('The test app server did not start within 60 s.');
				await new Promise((r) => setTimeout(r, 200));
			}
		},
		async stop() {
			const c = child;
			child = undefined;
			if (!c || c.exitCode !== null) return;
			const exited = new Promise<void>((resolve) => c.once('exit', () => resolve()));
			c.kill('SIGTERM');
			const timer = setTimeout(() => c.kill('SIGKILL'), 10_000);
			await exited;
			clearTimeout(timer);
		},
		async kill(signal) {
			const c = child;
			child = undefined;
			if (!c || c.exitCode !== null || c.signalCode !== null) return;
			const exited = new Promise<void>((resolve) => c.once('exit', () => resolve()));
			c.kill(signal);
			await exited;
		}
	};
	return server;
}
