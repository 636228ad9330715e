import { join } from 'node:path';
import type { MikroORM } from '@mikro-orm/postgresql';
import { closeOrm, getOrm } from './db/orm';
import { startDigestTimer } from './digest-timer';
import { env } from './env';
import { useSmtp } from './mail';
import { createSignInLimits, type SignInLimits } from './sign-in-limits';
import { closeObjectStore, createObjectStore, useObjectStore } from './storage';

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
	let closeS3 = async () => {};
	if (config.S3_BUCKET) {
		useObjectStore(
			createObjectStore({
				endpoint: config.S3_ENDPOINT,
				region: config.S3_REGION,
				bucket: config.S3_BUCKET,
				accessKeyId: config.S3_ACCESS_KEY_ID,
				secretAccessKey: config.S3_SECRET_ACCESS_KEY,
				pathStyle: config.S3_PATH_STYLE === 'true'
			})
		);
	} else {
		// Demo mode only (env() demands S3_BUCKET in production): objects kept as files by a local fake.
		const { startFakeS3, FAKE_S3_CREDENTIALS } = await import('./fake-s3');
		const bucket = 'benchstamp';
		const fake = await startFakeS3(
			config.FAKE_S3_PORT,
			config.FAKE_S3_DIR ?? join(process.cwd(), '.data', 's3'),
			bucket
		);
		useObjectStore(
			createObjectStore({
				endpoint: fake.endpoint,
				region: 'us-east-1',
				bucket,
				...FAKE_S3_CREDENTIALS,
				pathStyle: true
			})
		);
		closeS3 = fake.close;
	}
	const digestOn = (config.DIGEST_TIMER ?? (config.BENCHSTAMP_MODE === 'production' ? 'on' : 'off')) === 'on';
	const stopDigest = digestOn ? startDigestTimer(orm, config.DIGEST_HOUR_UTC) : () => {};
	runtime = {
		orm,
		limits: createSignInLimits(orm),
		mailDir,
		stop: async () => {
			stopDigest();
			await closeSmtp();
			closeObjectStore();
			await closeS3();
			await closeOrm();
		}
	};
	return runtime;
}
