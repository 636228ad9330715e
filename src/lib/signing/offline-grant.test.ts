import { describe, expect, it } from 'vitest';
import { grantRefusal, OFFLINE_GRANT_MS, signingState, type OfflineGrantClaims } from './offline-grant';

const account = { name: 'Rowan Tech', active: true, sessionVersion: 3, pinChangedAt: new Date(1_700_000_000_000) };
const issuedAt = 1_800_000_000_000;
const grant: OfflineGrantClaims = { userId: 'u1', deviceId: 'tab-1', issuedAt, state: signingState(account) };
const record = { signerId: 'u1', deviceId: 'tab-1', signedAt: issuedAt + 60_000 };

describe('offline signing grants', () => {
	it('holds for the same person on the same tablet within 12 hours', () => {
		expect(grantRefusal(grant, record, account)).toBeNull();
		expect(grantRefusal(grant, { ...record, signedAt: issuedAt + OFFLINE_GRANT_MS }, account)).toBeNull();
	});
	it('ends 12 hours after the PIN was last checked online', () => {
		expect(grantRefusal(grant, { ...record, signedAt: issuedAt + OFFLINE_GRANT_MS + 1 }, account)).toMatch(
			/more than 12 hours/
		);
	});
	it('is voided by a PIN change, a role change or a deactivation', () => {
		expect(grantRefusal(grant, record, { ...account, pinChangedAt: new Date(issuedAt + 1) })).toMatch(/changed/);
		expect(grantRefusal(grant, record, { ...account, sessionVersion: 4 })).toMatch(/changed/);
		expect(grantRefusal(grant, record, { ...account, active: false })).toMatch(/deactivated/);
	});
	it("is another person's or another tablet's", () => {
		expect(grantRefusal(grant, { ...record, signerId: 'u2' }, account)).toMatch(/not Rowan Tech's/);
		expect(grantRefusal(grant, { ...record, deviceId: 'tab-2' }, account)).toMatch(/not Rowan Tech's/);
	});
	it('needs the device time, not before the grant (5 minutes of clock slack)', () => {
		expect(grantRefusal(grant, { ...record, signedAt: undefined }, account)).toMatch(/tablet time/);
		expect(grantRefusal(grant, { ...record, signedAt: issuedAt - 4 * 60_000 }, account)).toBeNull();
		expect(grantRefusal(grant, { ...record, signedAt: issuedAt - 6 * 60_000 }, account)).toMatch(/before/);
	});
	it('fingerprints the signing state so any change shows', () => {
		expect(signingState({ ...account, pinChangedAt: null })).toBe('v3.p0');
		expect(signingState(account)).not.toBe(signingState({ ...account, sessionVersion: 4 }));
	});
});
