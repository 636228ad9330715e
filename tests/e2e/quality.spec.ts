import { expect, test } from '@playwright/test';
import { DEMO } from './support';
import { as, runWithBoreAttempt, TECH_NAME } from './quality-support';

// Demo data: the invented Kestrel Lane shop and its invented KTX-7 procedures (procedures/*.md; not service data).
// The run holds one bore 1 attempt of 22.013 mm, inside 22 mm H7 (quality-support.ts names the source).

test('a quality lead sees a run under way, verifies its chain and opens its record', async ({ browser }) => {
	const { runId, jobNumber } = await runWithBoreAttempt(browser, 'quality-spec-tablet');
	const page = await as(browser, DEMO.quality.email);
	await page.goto('/quality');
	const inProgress = page.getByRole('region', { name: 'Runs in progress' });
	const row = inProgress.getByRole('row').filter({ has: page.locator(`a[href="/quality/runs/${runId}"]`) });
	await expect(row).toContainText(jobNumber);
	await expect(row).toContainText(TECH_NAME);
	await row.getByRole('button', { name: `Verify chain of ${jobNumber}` }).click();
	await expect(row.getByText('Chain intact')).toBeVisible();
	await expect(row).toContainText(/\b1 record(?!s)/);

	await row.getByRole('link', { name: jobNumber }).click();
	await expect(page).toHaveURL(`/quality/runs/${runId}`);
	await expect(page.getByRole('heading', { name: `Run record · ${jobNumber}` })).toBeVisible();
	await expect(page.getByText(`${TECH_NAME} (technician)`)).toBeVisible();
	await expect(page.getByText('As entered: 22.013 · 22.012 · 22.011 · 22.012')).toBeVisible();
	await expect(page.getByRole('cell', { name: '22.013 mm' }).first()).toBeVisible();
	await page.getByRole('button', { name: 'Verify chain' }).click();
	await expect(page.getByText('Chain intact')).toBeVisible();
});

test('a quality lead verifies every chain from the quality home and reads the counts', async ({ browser }) => {
	await runWithBoreAttempt(browser, 'quality-spec-verify-all');
	const page = await as(browser, DEMO.quality.email);
	await page.goto('/quality');
	const proof = page.getByRole('region', { name: 'Proof of integrity' });
	await proof.getByRole('button', { name: 'Verify every chain' }).click();
	// The demo ledger is untouched: every chain intact, with the number of runs and records checked.
	await expect(proof.getByText('Every chain intact')).toBeVisible({ timeout: 30_000 });
	await expect(proof).toContainText(/\d+ runs, [\d,]+ records in \d+\.\d s/);
});
