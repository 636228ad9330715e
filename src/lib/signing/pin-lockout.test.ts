import { describe, expect, it } from 'vitest';
import {
	attemptsLeft,
	INITIAL_LOCK_STATE,
	isLocked,
	lockDurationMs,
	lockRemainingMs,
	type LockState,
	recordFailure,
	recordSuccess,
	unlock
} from './pin-lockout';

const MIN = 60_000;
const HOUR = 60 * MIN;
const T0 = Date.UTC(2026, 11, 1, 7, 0, 0); // a shift starts

type Step =
	| { at: number; do: 'fail' | 'succeed' | 'unlock' }
	| { at: number; expect: { locked: boolean; remainingMin?: number; attemptsLeft?: number } };

/** Run a script of events and checks against the state machine. */
function play(steps: Step[], start: LockState = INITIAL_LOCK_STATE): LockState {
	let s = start;
	for (const step of steps) {
		const now = T0 + step.at * MIN;
		if ('do' in step) {
			if (step.do === 'fail') s = recordFailure(s, now);
			else if (step.do === 'succeed') s = recordSuccess(s);
			else s = unlock(s);
		} else {
			const where = `at minute ${step.at}`;
			expect(isLocked(s, now), where).toBe(step.expect.locked);
			if (step.expect.remainingMin !== undefined)
				expect(lockRemainingMs(s, now) / MIN, where).toBe(step.expect.remainingMin);
			if (step.expect.attemptsLeft !== undefined) expect(attemptsLeft(s, now), where).toBe(step.expect.attemptsLeft);
		}
	}
	return s;
}

const fails = (at: number, n: number): Step[] => Array.from({ length: n }, () => ({ at, do: 'fail' as const }));

describe('lockDurationMs', () => {
	// 15 min first (the runner issue's requirement), doubling (the issue), capped at 24 h (common practice, no source).
	it.each([
		[0, 15],
		[1, 30],
		[2, 60],
		[3, 120],
		[4, 240],
		[5, 480],
		[6, 960],
		[7, 1440], // 1920 would exceed the cap
		[8, 1440],
		[1000, 1440]
	])('after %i earlier locks: %i minutes', (lockouts, minutes) => {
		expect(lockDurationMs(lockouts)).toBe(minutes * MIN);
	});
});

describe('the PIN attempt policy', () => {
	it('four wrong PINs do not lock; the fifth locks for 15 minutes (the runner issue)', () => {
		play([
			...fails(0, 4),
			{ at: 0, expect: { locked: false, attemptsLeft: 1 } },
			{ at: 1, do: 'fail' },
			{ at: 1, expect: { locked: true, remainingMin: 15, attemptsLeft: 0 } },
			{ at: 15.99, expect: { locked: true } },
			{ at: 16, expect: { locked: false, attemptsLeft: 5 } }
		]);
	});

	it('a sixth wrong PIN while locked changes nothing (refused without checking)', () => {
		const locked = play(fails(0, 5));
		expect(recordFailure(locked, T0 + 5 * MIN)).toBe(locked);
	});

	it('after the first lock expires the next five lock for 30, then 60 minutes', () => {
		play([
			...fails(0, 5),
			...fails(15, 5),
			{ at: 15, expect: { locked: true, remainingMin: 30 } },
			...fails(45, 5),
			{ at: 45, expect: { locked: true, remainingMin: 60 } }
		]);
	});

	it('a correct PIN clears the failures but not the doubling', () => {
		play([
			...fails(0, 5),
			{ at: 15, do: 'succeed' },
			...fails(20, 4),
			{ at: 20, expect: { locked: false, attemptsLeft: 1 } },
			{ at: 21, do: 'succeed' },
			{ at: 21, expect: { locked: false, attemptsLeft: 5 } },
			...fails(22, 5),
			{ at: 22, expect: { locked: true, remainingMin: 30 } }
		]);
	});

	it('24 hours clean after the lock ended start afresh: the next lock is 15 minutes again', () => {
		const end = 15; // the first lock ends at minute 15
		play([
			...fails(0, 5),
			...fails(end + 24 * 60 - 1, 5),
			{ at: end + 24 * 60 - 1, expect: { locked: true, remainingMin: 30 } }
		]);
		play([
			...fails(0, 5),
			...fails(end + 24 * 60, 5),
			{ at: end + 24 * 60, expect: { locked: true, remainingMin: 15 } }
		]);
	});

	it('a 24-hour lock does not reset the doubling by itself expiring', () => {
		let s = INITIAL_LOCK_STATE;
		let now = T0;
		for (let i = 0; i < 8; i++) {
			for (let k = 0; k < 5; k++) s = recordFailure(s, now);
			now = s.lockedUntil!; // the next five come the moment the lock ends
		}
		expect(s.lockouts).toBe(8);
		for (let k = 0; k < 5; k++) s = recordFailure(s, now);
		expect(lockRemainingMs(s, now)).toBe(24 * HOUR);
	});

	it('scattered failures over a day clean do not add up', () => {
		play([...fails(0, 4), { at: 24 * 60, do: 'fail' }, { at: 24 * 60, expect: { locked: false, attemptsLeft: 4 } }]);
	});

	it('a lead unlocks at once; the doubling stays, so five more lock for 30 minutes', () => {
		play([
			...fails(0, 5),
			{ at: 2, do: 'unlock' },
			{ at: 2, expect: { locked: false, attemptsLeft: 5 } },
			...fails(3, 5),
			{ at: 3, expect: { locked: true, remainingMin: 30 } }
		]);
	});

	it('never holds the PIN: the state is four numbers', () => {
		const s = play(fails(0, 3));
		expect(Object.keys(s).sort()).toEqual(['failures', 'lastFailureAt', 'lockedUntil', 'lockouts']);
		expect(Object.values(s).every((v) => v === null || typeof v === 'number')).toBe(true);
	});
});
