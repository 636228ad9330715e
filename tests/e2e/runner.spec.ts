import { expect, test, type Browser, type Locator, type Page } from '@playwright/test';
import { DEMO, ownerQuery, signIn } from './support';

// Demo data: the invented Kestrel Lane shop and its invented KTX-7 procedures (procedures/*.md; not service data).
// Bore 1 is 22 mm H7 = 22.000–22.021 mm (ISO 286-2: IT7 for 18–30 mm is 21 µm, H puts EI at 0), so 22.030 mm is
// 0.009 mm over and 22.010 mm is inside. Tomas Reyna (tech@example.com, demo PIN 111111) holds KTX-7 and
// "valve-body rebuild" training (src/lib/server/registers-seed.ts), which the bore step needs.
const TABLET = { width: 820, height: 1180 };
const TECH_NAME = 'Tomas Reyna';
const BORE_STEP = 'Step 3: Clean and inspect shift-piston bore 1';

async function tablet(browser: Browser, email: string): Promise<Page> {
	const page = await (await browser.newContext({ viewport: TABLET })).newPage();
	await signIn(page, email);
	await expect(page).not.toHaveURL(/\/signin/);
	return page;
}

/** As the demo lead: starts a bore-inspection run on the open demo job "Harsh 2–3 upshift" for the technician. */
async function startRun(browser: Browser): Promise<string> {
	const [job] = await ownerQuery<{ id: string }>(`select id from job where complaint = $1`, ['Harsh 2–3 upshift.']);
	const lead = await tablet(browser, DEMO.lead.email);
	await lead.goto(`/jobs/${job.id}`);
	const version = lead.getByLabel('Procedure (published version)');
	const label = await version.locator('option', { hasText: 'shift-piston bore inspection' }).first().textContent();
	await version.selectOption({ label: label!.trim() });
	await lead.getByLabel('Assign to').selectOption({ label: TECH_NAME });
	await lead.getByRole('button', { name: 'Start run' }).click();
	await expect(lead).toHaveURL(/\/runs\/[0-9a-f-]{36}$/);
	const runId = lead.url().split('/').at(-1)!;
	await lead.goto(`/jobs/${job.id}`);
	await expect(lead.locator(`a[href="/runs/${runId}"]`)).toBeVisible();
	await lead.context().close();
	return runId;
}

async function type(pad: Locator, value: string) {
	for (const ch of value)
		await pad.getByRole('button', { name: ch === '.' ? 'Decimal point' : ch, exact: true }).click();
	await pad.getByRole('button', { name: 'Record', exact: true }).click();
}

async function pin(panel: Locator, digits: string) {
	for (const d of digits) await panel.getByRole('button', { name: d, exact: true }).click();
	await panel.getByRole('button', { name: 'Sign', exact: true }).click();
}

test('a technician measures a bore out of tolerance, measures again, and signs the step with the PIN', async ({
	browser
}) => {
	test.setTimeout(60_000); // some forty taps on a keypad, two sign-ins: near the 30 s default when workers share the CPU
	const runId = await startRun(browser);
	const page = await tablet(browser, DEMO.technician.email);
	await page.goto(`/runs/${runId}`);
	await page.getByRole('button', { name: BORE_STEP }).click();
	await expect(
		page.getByRole('heading', { name: 'Step 3: Clean and inspect shift-piston bore 1', exact: true })
	).toBeVisible();

	const bore = page.getByRole('region', { name: 'Checkpoint bore-1' });
	await bore.getByRole('button', { name: 'Zeroed' }).click();
	await expect(bore.getByText('mm', { exact: true }).first()).toBeVisible();
	await type(bore, '22.030');
	const verdict = page.getByTestId('verdict-bore-1');
	await expect(verdict).toContainText('Fail');
	await expect(verdict).toContainText('0.009 mm above the maximum of 22.021 mm');

	await page.getByRole('button', { name: 'Measure again' }).click();
	const attemptPanel = page.getByRole('region', { name: 'Record the failed attempt' });
	await attemptPanel.getByRole('button', { name: TECH_NAME }).click();
	await pin(attemptPanel, '111111');
	await expect(page.getByText(`Failed attempt by ${TECH_NAME}`)).toBeVisible();
	const attempts = await ownerQuery<{ body: { evaluation: { status: string }[] } }>(
		`select body from ledger_record where run_id = $1 and kind = 'attempt'`,
		[runId]
	);
	expect(attempts).toHaveLength(1);
	expect(attempts[0].body.evaluation[0].status).toBe('fail');
	await expect(bore.getByRole('button', { name: /Reading 1 \(top, 0°\) —/ })).toBeVisible();

	for (const r of ['22.010', '22.011', '22.010', '22.012']) await type(bore, r);
	await expect(verdict).toContainText('Pass');
	await expect(verdict).not.toContainText('Fail');

	await page.getByRole('button', { name: 'Sign this step' }).click();
	const signPanel = page.getByRole('region', { name: 'Sign step 3' });
	await signPanel.getByRole('button', { name: TECH_NAME }).click();
	await pin(signPanel, '999999');
	await expect(page.getByText(`Step 3 sign-off by ${TECH_NAME}: Wrong PIN for ${TECH_NAME}`)).toBeVisible();
	await pin(signPanel, '111111');
	await expect(page.getByRole('button', { name: `${BORE_STEP}, signed` })).toBeVisible();
	const signoffs = await ownerQuery<{ signer_id: string; body: { evaluation: { status: string }[] } }>(
		`select signer_id, body from ledger_record where run_id = $1 and kind = 'signoff'`,
		[runId]
	);
	expect(signoffs).toHaveLength(1);
	expect(signoffs[0].body.evaluation[0].status).toBe('pass');
	const [tech] = await ownerQuery<{ id: string }>(`select id from app_user where email = $1`, [DEMO.technician.email]);
	expect(signoffs[0].signer_id).toBe(tech.id);
});

test('a critical step is verified by a second person; the doer’s own verification is refused with the reason', async ({
	browser
}) => {
	test.setTimeout(60_000);
	// Lena Marsh (lead, demo PIN 222222) holds KTX-7 and valve-body rebuild training, so she may do the bore step;
	// Priya Castell (quality, demo PIN 333333) did not do it.
	const runId = await startRun(browser);
	const page = await tablet(browser, DEMO.lead.email);
	await page.goto(`/runs/${runId}`);
	await page.getByRole('button', { name: BORE_STEP }).click();
	const bore = page.getByRole('region', { name: 'Checkpoint bore-1' });
	await bore.getByRole('button', { name: 'Zeroed' }).click();
	for (const r of ['22.010', '22.011', '22.010', '22.012']) await type(bore, r);
	await page.getByRole('button', { name: 'Sign this step' }).click();
	const signPanel = page.getByRole('region', { name: 'Sign step 3' });
	await signPanel.getByRole('button', { name: 'Lena Marsh' }).click();
	await pin(signPanel, '222222');
	await expect(page.getByText('Awaiting verification', { exact: true })).toBeVisible();

	await page.getByRole('button', { name: 'Verify this step' }).click();
	const verifyPanel = page.getByRole('region', { name: 'Verify step 3' });
	await verifyPanel.getByRole('button', { name: 'Lena Marsh' }).click();
	await pin(verifyPanel, '222222');
	await expect(
		page.getByText(
			'Step 3 verification by Lena Marsh: Lena Marsh worked on step 3, so cannot verify it: a critical step is verified by a second person.'
		)
	).toBeVisible();
	await verifyPanel.getByRole('button', { name: 'Not Lena Marsh? Pick again' }).click();
	await verifyPanel.getByRole('button', { name: 'Priya Castell' }).click();
	await pin(verifyPanel, '333333');
	await expect(page.getByText(`Step 3 verification by Priya Castell`, { exact: true })).toBeVisible();
	// Verified, the run goes on to the next step; back on step 3 the badge says so.
	await expect(page.getByRole('heading', { name: /^Step 4:/ })).toBeVisible();
	await page.getByRole('button', { name: 'Back', exact: true }).click();
	await expect(page.getByText('Verified', { exact: true })).toBeVisible();
	const rows = await ownerQuery<{ kind: string; signer_role: string }>(
		`select kind, signer_role from ledger_record where run_id = $1 order by seq`,
		[runId]
	);
	expect(rows).toEqual([
		{ kind: 'signoff', signer_role: 'lead' },
		{ kind: 'verification', signer_role: 'quality' }
	]);
});

test('every button and input on the runner step screen is at least 64 × 64 CSS px', async ({ browser }) => {
	const runId = await startRun(browser);
	const page = await tablet(browser, DEMO.technician.email);
	await page.goto(`/runs/${runId}`);
	await page.getByRole('button', { name: BORE_STEP }).click();
	await page.getByRole('region', { name: 'Checkpoint bore-1' }).getByRole('button', { name: 'Zeroed' }).click();
	const targets = page.locator('main button, main input, main [role=button]');
	const count = await targets.count();
	expect(count).toBeGreaterThan(20);
	const small: string[] = [];
	for (let i = 0; i < count; i++) {
		const t = targets.nth(i);
		const box = await t.boundingBox();
		if (!box) continue; // hidden inputs take no space
		if (box.width < 64 || box.height < 64)
			small.push(`${(await t.getAttribute('aria-label')) ?? (await t.innerText())}: ${box.width}×${box.height}`);
	}
	expect(small).toEqual([]);
});
