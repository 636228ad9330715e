/** Helpers shared by the runner's browser tests (runner*.spec.ts). Everything they make is invented test data. */
import { expect, type Browser, type Locator, type Page } from '@playwright/test';
import sharp from 'sharp';
import { DEMO, ownerQuery, signIn } from './support';

export const PORTRAIT = { width: 820, height: 1180 };
export const LANDSCAPE = { width: 1180, height: 820 };
export const FAMILY = 'KTX-7 (invented seven-speed dual-clutch transaxle)';

export async function tablet(
	browser: Browser,
	email: string,
	opts: { viewport?: { width: number; height: number }; password?: string } = {}
): Promise<Page> {
	const page = await (await browser.newContext({ viewport: opts.viewport ?? PORTRAIT })).newPage();
	await signIn(page, email, opts.password);
	await expect(page).not.toHaveURL(/\/signin/);
	return page;
}

/** A small real picture (a PNG the server re-encodes), different per seed so each upload is its own object. */
export async function photoFile(name: string, seed = 1) {
	const buffer = await sharp({
		create: { width: 96, height: 72, channels: 3, background: { r: (seed * 53) % 256, g: 110, b: 160 } }
	})
		.png()
		.toBuffer();
	return { name, mimeType: 'image/png', buffer };
}

/** Types a number on the checkpoint's on-screen keypad and records it. */
export async function keyIn(pad: Locator, value: string) {
	for (const ch of value)
		await pad.getByRole('button', { name: ch === '.' ? 'Decimal point' : ch, exact: true }).click();
	await pad.getByRole('button', { name: 'Record', exact: true }).click();
}

/** Picks the signer by name, then types the PIN and signs. */
export async function signAs(panel: Locator, name: string, pin: string) {
	await panel.getByRole('button', { name, exact: true }).click();
	await typePin(panel, pin);
}

export async function typePin(panel: Locator, pin: string) {
	for (const d of pin) await panel.getByRole('button', { name: d, exact: true }).click();
	await panel.getByRole('button', { name: 'Sign', exact: true }).click();
}

/** Through the API: the lead writes and submits the procedure, the quality lead approves, the lead starts a run. */
export async function publishAndStart(browser: Browser, source: string, assignee: string = DEMO.technician.email) {
	const lead = await tablet(browser, DEMO.lead.email);
	const created = await lead.request.post('/api/procedures', { data: { source } });
	expect(created.status(), await created.text()).toBe(201);
	const { id } = (await created.json()) as { id: string };
	const submitted = await lead.request.post(`/api/procedures/${id}/submit`);
	expect(submitted.ok(), await submitted.text()).toBe(true);
	const quality = await tablet(browser, DEMO.quality.email);
	const approved = await quality.request.post(`/api/procedures/${id}/approve`, {
		data: { changeNote: 'Runner test procedure (invented).' }
	});
	expect(approved.status(), await approved.text()).toBe(201);
	await quality.context().close();
	const [version] = await ownerQuery<{ id: string; content_hash: string }>(
		`select id, content_hash from procedure_version where procedure_id = $1 and number = 1`,
		[id]
	);
	const [job] = await ownerQuery<{ id: string }>(`select id from job where complaint = $1`, ['Harsh 2–3 upshift.']);
	const [tech] = await ownerQuery<{ id: string }>(`select id from app_user where email = $1`, [assignee]);
	const run = await lead.request.post('/api/runs', {
		data: { jobId: job.id, procedureVersionId: version.id, contentHash: version.content_hash, assignedToId: tech.id }
	});
	expect(run.status(), await run.text()).toBe(201);
	const { id: runId } = (await run.json()) as { id: string };
	await lead.context().close();
	return runId;
}

/** A unique title so each test publishes its own procedure. */
export const stamp = () => `${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 6)}`;

/**
 * The demo lead enrols the page's browser context (one context is one tablet) as `label` on /bench/devices. With
 * `handTo`, the lead's session is then dropped and that person signs in on the same tablet.
 */
export async function enrolTablet(page: Page, label: string, opts: { handTo?: string } = {}) {
	await signIn(page, DEMO.lead.email);
	// Wait for the sign-in to land: a goto while its POST is in flight would race it.
	await expect(page).toHaveURL(DEMO.lead.home);
	await page.goto('/bench/devices');
	await page.getByLabel('Tablet name').fill(label);
	await page.getByRole('button', { name: 'Enrol this tablet' }).click();
	const here = page.getByTestId('this-tablet');
	await expect(here).toContainText(label);
	await expect(here).toContainText('Enrolled');
	if (!opts.handTo) return;
	await page.context().clearCookies();
	await signIn(page, opts.handTo);
	await expect(page).not.toHaveURL(/\/signin/);
}
