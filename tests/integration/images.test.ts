import { createHash, randomBytes } from 'node:crypto';
import { crc32 } from 'node:zlib';
import type { MikroORM } from '@mikro-orm/postgresql';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AdminLog, StoredImage, type ImagePurpose, type IUser } from '../../src/lib/server/db/entities';
import {
	DAMAGED,
	MAX_EDGE_PX,
	MAX_IMAGE_BYTES,
	NOT_A_PHOTO,
	SVG_REFUSED,
	TOO_LARGE,
	TOO_MANY_PIXELS
} from '../../src/lib/server/images';
import { closeObjectStore, useObjectStore } from '../../src/lib/server/storage';
import { makePerson } from '../factories/people';
import { migratedAppOrm } from './support/orm';
import { startTestS3, type TestS3 } from './support/s3';

// The service imports `$lib/...`, which vitest resolves through the SvelteKit plugin.
const images = await import('../../src/lib/server/services/images.service');

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');
const png = (width: number, height: number) =>
	sharp({ create: { width, height, channels: 3, background: '#3a6ea5' } })
		.png()
		.toBuffer();

describe('image uploads: checked by content, cleaned, stored in S3', () => {
	let orm: MikroORM;
	let s3: TestS3;
	let lead: IUser;
	beforeAll(async () => {
		orm = await migratedAppOrm();
		s3 = await startTestS3();
		useObjectStore(s3.store);
		lead = await makePerson(orm.em.fork(), { roles: ['lead'], name: 'Test Lead' });
	});
	afterAll(async () => {
		closeObjectStore();
		await s3.close();
		await orm.close(true);
	});

	const store = (bytes: Uint8Array, filename = 'photo.jpg', purpose: ImagePurpose = 'procedure') =>
		images.storeImage(orm.em.fork(), lead, { bytes, filename, purpose });
	const rowCount = () => orm.em.fork().count(StoredImage, {});

	it('stores a PNG as a re-encoded JPEG, records it, and reads back the exact stored bytes', async () => {
		const result = await store(new Uint8Array(await png(640, 480)), 'magnet-orientation.png');
		if (!result.ok) throw new Error(result.message);
		expect(result.value).toMatchObject({ width: 640, height: 480, contentType: 'image/jpeg' });
		expect(result.value.url).toBe(`/images/${result.value.id}`);

		const row = await orm.em.fork().findOneOrFail(StoredImage, { id: result.value.id });
		expect(row).toMatchObject({ purpose: 'procedure', originalName: 'magnet-orientation.png', width: 640 });
		expect(row.storageKey).toMatch(/^images\/[0-9a-f]{32}\.jpg$/);
		expect((row.uploadedBy as unknown as { id: string }).id).toBe(lead.id);

		const back = await images.readImage(orm.em.fork(), result.value.id);
		expect(back?.contentType).toBe('image/jpeg');
		expect(back?.body.byteLength).toBe(row.byteSize);
		expect(sha256(back!.body)).toBe(row.sha256);
		expect(back!.sha256).toBe(row.sha256);
		expect((await sharp(back!.body).metadata()).format).toBe('jpeg');

		const log = await orm.em.fork().findOneOrFail(AdminLog, { action: 'image.uploaded', subjectId: result.value.id });
		expect(log.actorId).toBe(lead.id);
	});

	it('strips EXIF and GPS metadata and applies the EXIF orientation', async () => {
		const withExif = await sharp({ create: { width: 300, height: 200, channels: 3, background: '#808080' } })
			.jpeg()
			.withMetadata({ orientation: 6 })
			.withExifMerge({
				IFD0: { Artist: 'Kestrel Lane bench camera', Copyright: 'SECRET-OWNER-TAG' },
				IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '0/1 7/1 0/1' }
			})
			.toBuffer();
		// The fixture really carries EXIF with a GPS block (little-endian tag 0x8825, the GPS IFD pointer) and a rotation.
		const before = await sharp(withExif).metadata();
		expect(before.exif?.subarray(6, 8).toString('latin1')).toBe('II');
		expect(before.exif?.includes(Buffer.from([0x25, 0x88]))).toBe(true);
		expect(withExif.includes('SECRET-OWNER-TAG')).toBe(true);
		expect(before.orientation).toBe(6);

		const result = await store(new Uint8Array(withExif), 'gps.jpg', 'intake');
		if (!result.ok) throw new Error(result.message);
		const back = (await images.readImage(orm.em.fork(), result.value.id))!.body;
		const after = await sharp(back).metadata();
		expect(after.exif).toBeUndefined();
		expect(after.xmp).toBeUndefined();
		expect(after.iptc).toBeUndefined();
		expect(after.icc).toBeUndefined();
		expect(after.orientation).toBeUndefined();
		expect(Buffer.from(back).includes('SECRET-OWNER-TAG')).toBe(false);
		// Orientation 6 = rotate 90° clockwise: the 300×200 sensor image is stored upright as 200×300.
		expect([after.width, after.height]).toEqual([200, 300]);
	});

	it('caps the long edge at MAX_EDGE_PX keeping the aspect ratio', async () => {
		const result = await store(new Uint8Array(await png(3200, 1600)));
		if (!result.ok) throw new Error(result.message);
		expect([result.value.width, result.value.height]).toEqual([MAX_EDGE_PX, MAX_EDGE_PX / 2]);
	});

	it('accepts WebP and AVIF by content whatever the file is called', async () => {
		const webp = await sharp({ create: { width: 64, height: 64, channels: 4, background: '#ff000080' } })
			.webp()
			.toBuffer();
		const avif = await sharp({ create: { width: 64, height: 64, channels: 3, background: '#00ff00' } })
			.avif()
			.toBuffer();
		expect((await store(new Uint8Array(webp), 'notes.txt')).ok).toBe(true);
		expect((await store(new Uint8Array(avif), 'drawing.svg')).ok).toBe(true);
	});

	const svg =
		'<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script></svg>';
	it.each([
		['an SVG drawing named .png', new TextEncoder().encode(svg), 'bore.png', SVG_REFUSED, 'unsupported'],
		[
			'an SVG without XML declaration',
			new TextEncoder().encode('<svg viewBox="0 0 1 1"/>'),
			'a.jpg',
			SVG_REFUSED,
			'unsupported'
		],
		[
			'a text file named .jpg',
			new TextEncoder().encode('Torque 10 N·m, then 90°.\n'),
			'notes.jpg',
			NOT_A_PHOTO,
			'unsupported'
		],
		['random bytes', new Uint8Array(randomBytes(4096)), 'photo.jpg', NOT_A_PHOTO, 'unsupported'],
		[
			'a PDF',
			new TextEncoder().encode('%PDF-1.7\n1 0 obj << /Type /Catalog >> endobj\n'),
			'scan.jpg',
			NOT_A_PHOTO,
			'unsupported'
		],
		['a GIF', new Uint8Array(Buffer.from('R0lGODlhAQABAAAAACw=', 'base64')), 'x.gif', NOT_A_PHOTO, 'unsupported'],
		[
			'a truncated JPEG',
			new Uint8Array([0xff, 0xd8, 0xff, 0xe0, 0, 16, 0x4a, 0x46, 0x49, 0x46, 0]),
			'cut.jpg',
			DAMAGED,
			'damaged'
		],
		['an oversized upload', new Uint8Array(MAX_IMAGE_BYTES + 1), 'huge.jpg', TOO_LARGE, 'too_large']
	])('refuses %s and leaves no row and no object', async (_what, bytes, filename, message, reason) => {
		const rows = await rowCount();
		const objects = (await s3.keys()).length;
		const result = await store(bytes, filename);
		expect(result).toEqual({ ok: false, message, reason });
		expect(await rowCount()).toBe(rows);
		expect((await s3.keys()).length).toBe(objects);
	});

	it('refuses a decompression bomb (a few bytes claiming 10000 × 10000 pixels) before decoding it', async () => {
		// A real 1×1 PNG whose IHDR is rewritten to claim 10000×10000 (CRC recomputed, so the header is valid).
		const bomb = Buffer.from(await png(1, 1));
		bomb.writeUInt32BE(10_000, 16);
		bomb.writeUInt32BE(10_000, 20);
		bomb.writeUInt32BE(crc32(bomb.subarray(12, 29)), 29);
		expect((await sharp(bomb, { limitInputPixels: false }).metadata()).width).toBe(10_000);
		const rows = await rowCount();
		expect(await store(new Uint8Array(bomb))).toEqual({ ok: false, message: TOO_MANY_PIXELS, reason: 'too_large' });
		expect(await rowCount()).toBe(rows);
	});

	it('removes the stored object again when the row cannot be written', async () => {
		const objects = (await s3.keys()).length;
		const ghost = { id: crypto.randomUUID(), name: 'Nobody' }; // not a person: the foreign key refuses the row
		await expect(
			images.storeImage(orm.em.fork(), ghost, {
				bytes: new Uint8Array(await png(32, 32)),
				filename: 'a.png',
				purpose: 'finding'
			})
		).rejects.toThrow();
		expect((await s3.keys()).length).toBe(objects);
	});

	it('handles several uploads at once (decoding is queued, none lost)', async () => {
		const rows = await rowCount();
		const results = await Promise.all(
			[10, 20, 30, 40, 50].map(async (n) => store(new Uint8Array(await png(n * 10, n * 5)), `p${n}.png`, 'finding'))
		);
		expect(results.map((r) => r.ok && r.value.width)).toEqual([100, 200, 300, 400, 500]);
		expect(await rowCount()).toBe(rows + 5);
	});

	it('answers undefined for unknown and malformed ids', async () => {
		expect(await images.readImage(orm.em.fork(), crypto.randomUUID())).toBeUndefined();
		expect(await images.readImage(orm.em.fork(), 'not-a-uuid')).toBeUndefined();
	});

	it('refuses to serve an object that no longer matches its recorded hash', async () => {
		const result = await store(new Uint8Array(await png(16, 16)));
		if (!result.ok) throw new Error(result.message);
		const row = await orm.em.fork().findOneOrFail(StoredImage, { id: result.value.id });
		await s3.store.put(row.storageKey, new Uint8Array([1, 2, 3]), 'image/jpeg');
		await expect(images.readImage(orm.em.fork(), row.id)).rejects.toThrow(/sha256/);
	});
});
