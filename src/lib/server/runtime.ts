import { join } from 'node:path';
import type { MikroORM } from '@mikro-orm/postgresql';
import { closeOrm, getOrm } from './db/orm';
import { env } from './env';
import { useSmtp } from './mail';
import { createSignInLimits, type SignInLimits } from './sign-in-limits';

/** Process-wide services, created once by `hooks.server.ts` `init`. Request-scoped state lives on `locals`. */
export interface Runtime {
	orm: MikroORM;
	limits: SignInLimits;
	mailDir: string;
	stop: () => Promise<void>;
}

let runtime: Runtime | undefined;
let starting: Promise<Runtime> | undefined;

export function startRuntime(): Promise<Runtime> {
	starting ??= boot();
	return starting;
}

export function getRuntime(): Runtime {
	if (!runtime) throw new Error('The server runtime has not started.');
	return runtime;
}

async function boot(): Promise<Runtime> {
	const config = env();
	const orm = await getOrm(config.DATABASE_URL);
	const mailDir = config.MAIL_DIR ?? join(process.cwd(), '.data', 'mail');
	let closeSmtp = async () => {};
	if (config.SMTP_URL) {
		useSmtp(config.SMTP_URL);
	} else {
		// Demo mode only (env() demands SMTP_URL in production): capture mail locally for the outbox page.
		const { startFakeSmtp } = await import('./fake-smtp');
		const fake = await startFakeSmtp(config.FAKE_SMTP_PORT, mailDir);
		useSmtp(`smtp://127.0.0.1:${fake.port}`);
		closeSmtp = fake.close;
	}
	runtime = {
		orm,
		limits: createSignInLimits(orm),
		mailDir,
		stop: async () => {
			await closeSmtp();
			await closeOrm();
		}
	};
	return runtime;
}
