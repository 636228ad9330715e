import { describe, expect, it } from 'vitest';
import { withClient } from '../../scripts/lib/postgres';
import * as anchors from '../../src/lib/server/repositories/anchors';
import * as ledger from '../../src/lib/server/repositories/ledger';
import {
	customerMayViewPhoto,
	customerRecordByToken,
	sendCustomerRecord
} from '../../src/lib/server/services/customer-record.service';
import { digestSentOn, digestSubject, runDailyDigest } from '../../src/lib/server/services/digest.service';
import { sendAwaitingReview } from '../../src/lib/server/services/quality-mail.service';
import { makePerson } from '../factories/people';
import { makeRunWithFinding } from '../factories/runs';
import { testDbUrls } from './db-urls';
import { useMailWorld } from './support/smtp';

const tokenIn = (text: string) => text.match(/\/record\/([A-Za-z0-9_-]+)/)?.[1] ?? '';

describe('customer rebuild record, review mail and the daily digest', () => {
	const w = useMailWorld();
	const mailTo = (to: string) => w.smtp.mailTo(to);

	const runWithFinding = () => makeRunWithFinding(w.orm);

	it('mails the link, stores only its sha256, notes it without the address, and refuses it once expired', async () => {
		const made = await runWithFinding();
		const quality = await makePerson(w.orm.em.fork(), { roles: ['quality'] });
		const now = new Date();
		const sent = await sendCustomerRecord(w.orm.em.fork(), quality, made.runId, {
			days: 3,
			origin: 'http://shop.example',
			now
		});
		if (!sent.ok) throw new Error(sent.message);
		const [mail] = await mailTo('customer@example.com');
		const token = tokenIn(mail.text);
		expect(token.length).toBeGreaterThan(40);
		expect(mail.text).toContain('http://shop.example/record/');

		const stored = await withClient(testDbUrls().ownerUrl, (c) =>
			c.query<{ token_hash: string; expires_at: Date }>(
				'select token_hash, expires_at from customer_record_link where id = $1',
				[sent.value.linkId]
			)
		);
		expect(stored.rows[0].token_hash).toMatch(/^[0-9a-f]{64}$/);
		expect(stored.rows[0].token_hash).not.toContain(token);
		expect(new Date(stored.rows[0].expires_at).getTime()).toBe(now.getTime() + 3 * 86_400_000);

		const rows = await ledger.listForRun(w.orm.em.fork(), made.runId);
		const note = rows.at(-1)!;
		expect(note.kind).toBe('export');
		expect(JSON.stringify(note.body)).not.toContain('customer@example.com');
		expect(note.body).toMatchObject({ format: 'customer_record', linkId: sent.value.linkId });

		const open = await customerRecordByToken(w.orm.em.fork(), token, new Date(now.getTime() + 60_000));
		expect(open.status).toBe('ok');
		if (open.status !== 'ok') return;
		expect(open.record.findings.map((f) => f.text)).toEqual(['Scoring in bore 1.']);
		expect(open.record.cautions.join(' ')).toMatch(/recalibrated or adapted by a qualified person/);
		expect(open.record.cautions.join(' ')).toMatch(/manufacturer's service information/);

		const later = new Date(now.getTime() + 3 * 86_400_000 + 1);
		expect(await customerRecordByToken(w.orm.em.fork(), token, later)).toEqual({ status: 'expired' });
		expect(await customerRecordByToken(w.orm.em.fork(), `${token.slice(0, -2)}xx`)).toEqual({ status: 'unknown' });
		expect(await customerMayViewPhoto(w.orm.em.fork(), token, crypto.randomUUID())).toBe(false);
	});

	it('refuses a job without a customer e-mail, and stores nothing', async () => {
		const made = await runWithFinding();
		await withClient(testDbUrls().ownerUrl, (c) =>
			c.query(`update job set customer_email = '' where id = $1`, [made.jobId])
		);
		const quality = await makePerson(w.orm.em.fork(), { roles: ['quality'] });
		const before = (await ledger.listForRun(w.orm.em.fork(), made.runId)).length;
		const sent = await sendCustomerRecord(w.orm.em.fork(), quality, made.runId, { days: 3, origin: 'http://x' });
		expect(sent).toMatchObject({ ok: false, status: 409, message: expect.stringMatching(/no customer e-mail/) });
		expect(await ledger.listForRun(w.orm.em.fork(), made.runId)).toHaveLength(before);
	});

	it('mails every active quality lead when a run awaits review', async () => {
		const made = await runWithFinding();
		const q = await makePerson(w.orm.em.fork(), { roles: ['quality'], name: 'Review Mail Person' });
		expect(await sendAwaitingReview(w.orm.em.fork(), made.runId)).toBeGreaterThan(0);
		const [mail] = await mailTo(q.email);
		expect(mail.subject).toMatch(/^Run awaiting review: KL-/);
		expect(mail.text).toContain(`/quality/runs/${made.runId}`);
	});

	it('the digest mails each head and anchors only runs whose head changed since the last digest', async () => {
		const made = await runWithFinding();
		const q = await makePerson(w.orm.em.fork(), { roles: ['quality'] });
		const head = (await ledger.listForRun(w.orm.em.fork(), made.runId)).at(-1)!.hash;
		const day1 = new Date('2030-01-01T06:00:00Z');
		const first = await runDailyDigest(w.orm.em.fork(), day1);
		expect(first.lines.find((l) => l.runId === made.runId)).toMatchObject({ head, count: 2, changed: true });
		expect(await digestSentOn(w.orm.em.fork(), '2030-01-01')).toBe(true);
		const digestMail = (await mailTo(q.email)).find((m) => m.subject === digestSubject('2030-01-01'))!;
		expect(digestMail.text).toContain(head);

		const second = await runDailyDigest(w.orm.em.fork(), new Date('2030-01-02T06:00:00Z'));
		expect(second.lines.find((l) => l.runId === made.runId)).toMatchObject({ changed: false });
		const list = await anchors.listForRun(w.orm.em.fork(), made.runId);
		expect(list.map((a) => [a.recordedIn, a.head, a.count])).toEqual([['daily_digest', head, 2]]);
	});
});
