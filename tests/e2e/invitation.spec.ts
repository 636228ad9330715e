import { expect, test } from '@playwright/test';
import { DEMO, linkIn, signIn, waitForMail } from './support';

test('an admin invites someone; the e-mailed link sets password and PIN once', async ({ page, browser }) => {
	const email = `new-tech-${Date.now().toString(36)}@shop.example`;
	await signIn(page, DEMO.admin.email);
	await expect(page).toHaveURL('/admin/people');
	await page.getByLabel('Name, as it appears on signed records').fill('Jo Newcomer');
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Technician', { exact: true }).check();
	await page.getByRole('button', { name: 'Send invitation' }).click();
	await expect(page.getByText(`Invitation sent to ${email}.`)).toBeVisible();
	await expect(page.getByRole('cell', { name: 'Jo Newcomer' })).toBeVisible();

	const mail = await waitForMail(email);
	expect(mail.subject).toBe('You are invited to Benchstamp');
	const link = linkIn(mail.text, '/welcome');

	const ctx = await browser.newContext();
	const newcomer = await ctx.newPage();
	await newcomer.goto(link);
	await expect(newcomer.getByRole('heading', { name: 'Welcome, Jo Newcomer' })).toBeVisible();
	await newcomer.getByLabel('Password', { exact: true }).fill('my own password');
	await newcomer.getByLabel('Password again').fill('my own password');
	await newcomer.getByLabel('Bench PIN', { exact: true }).fill('12345');
	await newcomer.getByLabel('Bench PIN again').fill('12345');
	await newcomer.getByRole('button', { name: 'Save and continue' }).click();
	// A 5-digit PIN is refused beside its field, and what was typed in the other fields stays.
	await expect(newcomer.getByText('A bench PIN is 6 to 8 digits.').first()).toBeVisible();
	await expect(newcomer.getByLabel('Password', { exact: true })).toHaveValue('my own password');
	await newcomer.getByLabel('Bench PIN', { exact: true }).fill('908172');
	await newcomer.getByLabel('Bench PIN again').fill('908172');
	await newcomer.getByRole('button', { name: 'Save and continue' }).click();
	await expect(newcomer).toHaveURL('/signin?welcome=1');

	await signIn(newcomer, email, 'my own password');
	await expect(newcomer).toHaveURL('/bench');

	// The link worked once; a second use is refused.
	const again = await browser.newContext();
	const replay = await again.newPage();
	await replay.goto(link);
	await expect(replay.getByRole('heading', { name: 'This link no longer works' })).toBeVisible();
	const post = await replay.request.post(link, {
		form: { password: 'x'.repeat(10), passwordAgain: 'x'.repeat(10), pin: '111111', pinAgain: '111111' },
		headers: { origin: new URL(link).origin, accept: 'text/html' }
	});
	expect(post.status()).toBe(410);
	await ctx.close();
	await again.close();
});

test('an invitation to an e-mail that already has an account is refused beside the form', async ({ page }) => {
	await signIn(page, DEMO.admin.email);
	await page.getByLabel('Name, as it appears on signed records').fill('Someone Again');
	await page.getByLabel('E-mail').fill(DEMO.technician.email);
	await page.getByLabel('Technician', { exact: true }).check();
	await page.getByRole('button', { name: 'Send invitation' }).click();
	await expect(page.getByText('Someone with this e-mail address already has an account.')).toBeVisible();
	await expect(page.getByLabel('Name, as it appears on signed records')).toHaveValue('Someone Again');
});
