import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import type { SendOutcome } from '$lib/components/runner/submit';
import type { DeviceIdentity } from './device-key';
import { KEYS, getRun, openOfflineStore, saveEntry, saveRun, type OfflineStore } from './offline-store';
import { rememberSigner } from './offline-pin';
import {
	applyAnswers,
	clearRefused,
	enqueue,
	listOutbox,
	listPhotos,
	listRefused,
	queuePhotosOfStoredRecord,
	type PhotoInput
} from './outbox';
import { photoIdsOf, signOnTablet, type SignDeps, type SignRequest } from './offline-sign';
import { freshDbName, makeRun, recordMaker } from './test-helpers';

const FAST = 1_000; // PBKDF2 iterations: fast in tests, the production count is offline-pin.test.ts's business
const T0 = Date.UTC(2026, 11, 2, 8, 0);
const signer = { id: 'u-1', role: 'technician', name: 'Rowan Tech' };
const identity = { deviceId: 'dev-1' } as DeviceIdentity;
const photo: PhotoInput = { id: 'p-1', sha256: 'a'.repeat(64), blob: new Blob(['jpeg bytes']) };

function deps(store: OfflineStore, send: () => SendOutcome, opts: Partial<SignDeps> = {}) {
	const sent: unknown[] = [];
	let n = 0;
	const makeId = recordMaker(7);
	const d: SignDeps = {
		store,
		send: async (record) => {
			sent.push(record);
			return send();
		},
		sign: async (r) => r,
		signWith: async (id, r) => ({ ...r, deviceId: id.deviceId, signature: { deviceId: id.deviceId, value: 'sig' } }),
		identity: async () => identity,
		deviceId: 'tablet-local',
		now: () => T0 + n++,
		newId: () => makeId('run-1', T0).id,
		iterations: FAST,
		...opts
	};
	return { d, sent };
}

const request = (pin = '482913', body: Record<string, unknown> = { stepIndex: 0, entries: [] }): SignRequest => ({
	runId: 'run-1',
	kind: 'signoff',
	body,
	signer,
	pin,
	stepId: 'step-1'
});

async function tablet() {
	const store = await openOfflineStore({ dbName: freshDbName('sign') });
	await saveRun(store, makeRun('run-1'));
	return store;
}

const down = (): SendOutcome => ({ reached: false });

describe('signing on the runner', () => {
	it('online: keeps a verifier and the grant when the answer carries one, and clears the typed entries', async () => {
		const store = await tablet();
		const entry = { runId: 'run-1', stepId: 'step-1', checkpointId: 'cp-1', value: '1', updatedAt: T0 };
		await saveEntry(store, entry);
		const { d } = deps(store, () => ({
			reached: true,
			answer: { id: 'x', status: 'accepted', offlineGrant: { grant: 'sealed', issuedAt: T0 } }
		}));
		const got = await signOnTablet(d, { ...request(), entries: [entry] });
		expect(got.where).toBe('server');
		expect(await store.get(KEYS.signer('u-1'))).toMatchObject({ grant: 'sealed', issuedAt: T0 });
		expect(await store.get(KEYS.entry('run-1', 'step-1', 'cp-1'))).toBeUndefined();
		expect(await listOutbox(store)).toEqual([]);
	});

	it('online refusal: nothing is kept, nothing queued', async () => {
		const store = await tablet();
		const { d } = deps(store, () => ({ reached: true, answer: { id: 'x', status: 'refused', reason: 'Wrong PIN.' } }));
		const got = await signOnTablet(d, request());
		expect(got).toEqual({ where: 'server', answer: { id: 'x', status: 'refused', reason: 'Wrong PIN.' } });
		expect(await store.get(KEYS.signer('u-1'))).toBeUndefined();
		expect(await listOutbox(store)).toEqual([]);
	});

	it('offline with a good PIN: signed with the device key, flagged, with the grant, and the run state in one write', async () => {
		const store = await tablet();
		await rememberSigner(store, { userId: 'u-1', name: 'Rowan Tech' }, '482913', { grant: 'g-1', issuedAt: T0 }, FAST);
		const { d } = deps(store, down);
		const got = await signOnTablet(d, request());
		expect(got.where).toBe('tablet');
		const [item] = await listOutbox(store);
		expect(item.record).toMatchObject({
			runId: 'run-1',
			kind: 'signoff',
			signedOffline: true,
			offlineGrant: 'g-1',
			deviceId: 'dev-1',
			signature: { deviceId: 'dev-1', value: 'sig' }
		});
		expect((await getRun(store, 'run-1'))!.signed).toEqual([
			{ stepId: 'step-1', recordId: item.record.id, signedAt: item.record.signedAt }
		]);
	});

	it('offline: an unenrolled tablet cannot sign, and says so', async () => {
		const store = await tablet();
		await rememberSigner(store, { userId: 'u-1', name: 'Rowan Tech' }, '482913', { grant: 'g-1', issuedAt: T0 }, FAST);
		const { d } = deps(store, down, { identity: async () => undefined });
		const got = await signOnTablet(d, request());
		expect(got.where).toBe('nowhere');
		expect(got.where === 'nowhere' && got.message).toMatch(/not enrolled/);
		expect(await listOutbox(store)).toEqual([]);
	});

	it('offline: a signer never granted here is refused in words', async () => {
		const store = await tablet();
		const got = await signOnTablet(deps(store, down).d, request());
		expect(got.where === 'nowhere' && got.message).toMatch(/has not signed on this tablet online yet/);
	});

	it('offline: 5 wrong PINs lock signing for 15 minutes (the server policy), then a good PIN is refused too', async () => {
		const store = await tablet();
		await rememberSigner(store, { userId: 'u-1', name: 'Rowan Tech' }, '482913', { grant: 'g-1', issuedAt: T0 }, FAST);
		const { d } = deps(store, down);
		const messages: string[] = [];
		for (let i = 0; i < 5; i++) {
			const got = await signOnTablet(d, request('000000'));
			messages.push(got.where === 'nowhere' ? got.message : 'signed?');
		}
		expect(messages[0]).toMatch(/Wrong PIN for Rowan Tech\. 4 tries left/);
		expect(messages[4]).toMatch(/locked on this tablet for 15 minutes/);
		const good = await signOnTablet(d, request('482913'));
		expect(good.where === 'nowhere' && good.message).toMatch(/locked on this tablet after wrong PINs/);
		expect(await listOutbox(store)).toEqual([]);
	});

	it('photos kept on the tablet: named in tabletPhotos, queued with the offline record and dropped from kept', async () => {
		const store = await tablet();
		await rememberSigner(store, { userId: 'u-1', name: 'Rowan Tech' }, '482913', { grant: 'g-1', issuedAt: T0 }, FAST);
		const dropped: string[][] = [];
		const photos = {
			kept: async () => [photo],
			drop: async (_s: OfflineStore, ids: string[]) => void dropped.push(ids)
		};
		const { d } = deps(store, down, { photos });
		await signOnTablet(d, { ...request(), kind: 'finding', body: { stepIndex: 0, text: 'Scored', photos: ['p-1'] } });
		const [item] = await listOutbox(store);
		expect(Object.keys(item.record.body as object)[0]).toBe('tabletPhotos');
		expect((item.record.body as { tabletPhotos: unknown }).tabletPhotos).toEqual([{ id: 'p-1', sha256: photo.sha256 }]);
		const [queued] = await listPhotos(store);
		expect(queued).toMatchObject({ id: 'p-1', recordId: item.record.id });
		expect(queued.recordStoredAt).toBeUndefined(); // waits for its record
		expect(dropped).toEqual([['p-1']]);
	});

	it('photos kept on the tablet of a record that went online: queued for upload at once', async () => {
		const store = await tablet();
		const photos = { kept: async () => [photo], drop: async () => {} };
		const { d, sent } = deps(store, () => ({ reached: true, answer: { id: 'x', status: 'accepted' } }), { photos });
		await signOnTablet(d, { ...request(), kind: 'finding', body: { stepIndex: 0, text: 'Scored', photos: ['p-1'] } });
		const [queued] = await listPhotos(store);
		expect(queued.recordId).toBe((sent[0] as { id: string }).id);
		expect(queued.recordStoredAt).toBeDefined();
	});
});

describe('queuePhotosOfStoredRecord', () => {
	it('continues the outbox sequence and marks the photos sendable', async () => {
		const store = await tablet();
		const got = await queuePhotosOfStoredRecord(
			store,
			{ id: 'r-1', runId: 'run-1' },
			[photo, { ...photo, id: 'p-2' }],
			T0
		);
		expect(got.map((p) => p.seq)).toEqual([1, 2]);
		expect(await store.get(KEYS.seq())).toBe(2);
		expect((await listPhotos(store)).every((p) => p.recordStoredAt === T0)).toBe(true);
	});
});

describe('photoIdsOf', () => {
	it('reads a finding\u2019s photos and entry photos', () => {
		expect(
			photoIdsOf({ photos: ['a'], entries: [{ entry: { photos: ['b', 'a'] } }, { entry: { value: '1' } }] })
		).toEqual(['a', 'b']);
	});
});

describe('clearRefused ("Dealt with")', () => {
	it('removes the refused record and its photos, and nothing else', async () => {
		const store = await tablet();
		const make = recordMaker(9);
		const refused = make('run-1', T0);
		const waiting = make('run-1', T0 + 1);
		await enqueue(store, refused, { now: T0, photos: [photo] });
		await enqueue(store, waiting, { now: T0 });
		await applyAnswers(store, [{ id: refused.id, status: 'refused', reason: 'Held.' }], { now: T0 });
		expect(await listRefused(store)).toHaveLength(1);
		expect(await clearRefused(store, refused.id)).toBe(true);
		expect(await listRefused(store)).toEqual([]);
		expect(await listPhotos(store)).toEqual([]);
		expect((await listOutbox(store)).map((i) => i.record.id)).toEqual([waiting.id]);
		expect(await clearRefused(store, refused.id)).toBe(false);
	});
});
