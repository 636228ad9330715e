import { expect, test, type Page } from '@playwright/test';
import jsQR from 'jsqr';
import { PNG } from 'pngjs';
import { DEMO, ownerQuery, signIn } from './support';

// Demo data: the invented Kestrel Lane shop (src/lib/server/registers-seed.ts). Every value here is invented.
const iso = (days = 0) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10);
const uniq = () => Date.now().toString(36).slice(-5).toUpperCase();

/** A small real PNG, as a phone would send (the pipeline checks content, not the name). */
function photo(): Buffer {
	const png = new PNG({ width: 96, height: 64 });
	for (let i = 0; i < png.data.length; i += 4) {
		png.data[i] = (i / 4) % 96;
		png.data[i + 1] = 120;
		png.data[i + 2] = 200;
		png.data[i + 3] = 255;
	}
	return PNG.sync.write(png);
}

async function fillJob(page: Page, over: Record<string, string> = {}) {
	const values: Record<string, string> = {
		'Customer name': 'Oriel Vantress',
		'Customer e-mail': 'oriel@example.com',
		'Customer phone': '+1 555 0190',
		'Unit or vehicle model': 'Halden Sport 1.8 (invented)',
		'Unit serial number': `KTX7-E2E-${uniq()}`,
		Mileage: '72040',
		"Customer's complaint": 'Flare on the 1–2 shift when cold.',
		'Fault codes read at intake': 'P17BF, p0841',
		'Intake notes': 'Pan wet at the rear bolts.',
		...over
	};
	for (const [label, value] of Object.entries(values)) await page.getByLabel(label, { exact: true }).fill(value);
	return values;
}

test.describe('registers, as a new lead would use them', () => {
	test('opens a job at intake with a photo and fault codes; the printed card’s QR opens the job', async ({
		page,
		baseURL
	}) => {
		await signIn(page, DEMO.lead.email);
		await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Jobs' }).click();
		await expect(page.getByRole('table', { name: 'Jobs' }).getByRole('row')).not.toHaveCount(1);
		await page.getByRole('link', { name: 'New job at intake' }).click();

		// An e-mail that is not one: a message beside the field, and nothing typed is lost.
		const typed = await fillJob(page, { 'Customer e-mail': 'oriel at example' });
		await page.getByRole('button', { name: 'Open job' }).click();
		await expect(page.getByText('Enter an e-mail address such as name@example.com')).toBeVisible();
		await expect(page.getByLabel('Unit serial number', { exact: true })).toHaveValue(typed['Unit serial number']);
		await expect(page.getByLabel("Customer's complaint", { exact: true })).toHaveValue(typed["Customer's complaint"]);

		await page.getByLabel('Customer e-mail', { exact: true }).fill('oriel@example.com');
		await page.getByLabel('Photos').setInputFiles({ name: 'intake.png', mimeType: 'image/png', buffer: photo() });
		await page.getByRole('button', { name: 'Open job' }).click();
		await expect(page).toHaveURL(/\/jobs\/[0-9a-f-]{36}$/);
		const jobId = page.url().split('/').pop()!;
		await expect(page.getByRole('heading', { level: 1 })).toHaveText(/^KL-\d{2}-\d{4,}$/);
		await expect(page.getByTestId('fault-codes')).toHaveText('P17BF, P0841');
		const img = page.getByRole('img', { name: /Intake photo/ });
		await expect(img).toBeVisible();
		await expect.poll(() => img.evaluate((el: HTMLImageElement) => el.naturalWidth)).toBeGreaterThan(0);
		const rows = await ownerQuery<{ n: string }>('select count(*)::text as n from job_photo where job_id = $1', [
			jobId
		]);
		expect(rows[0].n).toBe('1');

		await page.getByRole('link', { name: 'Job card' }).click();
		await expect(page).toHaveURL(`/jobs/${jobId}/card`);
		await page.evaluate(() => {
			(window as unknown as { printed: boolean }).printed = false;
			window.print = () => ((window as unknown as { printed: boolean }).printed = true);
		});
		await page.getByRole('button', { name: 'Print job card' }).click();
		expect(await page.evaluate(() => (window as unknown as { printed: boolean }).printed)).toBe(true);
		await page.emulateMedia({ media: 'print' });
		await expect(page.getByRole('navigation', { name: 'Main' })).toBeHidden();
		await expect(page.getByRole('button', { name: 'Print job card' })).toBeHidden();

		const shot = PNG.sync.read(await page.getByTestId('job-qr').screenshot());
		const code = jsQR(new Uint8ClampedArray(shot.data), shot.width, shot.height);
		expect(code?.data).toBe(`${baseURL}/jobs/${jobId}`);
	});

	test('registers a torque wrench, records its calibration, then a failed as-found blocks it', async ({ page }) => {
		await signIn(page, DEMO.lead.email);
		await expect(page).toHaveURL(DEMO.lead.home);
		await page.goto('/tools');
		await expect(page.getByRole('table', { name: 'Due soon' })).toContainText('TW-031');

		// Duplicate asset tag (a seeded tool): message beside the field, the rest kept.
		await page.getByLabel('Asset tag', { exact: true }).fill('tw-014');
		await page.getByLabel('Kind', { exact: true }).selectOption('torque_click');
		await page.getByLabel('Description', { exact: true }).fill('Click wrench 4–20 N·m, 3/8 in drive');
		await page.getByLabel('Range from', { exact: true }).fill('4');
		await page.getByLabel('Range to', { exact: true }).fill('20');
		await page.getByLabel('Unit', { exact: true }).selectOption('N·m');
		await page.getByLabel('Resolution (in the unit)', { exact: true }).fill('0.1');
		await page.getByLabel('Accuracy, ± % of reading', { exact: true }).fill('4');
		await page.getByRole('button', { name: 'Register tool' }).click();
		await expect(page.getByText('Another tool already has this asset tag')).toBeVisible();
		await expect(page.getByLabel('Description', { exact: true })).toHaveValue('Click wrench 4–20 N·m, 3/8 in drive');
		await expect(page.getByLabel('Range to', { exact: true })).toHaveValue('20');

		const tag = `TW-E2E-${uniq()}`;
		await page.getByLabel('Asset tag', { exact: true }).fill(tag);
		await page.getByRole('button', { name: 'Register tool' }).click();
		await expect(page).toHaveURL(/\/tools\/[0-9a-f-]{36}\?registered=1$/);
		const toolId = new URL(page.url()).pathname.split('/').pop()!;
		await expect(page.getByText('Blocked: no calibration on record')).toBeVisible();

		// Dated in the future, then a next due date before the calibration date: each beside its field.
		await page.getByLabel('Date of calibration or check', { exact: true }).fill(iso(3));
		await page.getByLabel('Certificate number', { exact: true }).fill('KLC-E2E-1');
		await page.getByLabel('Next due', { exact: true }).fill(iso(365));
		await page.getByRole('button', { name: 'Save record' }).click();
		await expect(page.getByText('The calibration cannot be dated in the future.')).toBeVisible();
		await page.getByLabel('Date of calibration or check', { exact: true }).fill(iso(0));
		await page.getByLabel('Next due', { exact: true }).fill(iso(-1));
		await page.getByRole('button', { name: 'Save record' }).click();
		await expect(page.getByText('The next due date must come after the calibration date.')).toBeVisible();
		await expect(page.getByLabel('Certificate number', { exact: true })).toHaveValue('KLC-E2E-1');

		await page.getByLabel('Next due', { exact: true }).fill(iso(365));
		await page.getByRole('button', { name: 'Save record' }).click();
		await expect(page.getByRole('status').filter({ hasText: 'Calibration recorded.' })).toBeVisible();
		await page.reload();
		await expect(page.locator('[data-tool-status]').first()).toHaveAttribute('data-tool-status', 'usable');
		const usable = async () =>
			((await (await page.request.get('/api/tools?usable=1')).json()) as { tools: { id: string }[] }).tools.map(
				(t) => t.id
			);
		expect(await usable()).toContain(toolId);

		await page.getByLabel('Record', { exact: true }).selectOption('check');
		await page.getByLabel('As found', { exact: true }).selectOption('out');
		await page.getByLabel('Notes', { exact: true }).fill('Reads 8 % high at 10 N·m on the shop tester.');
		await page.getByRole('button', { name: 'Save record' }).click();
		await expect(page.getByRole('status').filter({ hasText: 'Check recorded.' })).toBeVisible();
		await page.reload();
		await expect(page.getByText('Blocked: found out of tolerance, not recalibrated since')).toBeVisible();
		expect(await usable()).not.toContain(toolId);
		const log = await ownerQuery<{ action: string }>('select action from admin_log where subject_id = $1 order by id', [
			toolId
		]);
		expect(log.map((l) => l.action)).toEqual([
			'tool.registered',
			'tool.calibration_recorded',
			'tool.calibration_recorded'
		]);
	});

	test('records a qualification', async ({ page }) => {
		await signIn(page, DEMO.lead.email);
		await expect(page).toHaveURL(DEMO.lead.home);
		await page.goto('/qualifications');
		const wren = page.getByRole('region', { name: 'Wren Okafor' });
		await expect(wren).not.toContainText('transmission control adaptation');
		await page.getByLabel('Person', { exact: true }).selectOption({ label: 'Wren Okafor' });
		await page.getByLabel('Procedure family or qualification', { exact: true }).fill('transmission control adaptation');
		await page.getByLabel('Trained on', { exact: true }).fill(iso(0));
		await page.getByLabel('Expires on (leave empty if it does not)', { exact: true }).fill(iso(365));
		await page.getByRole('button', { name: 'Record training' }).click();
		await expect(page.getByRole('status').filter({ hasText: 'Training recorded.' })).toBeVisible();
		await expect(wren).toContainText('transmission control adaptation');
		await expect(wren.getByRole('row', { name: /transmission control adaptation/ })).toContainText('In force');
	});
});

test.describe('a technician reads the registers but cannot edit them', () => {
	test('reads jobs and tools; every edit is refused with 403, through the UI and the API', async ({
		page,
		baseURL
	}) => {
		await signIn(page, DEMO.technician.email);
		await expect(page).toHaveURL(DEMO.technician.home);
		await page.goto('/jobs');
		await expect(page.getByRole('table', { name: 'Jobs' })).toContainText('KL-');
		await expect(page.getByRole('link', { name: 'New job at intake' })).toHaveCount(0);
		await page.goto('/tools');
		await expect(page.getByRole('table', { name: 'Tool register' })).toContainText('TW-014');
		await expect(page.getByRole('button', { name: 'Register tool' })).toHaveCount(0);
		expect((await page.goto('/jobs/new'))?.status()).toBe(403);

		const form = { headers: { origin: baseURL!, accept: 'text/html' }, maxRedirects: 0 };
		expect((await page.request.post('/tools?/create', { ...form, form: { assetTag: 'TW-HACK-1' } })).status()).toBe(
			403
		);
		expect((await page.request.post('/jobs/new', { ...form, form: { customerName: 'X' } })).status()).toBe(403);
		const json = { headers: { origin: baseURL! } };
		expect((await page.request.post('/api/tools', { ...json, data: { assetTag: 'TW-HACK-2' } })).status()).toBe(403);
		expect((await page.request.post('/api/jobs', { ...json, data: {} })).status()).toBe(403);
		const tools = (await (await page.request.get('/api/tools')).json()) as { tools: { id: string }[] };
		expect(
			(await page.request.post(`/api/tools/${tools.tools[0].id}/calibrations`, { ...json, data: {} })).status()
		).toBe(403);
		expect((await page.request.get('/api/people')).status()).toBe(403);
		expect((await page.request.get('/api/jobs')).status()).toBe(200);
	});
});
