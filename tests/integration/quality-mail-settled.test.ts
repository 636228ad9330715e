import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mailInFlight, mailSettled } from '../../src/lib/server/mail';
import { notifyAwaitingReview } from '../../src/lib/server/services/quality-mail.service';
import { makePerson } from '../factories/people';
import { makeRun } from '../factories/runs';
import { migratedAppOrm } from './support/orm';
import { startTestSmtp } from './support/smtp';

describe('awaiting-review mail in the background', () => {
	let orm: MikroORM;
	let smtp: Awaited<ReturnType<typeof startTestSmtp>>;
	beforeAll(async () => {
		orm = await migratedAppOrm();
		smtp = await startTestSmtp();
	});
	afterAll(async () => {
		await smtp.close();
		await orm.close(true);
	});

	it('returns at once, and mailSettled waits until the mail is out: a script may close its ORM after that', async () => {
		const { runId } = await makeRun(orm.em.fork());
		const quality = await makePerson(orm.em.fork(), { roles: ['quality'] });
		notifyAwaitingReview(orm.em.fork(), runId);
		expect(mailInFlight()).toBe(1);
		await mailSettled();
		expect(mailInFlight()).toBe(0);
		const mail = await smtp.mailTo(quality.email);
		expect(mail).toHaveLength(1);
		expect(mail[0].text).toContain(`/quality/runs/${runId}`);
	});
});
