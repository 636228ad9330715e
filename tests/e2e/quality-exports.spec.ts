import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import { expect, test, type Browser, type Page } from '@playwright/test';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import { DEMO, linkIn, ownerQuery, signIn, waitForMail } from './support';

// Demo data: the invented Kestrel Lane shop and its invented KTX-7 procedures (not service data). Bore 1 is 22 mm H7
// = 22.000–22.021 mm (ISO 286-2: IT7 for 18–30 mm is 21 µm, H puts EI at 0), so 22.013 mm is inside.
const TECH_NAME = 'Tomas Reyna';
const TECH_PIN = '111111';

async function as(browser: Browser, email: string): Promise<Page> {
	const page = await (await browser.newContext()).newPage();
	await signIn(page, email);
	await expect(page).not.toHaveURL(/\/signin/);
	return page;
}

/** Through the API: the lead starts a bore-inspection run for the technician, who records one bore attempt. */
async function seedRun(browser: Browser): Promise<{ runId: string; jobId: string; jobNumber: string }> {
	const [job] = await ownerQuery<{ id: string; job_number: string }>(
		`select id, job_number from job where complaint = $1`,
		['Harsh 2–3 upshift.']
	);
	const [version] = await ownerQuery<{ id: string; content_hash: string }>(
		`select v.id, v.content_hash from procedure_version v join procedure p on p.id = v.procedure_id
		 where p.title ilike '%shift-piston bore inspection%' and v.retired_at is null order by v.number desc limit 1`
	);
	const [tech] = await ownerQuery<{ id: string }>(`select id from app_user where email = $1`, [DEMO.technician.email]);
	const lead = await as(browser, DEMO.lead.email);
	const started = await lead.request.post('/api/runs', {
		data: { jobId: job.id, procedureVersionId: version.id, contentHash: version.content_hash, assignedToId: tech.id }
	});
	expect(started.status(), await started.text()).toBeLessThan(300);
	const runId = ((await started.json()) as { id: string }).id;
	await lead.context().close();

	const bench = await as(browser, DEMO.technician.email);
	const sent = await bench.request.post(`/api/runs/${runId}/records`, {
		data: {
			records: [
				{
					id: uuidv7(),
					runId,
					kind: 'attempt',
					body: {
						stepIndex: 2,
						entries: [
							{
								checkpointId: 'bore-1',
								entry: { stage: 'standard', zeroed: true, readings: ['22.013', '22.012', '22.011', '22.012'] }
							}
						]
					},
					signer: { id: tech.id, role: 'technician' },
					deviceId: 'exports-spec-tablet'
				}
			],
			pins: { [tech.id]: TECH_PIN }
		}
	});
	const answers = (await sent.json()) as { answers: { status: string }[] };
	expect(answers.answers[0], JSON.stringify(answers)).toMatchObject({ status: 'accepted' });
	await bench.context().close();
	return { runId, jobId: job.id, jobNumber: job.job_number };
}

test('a quality lead downloads the PDF and mails the customer record, whose link works until it expires', async ({
	browser
}) => {
	const { runId, jobId, jobNumber } = await seedRun(browser);
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
