import AxeBuilder from '@axe-core/playwright';
import { expect, test } from '@playwright/test';
import { DEMO, ownerQuery, signIn } from './support';

// Demo history (src/lib/server/history-seed.ts, all invented): 12 filters runs, of which 4 (i = 2, 5, 8, 11) took the
// suction filter KL-7710-01A from lot L26-0587; torque wrench TW-019 tightened the cover screws of 22 of the 34
// valve-body runs and was found out of tolerance at its latest calibration; bore 1 (22 mm H7 = 22.000–22.021 mm,
// ISO 286-2) has 136 signed readings.

test('a quality lead traces a lot, opens a suspect tool and reads the bore trend with Ppk', async ({ page }) => {
	await signIn(page, DEMO.quality.email);
	await expect(page).toHaveURL(/\/quality$/);

	// Search by lot: which units received L26-0587?
	await page.getByRole('link', { name: 'Search runs and trace lots' }).click();
	await expect(page.getByRole('heading', { name: 'Search runs' })).toBeVisible();
	await page.getByLabel('Part lot or serial').fill('L26-0587');
	await page.getByRole('button', { name: 'Search', exact: true }).click();
	await expect(page).toHaveURL(/lot=L26-0587/);
	await expect(page.getByText('4 runs match — units that received L26-0587.')).toBeVisible();
	const table = page.getByRole('table', { name: /Runs found/ });
	await expect(table.getByRole('row')).toHaveCount(5);
	await expect(table.getByText('KL-7710-01A · lot L26-0587')).toHaveCount(4);
	await expect(page.getByText('Runs 1–4 of 4')).toBeVisible();

	// Sort by job number, from the column header (the JSON route sorts).
	await table.getByRole('button', { name: /^Job/ }).click();
	await expect(page).toHaveURL(/sort=jobNumber/);
	await expect(table.getByRole('columnheader', { name: /^Job/ })).toHaveAttribute('aria-sort', 'ascending');
	const jobs = await table.locator('tbody tr td:first-child').allInnerTexts();
	expect(jobs).toEqual([...jobs].sort());

	// A bad date is refused beside its field, and what was typed stays.
	await page.getByLabel('Signed from').fill('2026-12-01');
	await page.getByLabel('Signed to').fill('2026-11-01');
	await page.getByRole('button', { name: 'Search', exact: true }).click();
	await expect(page.getByText('The end date is before the start.')).toBeVisible();
	await expect(page.getByLabel('Part lot or serial')).toHaveValue('L26-0587');
	const axe = await new AxeBuilder({ page }).include('main').analyze();
	expect(axe.violations.map((v) => `${v.id}: ${v.help}`)).toEqual([]);

	// Suspect tool, from the tool's own page.
	const [tool] = await ownerQuery<{ id: string }>(`select id from tool where asset_tag = 'TW-019'`);
	await page.goto(`/tools/${tool.id}`);
	await page.getByRole('link', { name: 'Runs signed with TW-019 since its last good calibration' }).click();
	await expect(page.getByRole('heading', { name: 'Suspect tool: TW-019' })).toBeVisible();
	await expect(page.getByText(/TW-019 was found out of tolerance on/)).toBeVisible();
	await expect(page.getByText(/^22 runs, 22 records\.$/)).toBeVisible();
	await expect(page.getByRole('table', { name: /Runs signed with TW-019/ }).getByRole('row')).toHaveCount(23);

	// Trends: the bore reading chart, Ppk and the data table beside it.
	await page.goto('/quality');
	await page.getByRole('link', { name: 'Trends' }).click();
	await page.getByLabel('Procedure').selectOption({ label: 'Valve body teardown and shift-piston bore inspection' });
	await expect(page.getByLabel('Measure checkpoint')).toHaveValue('bore-1');
	await expect(page.getByTestId('trend-chart').locator('canvas')).toBeVisible();
	await expect(page.getByTestId('reading-count')).toHaveText('136');
	await expect(page.getByText('Ppk (performance index)')).toBeVisible();
	await expect(page.getByTestId('ppk')).toHaveText(/^\d+\.\d\d$/);
	await expect(page.getByTestId('readings-table').getByRole('row')).toHaveCount(137);
	await expect(page.getByRole('table', { name: 'Findings and comebacks per version' })).toContainText('v1');
});
