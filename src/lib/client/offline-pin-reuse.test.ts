import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { checkOfflinePin, mayKeepVerifier, rememberSigner, VERIFIER_REUSE_MS, type OfflineSigner } from './offline-pin';
import { KEYS, openOfflineStore } from './offline-store';
import { freshDbName } from './test-helpers';

const FAST = 1_000;
const T0 = 1_800_000_000_000;
const who = { userId: 'u-1', name: 'Rowan Tech' };
const kept = { userId: 'u-1', issuedAt: T0, epoch: 'v3.p170', iterations: FAST };
const incoming = (over: Partial<typeof kept> = {}) => ({ ...kept, issuedAt: T0 + 60_000, ...over });

describe('skipping the slow verifier after an online signature (mayKeepVerifier)', () => {
	it('keeps it only for the same signer, the same credential epoch, the same iterations and a grant under 1 h', () => {
		expect(mayKeepVerifier(kept, incoming())).toBe(true);
		expect(mayKeepVerifier(kept, incoming({ issuedAt: T0 + VERIFIER_REUSE_MS - 1 }))).toBe(true);
		expect(mayKeepVerifier(kept, incoming({ issuedAt: T0 + VERIFIER_REUSE_MS }))).toBe(false); // stale
		expect(mayKeepVerifier(kept, incoming({ epoch: 'v3.p999' }))).toBe(false); // PIN changed
		expect(mayKeepVerifier(kept, incoming({ epoch: 'v4.p170' }))).toBe(false); // roles / account changed
		expect(mayKeepVerifier(kept, incoming({ epoch: undefined }))).toBe(false); // a server that sends none
		expect(mayKeepVerifier({ ...kept, epoch: undefined }, incoming())).toBe(false); // kept before epochs
		expect(mayKeepVerifier(kept, incoming({ userId: 'u-2' }))).toBe(false);
		expect(mayKeepVerifier(kept, incoming({ iterations: FAST * 2 }))).toBe(false);
		expect(mayKeepVerifier(kept, incoming({ issuedAt: T0 - 1 }))).toBe(false); // an older grant than the kept one
		expect(mayKeepVerifier(undefined, incoming())).toBe(false);
	});

	it('rememberSigner leaves grant and verifier untouched when it may, and derives a new pair when the epoch moved', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('reuse') });
		expect(await rememberSigner(store, who, '482913', { grant: 'g-1', issuedAt: T0, epoch: 'v3.p170' }, FAST)).toBe(
			true
		);
		const first = (await store.get<OfflineSigner>(KEYS.signer('u-1')))!;
		expect(first.epoch).toBe('v3.p170');

		// Same epoch, 10 minutes later: nothing derived, and the old grant stays beside the old verifier.
		const again = { grant: 'g-2', issuedAt: T0 + 600_000, epoch: 'v3.p170' };
		expect(await rememberSigner(store, who, '482913', again, FAST)).toBe(false);
		expect(await store.get<OfflineSigner>(KEYS.signer('u-1'))).toEqual(first);

		// The PIN changed (new epoch): a new verifier for the new PIN, with the new grant; the old PIN no longer works.
		const changed = { grant: 'g-3', issuedAt: T0 + 700_000, epoch: 'v3.p999' };
		expect(await rememberSigner(store, who, '739154', changed, FAST)).toBe(true);
		const now = (await store.get<OfflineSigner>(KEYS.signer('u-1')))!;
		expect(now).toMatchObject({ grant: 'g-3', epoch: 'v3.p999' });
		expect(now.salt).not.toBe(first.salt);
		expect(await checkOfflinePin(store, 'u-1', '482913', T0 + 800_000)).toMatchObject({ ok: false, reason: 'wrong' });
		expect(await checkOfflinePin(store, 'u-1', '739154', T0 + 800_000)).toEqual({ ok: true, grant: 'g-3' });
		await store.close();
	});
});
