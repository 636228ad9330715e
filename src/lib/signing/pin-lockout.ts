/**
 * The bench PIN attempt policy, as a pure state machine: one state per person per tablet.
 *
 * - Five wrong PINs in a row lock that person's signing on that tablet for 15 minutes (the runner issue's
 *   requirement). Each further lockout doubles: 30, 60, 120 … minutes, capped at 24 hours.
 * - While locked, an attempt is refused without checking the PIN at all, so it neither counts nor reveals anything
 *   (the "sixth wrong PIN" is refused as locked).
 * - A correct PIN clears the run of failures but NOT the doubling: otherwise the person's own sign-ins between an
 *   attacker's tries would reset the escalation each time. The doubling (and any failures) reset after 24 hours
 *   clean — no failure, and no lock in force, for 24 hours.
 * - A lead can unlock: the lock and the failures go, the doubling stays (the lead vouches for the person standing
 *   there, not for whoever tried before) until 24 hours clean.
 * - The PIN itself is never part of the state — nothing here ever sees it; the caller checks it against the argon2id
 *   hash and reports only "right" or "wrong".
 *
 * The 24-hour cap is common practice, no source: beyond a day the lock stops slowing a guesser meaningfully (five
 * guesses a day against a 6-digit PIN is centuries for an even chance) and starts to lock out a technician for weeks
 * after a prank; a lead can lift it sooner. Times are milliseconds since the epoch, from the server's clock.
 */

/** Failures in a row that lock (the runner issue's requirement). */
export const PIN_MAX_FAILURES = 5;
/** The first lockout (the runner issue's requirement). */
export const PIN_FIRST_LOCK_MS = 15 * 60_000;
/** No lockout is longer than this (common practice, no source). */
export const PIN_MAX_LOCK_MS = 24 * 60 * 60_000;
/** After this long without a failure or a lock in force, the state starts afresh (our choice, see above). */
export const PIN_CLEAN_RESET_MS = 24 * 60 * 60_000;

/** One person's PIN attempts on one tablet. */
export interface LockState {
	/** Wrong PINs since the last lock, success, unlock or clean reset. */
	failures: number;
	/** End of the current or most recent lock (kept after it ends: the clean period counts from it). */
	lockedUntil: number | null;
	/** Locks so far; the next lock lasts 15 min × 2^lockouts, capped. */
	lockouts: number;
	/** When the last wrong PIN was entered. */
	lastFailureAt: number | null;
}

/** The state of someone who has never entered a wrong PIN. */
export const INITIAL_LOCK_STATE: LockState = Object.freeze({
	failures: 0,
	lockedUntil: null,
	lockouts: 0,
	lastFailureAt: null
});

/** True while signing is locked. */
export function isLocked(state: LockState, now: number): boolean {
	return state.lockedUntil !== null && now < state.lockedUntil;
}

/** Milliseconds until the lock ends (0 when not locked). */
export function lockRemainingMs(state: LockState, now: number): number {
	return isLocked(state, now) ? (state.lockedUntil as number) - now : 0;
}

/** Wrong PINs left before the next lock (0 while locked). */
export function attemptsLeft(state: LockState, now: number): number {
	return isLocked(state, now) ? 0 : PIN_MAX_FAILURES - current(state, now).failures;
}

/** How long the lock after `lockouts` earlier locks lasts: 15, 30, 60 … minutes, at most 24 h. */
export function lockDurationMs(lockouts: number): number {
	// 2^7 × 15 min is already past the cap; clamping the exponent keeps huge counts from overflowing.
	return Math.min(PIN_FIRST_LOCK_MS * 2 ** Math.min(lockouts, 16), PIN_MAX_LOCK_MS);
}

/** The state with the 24-hours-clean reset applied. */
function current(state: LockState, now: number): LockState {
	const lastEvent = Math.max(state.lastFailureAt ?? -Infinity, state.lockedUntil ?? -Infinity);
	return lastEvent !== -Infinity && now - lastEvent >= PIN_CLEAN_RESET_MS ? INITIAL_LOCK_STATE : state;
}

/**
 * After a wrong PIN at `now`. The fifth in a row locks. While locked nothing changes: the caller must check
 * {@link isLocked} first and not even verify the PIN.
 */
export function recordFailure(state: LockState, now: number): LockState {
	if (isLocked(state, now)) return state;
	const s = current(state, now);
	const failures = s.failures + 1;
	if (failures < PIN_MAX_FAILURES) return { ...s, failures, lastFailureAt: now };
	return { failures: 0, lockedUntil: now + lockDurationMs(s.lockouts), lockouts: s.lockouts + 1, lastFailureAt: now };
}

/** After a correct PIN (only possible while not locked): the failures go, the doubling stays until 24 h clean. */
export function recordSuccess(state: LockState): LockState {
	return { ...state, failures: 0 };
}

/** A lead unlocks: the lock and the failures go, the doubling stays until 24 h clean. */
export function unlock(state: LockState): LockState {
	return { ...state, failures: 0, lockedUntil: null };
}
