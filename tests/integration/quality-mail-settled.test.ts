import { describe, expect, it } from 'vitest';
import { mailInFlight, mailSettled } from '../../src/lib/server/mail';
import { notifyAwaitingReview } from '../../src/lib/server/services/quality-mail.service';
import { makePerson } from '../factories/people';
import { makeRun } from '../factories/runs';
import { useMailWorld } from './support/smtp';

describe('awaiting-review mail in the background', () => {
	const w = useMailWorld();

	it('returns at once, and mailSettled waits until the mail is out: a script may close its ORM after that', async () => {
		const { runId } = await makeRun(w.orm.em.fork());
		const quality = await makePerson(w.orm.em.fork(), { roles: ['quality'] });
		notifyAwaitingReview(w.orm.em.fork(), runId);
		expect(mailInFlight()).toBe(1);
		await mailSettled();
		expect(mailInFlight()).toBe(0);
		const mail = await w.smtp.mailTo(quality.email);
		expect(mail).toHaveLength(1);
		expect(mail[0].text).toContain(`/quality/runs/${runId}`);
	});
});
