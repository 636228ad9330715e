import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { OFFLINE_GRANT_MS } from '$lib/signing/offline-grant';
import { checkOfflinePin, forgetSigner, offlineSigners, rememberSigner, type OfflineSigner } from './offline-pin';
import { KEYS, openOfflineStore } from './offline-store';
import { freshDbName } from './test-helpers';

// Few iterations keep the test fast; the production count is asserted separately below.
const FAST = 1_000;
const issuedAt = 1_800_000_000_000;
const who = { userId: 'u-1', name: 'Rowan Tech' };

async function storeWithSigner() {
	const store = await openOfflineStore({ dbName: freshDbName('pin') });
	await rememberSigner(store, who, '482913', { grant: 'sealed.grant', issuedAt }, FAST);
	return store;
}

describe('offline PIN verifier', () => {
	it('keeps a salted PBKDF2 verifier, never the PIN', async () => {
		const store = await storeWithSigner();
		const kept = (await store.get<OfflineSigner>(KEYS.signer('u-1')))!;
		expect(JSON.stringify(kept)).not.toContain('482913');
		expect(kept.verifier).toMatch(/^[0-9a-f]{64}$/);
		expect(kept.salt).toMatch(/^[0-9a-f]{32}$/);
	});

	it('derives the published PBKDF2-HMAC-SHA256 output (RFC 7914 §11 test vector)', async () => {
		// RFC 7914 section 11: PBKDF2-HMAC-SHA256, P="passwd", S="salt", c=1, dkLen=64 — first 32 bytes here.
		const key = await crypto.subtle.importKey('raw', new TextEncoder().encode('passwd'), 'PBKDF2', false, [
			'deriveBits'
		]);
		const bits = await crypto.subtle.deriveBits(
			{ name: 'PBKDF2', hash: 'SHA-256', salt: new TextEncoder().encode('salt'), iterations: 1 },
			key,
			256
		);
		expect(Buffer.from(bits).toString('hex')).toBe('55ac046e56e3089fec1691c22544b605f94185216dde0465e68b9d57c20dacbc');
	});

	it('accepts the right PIN within 12 hours and hands back the grant', async () => {
		const store = await storeWithSigner();
		expect(await checkOfflinePin(store, 'u-1', '482913', issuedAt + 60_000)).toEqual({
			ok: true,
			grant: 'sealed.grant'
		});
	});

	it('refuses a wrong PIN, an unknown signer and an expired grant (and forgets the expired verifier)', async () => {
		const store = await storeWithSigner();
		expect(await checkOfflinePin(store, 'u-1', '482914', issuedAt)).toMatchObject({ ok: false, reason: 'wrong' });
		expect(await checkOfflinePin(store, 'u-2', '482913', issuedAt)).toMatchObject({ ok: false, reason: 'not_here' });
		expect(await offlineSigners(store, issuedAt + OFFLINE_GRANT_MS)).toHaveLength(1);
		const late = await checkOfflinePin(store, 'u-1', '482913', issuedAt + OFFLINE_GRANT_MS + 1);
		expect(late).toMatchObject({ ok: false, reason: 'expired' });
		expect(await store.get(KEYS.signer('u-1'))).toBeUndefined();
	});

	it('lists only signers still allowed and forgets on request', async () => {
		const store = await storeWithSigner();
		expect((await offlineSigners(store, issuedAt)).map((s) => s.name)).toEqual(['Rowan Tech']);
		await forgetSigner(store, 'u-1');
		expect(await offlineSigners(store, issuedAt)).toEqual([]);
	});
});
