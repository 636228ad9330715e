import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { isUuidV7 } from '$lib/ledger/uuid-v7';
import { dropKept, fitWithin, keepOnTablet, keptPhotos, sha256Hex, uploadOutboxPhoto } from './offline-photo';
import { KEYS, openOfflineStore } from './offline-store';
import type { PhotoItem } from './outbox';
import { freshDbName } from './test-helpers';

describe('fitWithin: the long edge scaled down to the limit, never up', () => {
	it.each([
		// Arithmetic: 4000 × 3000 at 1600 / 4000 = 0.4 → 1600 × 1200.
		[4000, 3000, 1600, 1600, 1200],
		[3000, 4000, 1600, 1200, 1600],
		// Already small: unchanged.
		[800, 600, 1600, 800, 600],
		// 1601 × 1 → 1600 × 1 (a side never goes below 1 px).
		[1601, 1, 1600, 1600, 1]
	])('%i × %i at %i → %i × %i', (w, h, max, ew, eh) => {
		expect(fitWithin(w, h, max)).toEqual({ width: ew, height: eh });
	});
});

describe('photos kept on the tablet', () => {
	it('keeps a photo under a uuid v7 with the sha256 of its bytes, finds it by id and drops it', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('kept') });
		const blob = new Blob([new TextEncoder().encode('abc')], { type: 'image/jpeg' });
		const kept = await keepOnTablet(store, blob);
		expect(isUuidV7(kept.id)).toBe(true);
		// FIPS 180-2 appendix B.1: SHA-256("abc").
		expect(kept.sha256).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
		expect(kept.url).toMatch(/^blob:/);
		expect(await store.get(KEYS.kept(kept.id))).toMatchObject({ id: kept.id, sha256: kept.sha256 });

		const other = '01890000-0000-7000-8000-000000000000';
		const found = await keptPhotos(store, [other, kept.id]);
		expect(found.map((p) => [p.id, p.sha256])).toEqual([[kept.id, kept.sha256]]);
		expect(await sha256Hex(found[0].blob)).toBe(kept.sha256);

		await dropKept(store, [kept.id]);
		expect(await keptPhotos(store, [kept.id])).toEqual([]);
		await store.close();
	});
});

function photo(): PhotoItem {
	return {
		seq: 1,
		id: '01890000-0000-7000-8000-0000000000aa',
		recordId: '01890000-0000-7000-8000-0000000000bb',
		runId: 'run-1',
		sha256: 'f'.repeat(64),
		blob: new Blob([new Uint8Array([0xff, 0xd8, 0xff])], { type: 'image/jpeg' }),
		enqueuedAt: 0,
		attempts: 0
	};
}
const answering =
	(status: number, body: unknown, seen: { url?: string; init?: RequestInit } = {}): typeof fetch =>
	async (url, init) => {
		seen.url = String(url);
		seen.init = init;
		return new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } });
	};

describe('uploadOutboxPhoto: stored, refused with the reason, or thrown so sync retries', () => {
	it('PUTs the raw bytes to the run photo route and answers stored on 200', async () => {
		const seen: { url?: string; init?: RequestInit } = {};
		expect(await uploadOutboxPhoto(photo(), answering(200, { status: 'stored' }, seen))).toEqual({ status: 'stored' });
		expect(seen.url).toBe('/api/runs/run-1/photos/01890000-0000-7000-8000-0000000000aa');
		expect(seen.init?.method).toBe('PUT');
		expect(seen.init?.body).toBeInstanceOf(Blob);
	});
	it('answers refused with the server message on a 4xx refusal', async () => {
		const message = 'These bytes are not the photo record #2 declared.';
		expect(await uploadOutboxPhoto(photo(), answering(409, { message }))).toEqual({
			status: 'refused',
			reason: message
		});
	});
	it.each([500, 503, 401, 429])('throws on %i (retried later)', async (status) => {
		await expect(uploadOutboxPhoto(photo(), answering(status, { message: 'later' }))).rejects.toThrow();
	});
	it('throws when the server cannot be reached', async () => {
		const down: typeof fetch = async () => {
			throw new TypeError('Failed to fetch');
		};
		await expect(uploadOutboxPhoto(photo(), down)).rejects.toThrow('Failed to fetch');
	});
});
