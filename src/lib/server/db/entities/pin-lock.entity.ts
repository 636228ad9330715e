import { defineEntity, p, type InferEntity } from '@mikro-orm/core';

/**
 * The PIN attempt state (`$lib/signing` LockState) of one person on one tablet; `deviceId` is '' while tablets are
 * not enrolled (then the lock is per person). The PIN itself is never stored here or anywhere.
 */
export const PinLock = defineEntity({
	name: 'PinLock',
	tableName: 'pin_lock',
	properties: {
		userId: p.uuid().primary(),
		deviceId: p.string().length(64).primary(),
		failures: p.integer().default(0),
		lockedUntil: p.datetime().nullable(),
		lockouts: p.integer().default(0),
		lastFailureAt: p.datetime().nullable(),
		updatedAt: p
			.datetime()
			.onCreate(() => new Date())
			.onUpdate(() => new Date())
	}
});
export type IPinLock = InferEntity<typeof PinLock>;
