/**
 * `npm run digest`: sends the daily digest of chain heads to every quality lead now and records a `daily_digest`
 * anchor for each run whose head changed — for cron, beside (or instead of) the app's own timer. Mail goes to
 * SMTP_URL; without it, to the running demo app's stand-in server on 127.0.0.1:FAKE_SMTP_PORT (default 2526).
 */
import { randomBytes } from 'node:crypto';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../mikro-orm.config';
import { useSmtp } from '../src/lib/server/mail';
import { runDailyDigest } from '../src/lib/server/services/digest.service';
import { dbTarget } from './lib/db-target';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

async function main() {
	const { appUrl } = await dbTarget(root);
	process.env.DATABASE_URL = appUrl;
	// The digest signs nothing; env() only insists on a secret because the web app needs one.
	process.env.AUTH_SECRET ??= randomBytes(33).toString('base64');
	process.env.BENCHSTAMP_MODE ??= process.env.SMTP_URL ? 'production' : 'demo';
	useSmtp(process.env.SMTP_URL ?? `smtp://127.0.0.1:${process.env.FAKE_SMTP_PORT ?? 2526}`);
	const orm = await MikroORM.init(ormOptions(appUrl));
	try {
		const r = await runDailyDigest(orm.em.fork());
		console.log(
			`digest ${r.day}: ${r.runs} runs, ${r.anchored} anchored, ${r.problems} not verifying, mailed to ${r.recipients}`
		);
		return r.problems ? 2 : 0;
	} finally {
		await orm.close(true);
	}
}

main().then(
	(code) => process.exit(code),
	(e: unknown) => {
		console.error(e instanceof Error ? e.message : String(e));
		process.exit(1);
	}
);
