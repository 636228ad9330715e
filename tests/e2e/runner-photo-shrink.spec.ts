import { expect, test, type Page } from '@playwright/test';
import sharp from 'sharp';
import { DEMO, ownerQuery } from './support';
import { FAMILY, publishAndStart, stamp, tablet } from './runner-support';

// Invented for this test; not service data.
const source = () => `---
title: Photo shrink ${stamp()}
family: ${FAMILY}
purpose: Photograph the fitted sensor.
specs: Invented for tests; not service data.
---

## Fit the sensor

\`\`\`photo as-fitted
prompt: Photograph the fitted sensor.
min: 1
\`\`\`
`;

/** A 4000 × 3000 camera JPEG carrying EXIF with a GPS position (invented), as a tablet camera would write it. */
async function cameraJpeg() {
	const buffer = await sharp({
		create: { width: 4000, height: 3000, channels: 3, background: { r: 90, g: 120, b: 60 } }
	})
		.jpeg({ quality: 80 })
		.withExif({
			IFD0: { Make: 'Invented Camera Co', Model: 'Bench Tab 1' },
			IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '0/1 7/1 0/1' }
		})
		.toBuffer();
	expect((await sharp(buffer).metadata()).exif).toBeDefined();
	return { name: 'camera.jpg', mimeType: 'image/jpeg', buffer };
}

const photoInput = (page: Page) =>
	page.getByRole('region', { name: 'Checkpoint as-fitted' }).locator('input[type=file]');

test('a camera photo is shrunk on the tablet to 1600 px without EXIF, online and when kept offline', async ({
	browser
}) => {
	const runId = await publishAndStart(browser, source());
	const page = await tablet(browser, DEMO.technician.email);
	await page.goto(`/runs/${runId}`);
	const photo = await cameraJpeg();

	// Online: the stored object (the server caps at 2560 px, so 1600 shows the tablet shrank it).
	await photoInput(page).setInputFiles(photo);
	const img = page.getByRole('img', { name: /Photo 1 for/ });
	await expect(img).toBeVisible();
	const id = (await img.getAttribute('src'))!.replace('/images/', '');
	const [row] = await ownerQuery<{ width: number; height: number }>(
		'select width, height from stored_image where id = $1',
		[id]
	);
	expect(row).toEqual({ width: 1600, height: 1200 });

	// Offline (the upload cannot reach the server): kept on the tablet with the note, the kept bytes shrunk too.
	await page.route('**/api/images', (route) => route.abort('internetdisconnected'));
	await photoInput(page).setInputFiles(photo);
	await expect(page.getByText('Kept on this tablet; it uploads after the record is synced')).toBeVisible();
	const kept = await page.evaluate(async () => {
		const db = await new Promise<IDBDatabase>((resolve, reject) => {
			const open = indexedDB.open('benchstamp-offline');
			open.onsuccess = () => resolve(open.result);
			open.onerror = () => reject(open.error);
		});
		const all = await new Promise<{ id: string; sha256: string; blob: Blob }[]>((resolve, reject) => {
			const req = db
				.transaction('kv')
				.objectStore('kv')
				.getAll(IDBKeyRange.bound(['kept'], ['kept', []]));
			req.onsuccess = () => resolve(req.result);
			req.onerror = () => reject(req.error);
		});
		db.close();
		return Promise.all(
			all.map(async (k) => ({ id: k.id, sha256: k.sha256, bytes: [...new Uint8Array(await k.blob.arrayBuffer())] }))
		);
	});
	expect(kept).toHaveLength(1);
	const bytes = Buffer.from(kept[0].bytes);
	const meta = await sharp(bytes).metadata();
	expect({ format: meta.format, width: meta.width, height: meta.height }).toEqual({
		format: 'jpeg',
		width: 1600,
		height: 1200
	});
	expect(meta.exif).toBeUndefined();
	expect(meta.xmp).toBeUndefined();
	expect(kept[0].sha256).toBe((await import('node:crypto')).createHash('sha256').update(bytes).digest('hex'));
	await page.context().close();
});
