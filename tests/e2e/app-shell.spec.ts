import { expect, test } from '@playwright/test';
import { DEMO, signIn } from './support';

test('the web app manifest is served with its icons, and the service worker takes control', async ({ page }) => {
	const manifest = await page.request.get('/manifest.webmanifest');
	expect(manifest.status()).toBe(200);
	const body = (await manifest.json()) as { name: string; start_url: string; icons: { src: string; sizes: string }[] };
	expect(body).toMatchObject({ name: 'Benchstamp', start_url: '/bench' });
	for (const icon of body.icons) {
		const png = await page.request.get(icon.src);
		expect(png.status(), icon.src).toBe(200);
		expect(png.headers()['content-type']).toBe('image/png');
	}

	await signIn(page, DEMO.technician.email);
	await expect(page).toHaveURL(/\/bench/);
	await expect(page.locator('link[rel="manifest"]')).toHaveAttribute('href', /manifest\.webmanifest$/);
	const scope = await page.evaluate(async () => (await navigator.serviceWorker.ready).scope);
	expect(new URL(scope).pathname).toBe('/');
	// Never an API answer from the worker's caches.
	const cached = await page.evaluate(async () => {
		const urls: string[] = [];
		for (const name of await caches.keys())
			for (const req of await (await caches.open(name)).keys()) urls.push(new URL(req.url).pathname);
		return urls;
	});
	expect(cached.length).toBeGreaterThan(0);
	expect(cached.filter((u) => u.startsWith('/api/'))).toEqual([]);
});
