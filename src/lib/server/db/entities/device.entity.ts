import { defineEntity, p, type InferEntity } from '@mikro-orm/core';

/**
 * An enrolled bench tablet. The tablet made an ECDSA P-256 key pair whose private half is a non-extractable
 * CryptoKey in its IndexedDB; the server keeps the public half (`publicKey`, a JWK) and checks every record the
 * tablet signs against it. `keyThumbprint` is sha256 (hex) of the key's SPKI DER, shown so a lead can compare it with
 * what the tablet shows. Revocation is final: a revoked tablet's records are refused and held; it is enrolled anew.
 */
export const Device = defineEntity({
	name: 'Device',
	tableName: 'device',
	properties: {
		id: p.uuid().primary(),
		label: p.string().length(80),
		publicKey: p.json<Record<string, unknown>>(),
		keyThumbprint: p.string().length(64).unique(),
		enrolledAt: p.datetime().onCreate(() => new Date()),
		enrolledById: p.uuid(),
		enrolledByName: p.string().length(120),
		revokedAt: p.datetime().nullable(),
		revokedById: p.uuid().nullable(),
		revokedByName: p.string().length(120).nullable(),
		revokeReason: p.string().length(500).nullable()
	}
});
export type IDevice = InferEntity<typeof Device>;
