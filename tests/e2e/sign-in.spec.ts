import { expect, test } from '@playwright/test';
import { DEMO, REFUSED, makePerson, navLabels, signIn } from './support';

test.describe('sign-in and roles', () => {
	for (const [role, who] of Object.entries(DEMO)) {
		test(`${role} lands on their own home with only their navigation`, async ({ page }) => {
			await signIn(page, who.email);
			await expect(page).toHaveURL(who.home);
			expect(await navLabels(page)).toEqual(who.nav);
		});
	}

	test('a technician opening an admin page gets 403', async ({ page }) => {
		await signIn(page, DEMO.technician.email);
		await expect(page).toHaveURL('/bench');
		const res = await page.goto('/admin/people');
		expect(res?.status()).toBe(403);
		await expect(page.getByRole('heading', { name: 'Not for your role' })).toBeVisible();
	});

	test('an anonymous visitor goes to sign-in and comes back after it', async ({ page }) => {
		await page.goto('/account');
		await expect(page).toHaveURL('/signin?redirectTo=%2Faccount');
		await page.getByLabel('E-mail').fill(DEMO.quality.email);
		await page.getByLabel('Password', { exact: true }).fill('bench-demo');
		await page.getByRole('button', { name: 'Sign in' }).click();
		await expect(page).toHaveURL('/account');
		await expect(page.getByRole('heading', { name: 'My account' })).toBeVisible();
	});

	test('what is typed before the page has loaded its scripts is kept, and the sign-in goes through', async ({
		page
	}) => {
		// On a slow shop network the form is on screen well before the app's scripts run: hold them back until the
		// person has typed, then let the page hydrate.
		let release = () => {};
		const held = new Promise<void>((resolve) => (release = resolve));
		await page.route('**/_app/immutable/**', async (route) => {
			await held;
			await route.continue();
		});
		await page.goto('/signin', { waitUntil: 'commit' });
		await page.getByLabel('E-mail').fill(DEMO.quality.email);
		await page.getByLabel('Password', { exact: true }).fill('bench-demo');
		expect(await page.evaluate(() => history.scrollRestoration)).toBe('auto'); // not hydrated yet
		release();
		await page.waitForFunction(() => history.scrollRestoration === 'manual'); // SvelteKit's router has started
		await expect(page.getByLabel('E-mail')).toHaveValue(DEMO.quality.email);
		await expect(page.getByLabel('Password', { exact: true })).toHaveValue('bench-demo');
		await page.getByRole('button', { name: 'Sign in' }).click();
		await expect(page).toHaveURL(DEMO.quality.home);
	});

	test('a sign-in cannot be sent to another site', async ({ page }) => {
		await signIn(page, DEMO.technician.email, 'bench-demo', '/signin?redirectTo=//elsewhere.example/x');
		await expect(page).toHaveURL('/bench');
	});

	test('wrong password, unknown account and a locked account all get the same message', async ({ page }) => {
		const person = await makePerson(['technician']);
		await signIn(page, person.email, 'not the password');
		const wrong = await page.getByRole('alert').innerText();
		expect(wrong).toMatch(REFUSED);
		await signIn(page, 'nobody-here@shop.example', 'whatever it is');
		expect(await page.getByRole('alert').innerText()).toBe(wrong);
		// Five failures lock the account; now even the right password gets the very same answer.
		for (let i = 0; i < 4; i++) await signIn(page, person.email, `wrong ${i}`);
		await signIn(page, person.email, person.password);
		await expect(page).toHaveURL('/signin');
		expect(await page.getByRole('alert').innerText()).toBe(wrong);
	});

	test('a deactivated person is refused, including their session that is already open', async ({ browser }) => {
		const person = await makePerson(['technician']);
		const theirs = await browser.newContext();
		const tech = await theirs.newPage();
		await signIn(tech, person.email, person.password);
		await expect(tech).toHaveURL('/bench');

		const admins = await browser.newContext();
		const admin = await admins.newPage();
		await signIn(admin, DEMO.admin.email);
		await expect(admin).toHaveURL('/admin/people');
		await admin.goto(`/admin/people/${person.id}`);
		await expect(admin.getByRole('heading', { name: /E2E Person/ })).toBeVisible();
		await admin.getByRole('button', { name: 'Deactivate' }).click();
		await expect(admin.getByText('Deactivated. Their open sessions are closed.')).toBeVisible();

		await tech.goto('/bench');
		await expect(tech).toHaveURL('/signin?redirectTo=%2Fbench');
		await signIn(tech, person.email, person.password);
		await expect(tech.getByRole('alert')).toHaveText(REFUSED);
		await theirs.close();
		await admins.close();
	});

	test('signing out revokes the session on the server, so a copied cookie stops working', async ({ page, browser }) => {
		await signIn(page, DEMO.lead.email);
		await expect(page).toHaveURL('/library');
		const copied = await browser.newContext();
		await copied.addCookies(await page.context().cookies());
		const thief = await copied.newPage();
		await thief.goto('/library');
		await expect(thief).toHaveURL('/library');

		await page.getByRole('button', { name: /sign out/i }).click();
		await expect(page).toHaveURL(/\/signin/);
		await page.goto('/library');
		await expect(page).toHaveURL('/signin?redirectTo=%2Flibrary');
		await thief.goto('/library');
		await expect(thief).toHaveURL('/signin?redirectTo=%2Flibrary');
		await copied.close();
	});
});
