import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readCapturedMail, startFakeSmtp } from '../../../src/lib/server/fake-smtp';
import { useSmtp } from '../../../src/lib/server/mail';

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
