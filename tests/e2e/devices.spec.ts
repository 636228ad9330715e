import { expect, test, type Page } from '@playwright/test';
import { DEMO, ownerQuery, signIn } from './support';
import { PORTRAIT, enrolTablet, keyIn, signAs, tablet } from './runner-support';

// Demo data: the invented Kestrel Lane shop and its invented KTX-7 procedures. Bore 1 is 22 mm H7 =
// 22.000–22.021 mm (ISO 286-2), so 22.030 mm fails and is stored as a failed attempt. Tomas Reyna (demo PIN
// 111111) holds the training the bore step needs.
const TECH_NAME = 'Tomas Reyna';
const BORE_STEP = 'Step 3: Clean and inspect shift-piston bore 1';

/** As the demo lead, through the API (one sign-in less): a bore-inspection run on the demo job for the technician. */
async function startRun(lead: Page): Promise<string> {
	const [job] = await ownerQuery<{ id: string }>(`select id from job where complaint = $1`, ['Harsh 2–3 upshift.']);
	const [version] = await ownerQuery<{ id: string; content_hash: string }>(
		`select v.id, v.content_hash from procedure_version v join procedure p on p.id = v.procedure_id
		 where p.title ilike '%shift-piston bore inspection%' and v.retired_at is null order by v.number desc limit 1`
	);
	const [tech] = await ownerQuery<{ id: string }>(`select id from app_user where email = $1`, [DEMO.technician.email]);
	const started = await lead.request.post('/api/runs', {
		data: { jobId: job.id, procedureVersionId: version.id, contentHash: version.content_hash, assignedToId: tech.id }
	});
	expect(started.status(), await started.text()).toBe(201);
	return ((await started.json()) as { id: string }).id;
}

/** Records 22.030 mm on bore 1 and stores it as a failed attempt signed by the technician. */
async function failedAttempt(page: Page) {
	const bore = page.getByRole('region', { name: 'Checkpoint bore-1' });
	const zeroed = bore.getByRole('button', { name: 'Zeroed' });
	if (await zeroed.isVisible()) await zeroed.click();
	await keyIn(bore, '22.030');
	await expect(page.getByTestId('verdict-bore-1')).toContainText('Fail');
	await page.getByRole('button', { name: 'Measure again' }).click();
	await signAs(page.getByRole('region', { name: 'Record the failed attempt' }), TECH_NAME, '111111');
}

test('a lead enrols a tablet; its records carry a verified device signature; once revoked they are refused and held', async ({
	browser
}) => {
	// Four sign-ins (argon2) and two keypad entries on a shared 2-core machine: more than the 90 s default.
	test.setTimeout(180_000);
	const lead = await tablet(browser, DEMO.lead.email);
	const runId = await startRun(lead);
	const label = `Bench tablet e2e ${Date.now().toString(36)}`;

	// One browser context is one tablet: the lead enrols it, then the technician works on it.
	const context = await browser.newContext({ viewport: PORTRAIT });
	const page = await context.newPage();
	await enrolTablet(page, label);
	await expect(page.getByTestId('device-row').filter({ hasText: label })).toBeVisible();

	const [device] = await ownerQuery<{ id: string; public_key: Record<string, string>; key_thumbprint: string }>(
		`select id, public_key, key_thumbprint from device where label = $1`,
		[label]
	);
	expect(Object.keys(device.public_key).sort()).toEqual(['crv', 'kty', 'x', 'y']);
	// The private key in the tablet's IndexedDB is a CryptoKey that cannot be exported.
	const stored = await page.evaluate(
		() =>
			new Promise<{ deviceId: string; extractable: boolean; type: string }>((resolve, reject) => {
				const open = indexedDB.open('benchstamp-device');
				open.onerror = () => reject(open.error);
				open.onsuccess = () => {
					const get = open.result.transaction('keys').objectStore('keys').get('identity');
					get.onsuccess = () =>
						resolve({
							deviceId: get.result.deviceId,
							extractable: get.result.privateKey.extractable,
							type: get.result.privateKey.type
						});
				};
			})
	);
	expect(stored).toEqual({ deviceId: device.id, extractable: false, type: 'private' });

	await context.clearCookies();
	await signIn(page, DEMO.technician.email);
	await expect(page).not.toHaveURL(/\/signin/);
	await page.goto(`/runs/${runId}`);
	await page.getByRole('button', { name: BORE_STEP }).click();
	await failedAttempt(page);
	await expect(page.getByText(`Failed attempt by ${TECH_NAME}`)).toBeVisible();
	const signed = await ownerQuery<{ device_id: string; body: { deviceSignature: Record<string, string> } }>(
		`select device_id, body from ledger_record where run_id = $1 and kind = 'attempt'`,
		[runId]
	);
	expect(signed).toHaveLength(1);
	expect(signed[0].device_id).toBe(device.id);
	expect(signed[0].body.deviceSignature).toEqual({
		status: 'verified',
		deviceId: device.id,
		keyThumbprint: device.key_thumbprint
	});

	// The lead revokes the tablet from another one.
	await lead.goto('/bench/devices');
	await lead.getByLabel('Tablet', { exact: true }).selectOption({ label });
	await lead.getByLabel('Why').fill('Left on the roller bench overnight (e2e test)');
	await lead.getByRole('button', { name: 'Revoke tablet' }).click();
	await expect(lead.getByText(`“${label}” is revoked`)).toBeVisible();
	await lead.context().close();

	await failedAttempt(page);
	await expect(page.getByText(/was revoked on .*held for the quality lead/)).toBeVisible();
	const attempts = await ownerQuery(`select id from ledger_record where run_id = $1 and kind = 'attempt'`, [runId]);
	expect(attempts).toHaveLength(1);
	const held = await ownerQuery<{ reason: string; device_id: string }>(
		`select reason, device_id from held_record where run_id = $1`,
		[runId]
	);
	expect(held).toEqual([{ reason: 'device_revoked', device_id: device.id }]);
	await context.close();

	const quality = await tablet(browser, DEMO.quality.email);
	await quality.goto('/quality/held');
	const row = quality.getByTestId('held-row').filter({ hasText: label });
	await expect(row).toContainText('Revoked tablet');
	const api = await quality.request.get(`/api/audit/held?run=${runId}`);
	expect(api.status()).toBe(200);
	expect(((await api.json()) as { held: { reason: string }[] }).held.map((h) => h.reason)).toEqual(['device_revoked']);
	await quality.context().close();
});
