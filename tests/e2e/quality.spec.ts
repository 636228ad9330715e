import { expect, test, type Browser, type Page } from '@playwright/test';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import { DEMO, ownerQuery, signIn } from './support';

// Demo data: the invented Kestrel Lane shop and its invented KTX-7 procedures (procedures/*.md; not service data).
// Bore 1 is 22 mm H7 = 22.000–22.021 mm (ISO 286-2: IT7 for 18–30 mm is 21 µm, H puts EI at 0), so 22.013 mm is
// inside. Tomas Reyna (tech@example.com, demo PIN 111111) holds the training the bore step needs.
const TECH_NAME = 'Tomas Reyna';
const TECH_PIN = '111111';

async function as(browser: Browser, email: string): Promise<Page> {
	const page = await (await browser.newContext()).newPage();
	await signIn(page, email);
	await expect(page).not.toHaveURL(/\/signin/);
	return page;
}

/** Through the API: the lead starts a bore-inspection run for the technician, who records one bore attempt. */
async function seedRun(browser: Browser): Promise<{ runId: string; jobNumber: string }> {
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
					deviceId: 'quality-spec-tablet'
				}
			],
			pins: { [tech.id]: TECH_PIN }
		}
	});
	const answers = (await sent.json()) as { answers: { status: string; reason?: string }[] };
	expect(answers.answers[0], JSON.stringify(answers)).toMatchObject({ status: 'accepted' });
	await bench.context().close();
	return { runId, jobNumber: job.job_number };
}

test('a quality lead sees a run under way, verifies its chain and opens its record', async ({ browser }) => {
	const { runId, jobNumber } = await seedRun(browser);
	const page = await as(browser, DEMO.quality.email);
	await page.goto('/quality');
	const inProgress = page.getByRole('region', { name: 'Runs in progress' });
	const row = inProgress.getByRole('row').filter({ has: page.locator(`a[href="/quality/runs/${runId}"]`) });
	await expect(row).toContainText(jobNumber);
	await expect(row).toContainText(TECH_NAME);
	await row.getByRole('button', { name: `Verify chain of ${jobNumber}` }).click();
	await expect(row.getByText('Chain intact')).toBeVisible();
	await expect(row).toContainText('1 records');

	await row.getByRole('link', { name: jobNumber }).click();
	await expect(page).toHaveURL(`/quality/runs/${runId}`);
	await expect(page.getByRole('heading', { name: `Run record · ${jobNumber}` })).toBeVisible();
	await expect(page.getByText(`${TECH_NAME} (technician)`)).toBeVisible();
	await expect(page.getByText('As entered: 22.013 · 22.012 · 22.011 · 22.012')).toBeVisible();
	await expect(page.getByRole('cell', { name: '22.013 mm' }).first()).toBeVisible();
	await page.getByRole('button', { name: 'Verify chain' }).click();
	await expect(page.getByText('Chain intact')).toBeVisible();
});
