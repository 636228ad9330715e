import type { MikroORM } from '@mikro-orm/postgresql';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readCapturedMail, startFakeSmtp } from '../../../src/lib/server/fake-smtp';
import { useSmtp } from '../../../src/lib/server/mail';
import { afterAll, beforeAll } from 'vitest';
import { migratedAppOrm } from './orm';

/** The app's fake SMTP server on a free port over a fresh folder, set as the process's mail transport. */
export async function startTestSmtp() {
	const dir = await mkdtemp(join(tmpdir(), 'benchstamp-test-mail-'));
	const smtp = await startFakeSmtp(0, dir);
	useSmtp(`smtp://127.0.0.1:${smtp.port}`);
	return {
		/** Mail captured so far whose recipients include `to`. */
		mailTo: async (to: string) => (await readCapturedMail(dir)).filter((m) => m.to.includes(to)),
		close: async () => {
			await smtp.close();
			await rm(dir, { recursive: true, force: true });
		}
	};
}

export interface MailWorld {
	orm: MikroORM;
	smtp: Awaited<ReturnType<typeof startTestSmtp>>;
}

/** A migrated app ORM and the fake SMTP server for the tests of one `describe`, opened before and closed after. */
export function useMailWorld(): MailWorld {
	const world = {} as MailWorld;
	beforeAll(async () => {
		// migratedAppOrm sets the app's settings env() needs (mail.ts reads MAIL_FROM through it).
		world.orm = await migratedAppOrm();
		world.smtp = await startTestSmtp();
	});
	afterAll(async () => {
		await world.smtp.close();
		await world.orm.close(true);
	});
	return world;
}
