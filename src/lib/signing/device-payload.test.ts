import { describe, expect, it } from 'vitest';
import {
	DEVICE_KEY_ALGORITHM,
	DEVICE_SIGN_ALGORITHM,
	fromBase64Url,
	signingBytes,
	signingText,
	toBase64Url,
	type SignableRecord
} from './device-payload';

const record: SignableRecord = {
	id: '0190f1a2-0000-7000-8000-000000000001',
	runId: '0190f1a2-0000-7000-8000-0000000000aa',
	kind: 'signoff',
	body: { stepIndex: 2, entries: [{ checkpointId: 'bore-1', entry: { value: '22.010', unit: 'mm' } }], tools: [] },
	signer: { id: '0190f1a2-0000-7000-8000-0000000000bb', role: 'technician' },
	deviceId: '0190f1a2-0000-7000-8000-0000000000cc',
	signedAt: 1_764_600_000_000
};

describe('device signing payload', () => {
	it('is the prefix plus RFC 8785 canonical JSON: members sorted by UTF-16 code units at every level, no spaces', () => {
		// Expected text written out by hand from RFC 8785 §3.2.3 (sorted names) and §3.2.1 (no whitespace).
		expect(signingText(record)).toBe(
			'benchstamp-device-signature/1\n' +
				'{"deviceId":"0190f1a2-0000-7000-8000-0000000000cc",' +
				'"record":{"body":{"entries":[{"checkpointId":"bore-1","entry":{"unit":"mm","value":"22.010"}}],"stepIndex":2,"tools":[]},' +
				'"id":"0190f1a2-0000-7000-8000-000000000001","kind":"signoff","runId":"0190f1a2-0000-7000-8000-0000000000aa"},' +
				'"signedAt":1764600000000,"signedOffline":false,' +
				'"signer":{"id":"0190f1a2-0000-7000-8000-0000000000bb","role":"technician"}}'
		);
	});

	it('does not depend on the order the tablet built its objects in', () => {
		const shuffled: SignableRecord = {
			signedAt: record.signedAt,
			deviceId: record.deviceId,
			signer: { role: 'technician', id: record.signer.id },
			body: { tools: [], entries: [{ entry: { unit: 'mm', value: '22.010' }, checkpointId: 'bore-1' }], stepIndex: 2 },
			kind: 'signoff',
			runId: record.runId,
			id: record.id
		};
		expect(signingText(shuffled)).toBe(signingText(record));
	});

	it.each([
		['a reading', { body: { ...(record.body as object), stepIndex: 3 } }],
		['the signer role', { signer: { ...record.signer, role: 'lead' } }],
		['the device', { deviceId: 'tablet-other' }],
		['the device time', { signedAt: record.signedAt! + 1 }],
		['the offline flag', { signedOffline: true }],
		['the run', { runId: '0190f1a2-0000-7000-8000-0000000000ab' }]
	])('changes when %s changes', (_what, change) => {
		expect(signingText({ ...record, ...change })).not.toBe(signingText(record));
	});

	it('writes an absent device time as null and an absent offline flag as false', () => {
		const { signedAt: _, ...noTime } = record;
		expect(signingText(noTime)).toContain('"signedAt":null,"signedOffline":false');
	});

	it('round-trips base64url and refuses other alphabets', () => {
		const bytes = new Uint8Array([0, 251, 255, 62, 63, 1]);
		// RFC 4648 §5: 0x00fbff3e3f01 → "APv_Pj8B" (standard base64 would be "APv/Pj8B").
		expect(toBase64Url(bytes)).toBe('APv_Pj8B');
		expect(fromBase64Url('APv_Pj8B')).toEqual(bytes);
		expect(fromBase64Url('APv/Pj8B')).toBeNull();
		expect(fromBase64Url('A')).toBeNull();
	});

	it('signs and verifies with Web Crypto ECDSA P-256/SHA-256; a changed byte fails', async () => {
		const keys = await crypto.subtle.generateKey(DEVICE_KEY_ALGORITHM, false, ['sign', 'verify']);
		const sig = new Uint8Array(await crypto.subtle.sign(DEVICE_SIGN_ALGORITHM, keys.privateKey, signingBytes(record)));
		expect(sig).toHaveLength(64);
		expect(await crypto.subtle.verify(DEVICE_SIGN_ALGORITHM, keys.publicKey, sig, signingBytes(record))).toBe(true);
		const other = signingBytes({ ...record, signedOffline: true });
		expect(await crypto.subtle.verify(DEVICE_SIGN_ALGORITHM, keys.publicKey, sig, other)).toBe(false);
	});
});
