import { describe, expect, it } from 'vitest';
import { openGrant, sealGrant } from './offline-grants';

const claims = {
	userId: '0190f5d2-6c1e-7a51-9c2b-3f4e5d6c7b8a',
	deviceId: 'tab-7',
	issuedAt: 1_800_000_000_000,
	state: 'v2.p0'
};

describe('offline grants', () => {
	it('opens what it sealed', () => {
		expect(openGrant('s3cret', sealGrant('s3cret', claims))).toEqual(claims);
	});
	it('refuses another key, an altered body, a stretched time and junk', () => {
		const g = sealGrant('s3cret', claims);
		expect(openGrant('other', g)).toBeUndefined();
		const [, m] = g.split('.');
		const stretched = Buffer.from(JSON.stringify({ ...claims, issuedAt: claims.issuedAt + 1e8 })).toString('base64url');
		expect(openGrant('s3cret', `${stretched}.${m}`)).toBeUndefined();
		expect(openGrant('s3cret', 'x')).toBeUndefined();
		expect(openGrant('s3cret', `${g}.extra`)).toBeUndefined();
		expect(openGrant('s3cret', 'a'.repeat(2000))).toBeUndefined();
	});
});
