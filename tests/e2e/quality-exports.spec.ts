import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import { expect, test } from '@playwright/test';
import { DEMO, linkIn, ownerQuery, waitForMail } from './support';
import { as, runWithBoreAttempt, TECH_NAME } from './quality-support';

// Demo data: the invented Kestrel Lane shop and its invented KTX-7 procedures (not service data). The run holds one
// bore 1 attempt of 22.013 mm, inside 22 mm H7 (quality-support.ts names the source).

test('a quality lead downloads the PDF and mails the customer record, whose link works until it expires', async ({
	browser
}) => {
	const { runId, jobId, jobNumber } = await runWithBoreAttempt(browser, 'exports-spec-tablet');
	const customer = `customer-${Date.now().toString(36)}@example.com`;
	await ownerQuery(`update job set customer_email = $1 where id = $2`, [customer, jobId]);

	const page = await as(browser, DEMO.quality.email);
	await page.goto(`/quality/runs/${runId}`);
	const exports = page.getByRole('region', { name: 'Exports' });
	const [download] = await Promise.all([
		page.waitForEvent('download'),
		exports.getByRole('link', { name: 'Download PDF' }).click()
	]);
	const file = await download.path();
	const text = (await promisify(execFile)('/usr/bin/pdftotext', ['-layout', file, '-'])).stdout;
	const [exp] = await ownerQuery<{ head: string; count: number; sha256: string }>(
		`select body->>'head' as head, (body->>'count')::int as count, body->>'sha256' as sha256
		 from ledger_record where run_id = $1 and kind = 'export' order by seq desc limit 1`,
		[runId]
	);
	expect(text).toContain(`${TECH_NAME} (technician)`);
	expect(text).toContain('22.013 mm');
	expect(text).toContain(`Chain head after ${exp.count} records`);
	expect(text).toContain(exp.head);
	expect(text).toContain(jobNumber);

	const form = exports.locator('form');
	await form.getByLabel('Link open for (days)').fill('2');
	await form.getByRole('button', { name: 'E-mail the rebuild record' }).click();
	await expect(exports.getByText('The rebuild record was e-mailed to the customer')).toBeVisible();

	const mail = await waitForMail(customer);
	const link = linkIn(mail.text, '/record');
	const visitor = await (await browser.newContext()).newPage();
	await visitor.goto(link);
	await expect(visitor.getByRole('heading', { name: `Rebuild record · ${jobNumber}` })).toBeVisible();
	await expect(visitor.getByText(/recalibrated or adapted by a qualified person/)).toBeVisible();
	await expect(visitor.getByText(TECH_NAME)).toHaveCount(0);

	await ownerQuery(`update customer_record_link set expires_at = now() - interval '1 minute' where run_id = $1`, [
		runId
	]);
	await visitor.reload();
	await expect(visitor.getByText('This link has expired')).toBeVisible();
	await expect(visitor.getByRole('heading', { name: `Rebuild record · ${jobNumber}` })).toHaveCount(0);
});
