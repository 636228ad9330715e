import { webcrypto } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { IUser } from '../../src/lib/server/db/entities';
import { enrol, type DeviceView } from '../../src/lib/server/services/devices.service';
import {
	DEVICE_KEY_ALGORITHM,
	DEVICE_SIGN_ALGORITHM,
	signingBytes,
	toBase64Url,
	type SignableRecord
} from '../../src/lib/signing/device-payload';

export interface TestTablet {
	device: DeviceView;
	keys: CryptoKeyPair;
	/** Adds `deviceId` and a signature over the record (as the tablet's device-key module does). */
	sign<T extends Omit<SignableRecord, 'deviceId'>>(
		r: T
	): Promise<T & { deviceId: string; signature: { deviceId: string; value: string } }>;
}

/** A key pair made as a tablet makes it (private key not extractable). */
export const makeKeys = () => webcrypto.subtle.generateKey(DEVICE_KEY_ALGORITHM, false, ['sign', 'verify']);

export async function signWith(keys: CryptoKeyPair, r: SignableRecord): Promise<string> {
	const sig = await webcrypto.subtle.sign(DEVICE_SIGN_ALGORITHM, keys.privateKey, signingBytes(r));
	return toBase64Url(new Uint8Array(sig));
}

/** The one place tests enrol tablets: a fresh key pair, enrolled by `lead` through the service. */
export async function makeTablet(em: EntityManager, lead: IUser, label = 'Test bench tablet'): Promise<TestTablet> {
	const keys = await makeKeys();
	const jwk = await webcrypto.subtle.exportKey('jwk', keys.publicKey);
	const result = await enrol(em, lead, {
		label,
		publicKey: { kty: 'EC', crv: 'P-256', x: jwk.x!, y: jwk.y! }
	});
	if (!result.ok) throw new Error(result.message);
	const device = result.value;
	return {
		device,
		keys,
		async sign(r) {
			const withDevice = { ...r, deviceId: device.id };
			return { ...withDevice, signature: { deviceId: device.id, value: await signWith(keys, withDevice) } };
		}
	};
}
