import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { signingText } from '$lib/signing/device-payload';
import { createDeviceKeys, publicJwk, signRecord, verifyRecord } from './device-key';

const draft = {
	id: '0190f1a2-0000-7000-8000-000000000001',
	runId: '0190f1a2-0000-7000-8000-0000000000aa',
	kind: 'signoff',
	body: { stepIndex: 0, entries: [] },
	signer: { id: '0190f1a2-0000-7000-8000-0000000000bb', role: 'technician' },
	signedAt: 1_764_600_000_000
};

describe('device key (client)', () => {
	it('makes a key pair whose private half cannot be exported', async () => {
		const keys = await createDeviceKeys();
		expect(keys.privateKey.extractable).toBe(false);
		await expect(crypto.subtle.exportKey('jwk', keys.privateKey)).rejects.toThrow();
		const jwk = await publicJwk(keys);
		expect(Object.keys(jwk).sort()).toEqual(['crv', 'kty', 'x', 'y']);
		expect(jwk.x).toMatch(/^[A-Za-z0-9_-]{43}$/);
	});

	it('signs the canonical payload with the enrolled id; a changed field no longer verifies', async () => {
		const keys = await createDeviceKeys();
		const signed = await signRecord({ deviceId: 'dev-1', privateKey: keys.privateKey }, draft);
		expect(signed.deviceId).toBe('dev-1');
		expect(signed.signature.deviceId).toBe('dev-1');
		expect(signingText(signed)).toContain('"deviceId":"dev-1"');
		expect(await verifyRecord(keys.publicKey, signed)).toBe(true);
		expect(await verifyRecord(keys.publicKey, { ...signed, signedAt: draft.signedAt + 1 })).toBe(false);
		expect(await verifyRecord(keys.publicKey, { ...signed, deviceId: 'dev-2' })).toBe(false);
	});
});
