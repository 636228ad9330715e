import { expect, test } from '@playwright/test';
import { withClient } from '../../scripts/lib/postgres';

// The second web server in playwright.config.ts: BENCHSTAMP_MODE=production on a migrated, never-seeded database.
const prod = `http://localhost:${process.env.E2E_PROD_PORT ?? 4174}`;

test.describe('a production-mode start', () => {
	test('has no demo people in its database', async () => {
		const url = process.env.E2E_PROD_OWNER_DATABASE_URL;
		if (!url) throw new Error('E2E_PROD_OWNER_DATABASE_URL is not set');
		const rows = await withClient(
			url,
			async (c) => (await c.query<{ n: string }>('select count(*) as n from app_user')).rows
		);
		expect(Number(rows[0]?.n)).toBe(0);
	});

	test('refuses the demo sign-in and shows no demo hint', async ({ page }) => {
		await page.goto(`${prod}/signin`);
		await expect(page.getByText('Demo shop')).toHaveCount(0);
		await page.getByLabel('E-mail').fill('admin@example.com');
		await page.getByLabel('Password', { exact: true }).fill('bench-demo');
		await page.getByRole('button', { name: 'Sign in' }).click();
		await expect(page.getByRole('alert')).toHaveText(/did not sign you in/);
	});

	test('has no dev outbox', async ({ request }) => {
		const res = await request.get(`${prod}/dev/outbox`, { maxRedirects: 0 });
		expect(res.status()).toBe(404);
	});

	test('reports healthy with its migrations applied', async ({ request }) => {
		const res = await request.get(`${prod}/api/health`);
		expect(res.status()).toBe(200);
		const body = await res.json();
		expect(body).toMatchObject({ status: 'ok', db: 'ok' });
		expect(body.migrations.applied).toBeGreaterThanOrEqual(2);
	});
});
