/**
 * Offline acceptance (issue 7): on an enrolled tablet, a run is kept on the tablet, one step is signed online (the
 * tablet gets the signer's offline grant), then the network is cut AT THE SERVER SIDE by stopping the test's own app
 * server; five steps (one with a photo) are signed; the runner reloads from the service worker and the store; a new
 * page still shows them; two handovers are signed through the lazily loaded panel, still offline; the server comes back
 * (no online event: the tablet's health probe notices) and exactly those records (and the photo) land in PostgreSQL,
 * the second handover refused at sync and marked so in the runner.
 * Invented procedure (quick confirm steps and one photo), not service data.
 */
import { expect, test, type Page, type Response } from '@playwright/test';
import { appServer } from './app-server';
import { FAMILY, PORTRAIT, photoFile, publishAndStart, signAs, stamp } from './runner-support';
import { DEMO, ownerQuery, signIn } from './support';

const TECH = 'Tomas Reyna'; // demo technician, bench PIN 111111 (src/lib/server/db/seed.ts)
const PIN = '111111';
const title = `Offline bench ${stamp()}`;
const steps = ['Wipe the magnet', 'Fit the cooler clip', 'Seat the filter', 'Fit the pan gasket', 'Fit the drain plug'];
const source = `---
title: ${title}
family: ${FAMILY}
purpose: Sign quick steps on a tablet with the network down.
specs: Invented for a test; not service data.
---
${steps.map((s, i) => `\n## ${s}\n\n\`\`\`confirm c${i + 1}\nprompt: ${s} done.\n\`\`\`\n`).join('')}
## Photograph the pan

\`\`\`photo pan
prompt: Photograph the refitted pan.
\`\`\`

## Top up the fluid

\`\`\`confirm c7
prompt: Fluid topped up.
\`\`\`
`;

async function confirmAndSign(page: Page, n: number) {
	await expect(page.getByRole('heading', { name: new RegExp(`^Step ${n}:`) })).toBeVisible();
	await page
		.getByRole('region', { name: `Checkpoint c${n}` })
		.getByRole('button', { name: 'Done' })
		.click();
	await page.getByRole('button', { name: 'Sign this step' }).click();
	await signAs(page.getByRole('region', { name: `Sign step ${n}` }), TECH, PIN);
}

const waiting = (page: Page) => page.getByTestId('sync-waiting');

test('offline bench: 5 steps and a photo signed with the server stopped survive a reload and a new page, then sync exactly once', async ({
	browser
}) => {
	test.setTimeout(240_000); // sign-ins (argon2), six PBKDF2 checks and a server restart on a shared 2-core machine
	const runId = await publishAndStart(browser, source);
	const server = await appServer();
	await server.start();
	const context = await browser.newContext({ baseURL: server.url, viewport: PORTRAIT });
	try {
		let page = await context.newPage();
		// A lead enrols this browser context as a tablet, then the technician works on it.
		await signIn(page, DEMO.lead.email);
		await expect(page).toHaveURL(DEMO.lead.home);
		await page.goto('/bench/devices');
		await page.getByLabel('Tablet name').fill(`Offline tablet ${stamp()}`);
		await page.getByRole('button', { name: 'Enrol this tablet' }).click();
		await expect(page.getByTestId('this-tablet')).toContainText('Enrolled');
		await context.clearCookies();
		await signIn(page, DEMO.technician.email);
		await expect(page).not.toHaveURL(/\/signin/);

		// Keep the run on the tablet from the bench (store + the worker's page cache), then open it.
		await page.goto('/bench');
		const row = page.getByTestId('bench-run').filter({ hasText: title });
		await row.getByRole('button', { name: 'Keep on this tablet' }).click();
		await expect(row.getByRole('status')).toContainText('Kept on this tablet');
		await expect(page.getByTestId('tablet-run').filter({ hasText: title })).toContainText('Version 1');
		await row.getByRole('link').click();
		await expect(page).toHaveURL(new RegExp(`/runs/${runId}$`));
		await page.getByRole('button', { name: /^Step 1: Wipe the magnet/ }).click();
		await confirmAndSign(page, 1);
		await expect(page.getByText(`Step 1 sign-off by ${TECH}`)).toBeVisible();

		// Cut the network at the server side; from now on only the service worker may answer.
		await server.stop();
		const reachedServer: string[] = [];
		const watch = (r: Response) =>
			void (r.url().startsWith(server.url) && !r.fromServiceWorker() && reachedServer.push(r.url()));
		context.on('response', watch);
		for (let n = 2; n <= 5; n++) {
			await confirmAndSign(page, n);
			await expect(page.getByText(`Step ${n} sign-off by ${TECH}`)).toBeVisible();
		}
		await expect(page.getByRole('heading', { name: /^Step 6:/ })).toBeVisible();
		await page.locator('input[type=file]').setInputFiles(await photoFile('pan.png', 6));
		await expect(page.getByText('Kept on this tablet; it uploads after the record is synced')).toBeVisible();
		await page.getByRole('button', { name: 'Sign this step' }).click();
		await signAs(page.getByRole('region', { name: 'Sign step 6' }), TECH, PIN);
		await expect(page.getByText(`Step 6 sign-off by ${TECH}`)).toBeVisible();
		await expect(waiting(page)).toHaveText('5');

		// Reload while offline: the page from the worker, the run and the 5 waiting records from the store.
		await page.reload();
		await expect(page.getByRole('heading', { name: title })).toBeVisible();
		await expect(page.getByTestId('run-waiting')).toContainText('5');
		await expect(waiting(page)).toHaveText('5');
		// Close the page, open a new one: still there.
		await page.close();
		page = await context.newPage();
		await page.goto(`/runs/${runId}`);
		await expect(page.getByTestId('run-waiting')).toContainText('5');
		await expect(waiting(page)).toHaveText('5');

		// Record panels sign on the tablet too; their code loads lazily, here from the worker's cache with the server
		// stopped (step 7 stays open, so the run is still in progress). Two handovers: the first pauses the run at sync, so the server refuses the second (only a run in
		// progress is handed over) and the runner then marks it refused, in words, until it is dealt with.
		for (const note of ['Pan torqued; the fluid fill is left.', 'Second note, sent twice by mistake.']) {
			await page.getByRole('button', { name: 'Hand over (end of shift)' }).click();
			await page.getByLabel('Handover note for whoever continues').fill(note);
			await page.getByRole('button', { name: 'Continue to sign' }).click();
			await signAs(page.getByRole('region', { name: 'Sign the handover' }), TECH, PIN);
			await expect(page.getByText('Signed on this tablet and waiting to sync')).toBeVisible();
		}
		await expect(waiting(page)).toHaveText('7');
		context.off('response', watch);
		expect(reachedServer).toEqual([]);

		// The server comes back with the Wi-Fi up all along (no online event): the tablet's health probe notices
		// within seconds and syncs by itself — the five sign-offs, the handovers, then the photo.
		await server.start();
		await expect(waiting(page)).toHaveText('0', { timeout: 30_000 });
		await expect(page.getByTestId('run-waiting')).toHaveCount(0); // the runner re-opened from the server
		const refused = page.getByRole('list', { name: 'Refused at sync' }).getByRole('listitem');
		await expect(refused.first()).toBeVisible();
		const refusedTexts = await refused.allTextContents();
		expect(refusedTexts, refusedTexts.join('\n')).toHaveLength(1);
		await expect(refused).toContainText('Refused at sync');
		await expect(refused).toContainText('The handover signed on this tablet by Tomas Reyna was refused');
		const handovers = await ownerQuery<{ signed_offline: boolean; body: { note: string } }>(
			`select signed_offline, body from ledger_record where run_id = $1 and kind = 'handover' order by seq`,
			[runId]
		);
		expect(handovers.map((h) => [h.signed_offline, h.body.note])).toEqual([
			[true, 'Pan torqued; the fluid fill is left.']
		]);
		expect(
			(
				await ownerQuery(`select 1 from held_record where run_id = $1 and submission->'body'->>'note' like 'Second%'`, [
					runId
				])
			).length
		).toBe(1);
		await refused.getByRole('button', { name: 'Dealt with' }).click();
		await expect(refused).toHaveCount(0);
		const signoffs = await ownerQuery<{ signed_offline: boolean; body: { tabletPhotos?: { id: string }[] } }>(
			`select signed_offline, body from ledger_record where run_id = $1 and kind = 'signoff' order by seq`,
			[runId]
		);
		expect(signoffs.map((s) => s.signed_offline)).toEqual([false, true, true, true, true, true]);
		const photoIds = signoffs.flatMap((s) => s.body.tabletPhotos?.map((p) => p.id) ?? []);
		expect(photoIds).toHaveLength(1);
		// The photo uploads after its record (same sync, or the retry after it).
		await expect
			.poll(async () => (await ownerQuery(`select id from stored_image where id = $1`, [photoIds[0]])).length, {
				timeout: 60_000
			})
			.toBe(1);
		await expect(page.getByTestId('sync-status')).not.toContainText('waiting to upload');
	} finally {
		await context.close();
		await server.stop();
	}
});
