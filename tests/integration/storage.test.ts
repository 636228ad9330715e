import { createHash, randomBytes } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createObjectStore } from '../../src/lib/server/storage';
import { startTestS3, type TestS3 } from './support/s3';

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

describe('object storage through the S3 API (s3rver fake)', () => {
	let s3: TestS3;
	beforeAll(async () => {
		s3 = await startTestS3();
	});
	afterAll(() => s3.close());

	it('reads back a ~300 KB object byte-identical to what was sent, and stores exactly those bytes', async () => {
		const body = new Uint8Array(randomBytes(300_000));
		await s3.store.put('images/roundtrip.bin', body, 'application/octet-stream');
		const back = await s3.store.get('images/roundtrip.bin');
		expect(back?.byteLength).toBe(300_000);
		expect(sha256(back!)).toBe(sha256(body));
		// On disk too: with the SDK's default checksum mode the upload framing ended up inside the object (STACK.md).
		const onDisk = await readFile(join(s3.dir, s3.bucket, 'images', 'roundtrip.bin._S3rver_object'));
		expect(onDisk.byteLength).toBe(300_000);
		expect(sha256(onDisk)).toBe(sha256(body));
	});

	it('answers undefined for a key that does not exist, and deletes', async () => {
		expect(await s3.store.get('images/never-written.jpg')).toBeUndefined();
		await s3.store.put('images/to-delete.jpg', new Uint8Array([1, 2, 3]), 'image/jpeg');
		await s3.store.delete('images/to-delete.jpg');
		expect(await s3.store.get('images/to-delete.jpg')).toBeUndefined();
	});

	it('checks the bucket: the configured one passes, an unknown one fails', async () => {
		await expect(s3.store.check()).resolves.toBeUndefined();
		const other = createObjectStore({
			endpoint: s3.endpoint,
			region: 'us-east-1',
			bucket: 'no-such-bucket',
			accessKeyId: 'x',
			secretAccessKey: 'y',
			pathStyle: true
		});
		await expect(other.check()).rejects.toThrow();
		other.close();
	});
});
