import { LockMode } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { isLocked, unlock as unlockState, type LockState } from '../../signing/pin-lockout';
import { PinLock, type IPinLock } from '../db/entities';

/**
 * The lock-state row of one person on one tablet ('' = no device id), created if missing and locked FOR UPDATE
 * until the transaction ends, so two PIN tries at once are counted one after the other. Call inside a transaction.
 */
export async function lockRow(tx: EntityManager, userId: string, deviceId: string): Promise<IPinLock> {
	await tx.execute(
		`insert into "pin_lock" ("user_id", "device_id", "failures", "lockouts", "updated_at") values (?, ?, 0, 0, now()) on conflict do nothing`,
		[userId, deviceId]
	);
	return (await tx.findOne(
		PinLock,
		{ userId, deviceId },
		{ lockMode: LockMode.PESSIMISTIC_WRITE, refresh: true }
	)) as IPinLock;
}

export const toState = (row: IPinLock): LockState => ({
	failures: row.failures,
	lockedUntil: row.lockedUntil ? row.lockedUntil.getTime() : null,
	lockouts: row.lockouts,
	lastFailureAt: row.lastFailureAt ? row.lastFailureAt.getTime() : null
});

export function apply(row: IPinLock, state: LockState): void {
	row.failures = state.failures;
	row.lockedUntil = state.lockedUntil === null ? null : new Date(state.lockedUntil);
	row.lockouts = state.lockouts;
	row.lastFailureAt = state.lastFailureAt === null ? null : new Date(state.lastFailureAt);
}

/**
 * A lead's unlock of one person's signing on one tablet (`pin-lockout` `unlock`: failures and the lock go, the
 * doubling stays). Returns false, changing nothing, when the person is not locked there at `now`. Call inside a
 * transaction: the row stays locked until it ends.
 */
export async function unlock(tx: EntityManager, userId: string, deviceId: string, now: Date): Promise<boolean> {
	const row = await lockRow(tx, userId, deviceId);
	const state = toState(row);
	if (!isLocked(state, now.getTime())) return false;
	apply(row, unlockState(state));
	return true;
}
