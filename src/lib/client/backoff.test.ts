import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { RETRY_BASE_MS, RETRY_CAP_MS, nextRetryDelay, seededRandom } from './backoff';

// Exponential backoff with equal jitter, base 2 s, cap 5 min: common practice, no source.
// ceiling = min(300 000, 2 000 · 2^(attempt−1)); delay = ceiling/2 + random · ceiling/2.
describe('nextRetryDelay', () => {
	it.each([
		// attempt, random, expected ms
		[1, 0, 1_000],
		[1, 0.5, 1_500],
		[1, 0.999, 1_999],
		[2, 0, 2_000],
		[2, 0.5, 3_000],
		[3, 0.25, 5_000],
		[5, 0, 16_000],
		[8, 0, 128_000],
		[8, 0.999, 255_872],
		[9, 0, 150_000], // 2 000 · 2^8 = 512 000 > cap: ceiling 300 000
		[9, 0.5, 225_000],
		[50, 0.999, 299_850],
		[10_000, 0, 150_000]
	])('attempt %i, random %f → %i ms', (attempt, random, expected) => {
		expect(nextRetryDelay(attempt, () => random)).toBe(expected);
	});

	it('treats attempt 0 or below as the first retry', () => {
		expect(nextRetryDelay(0, () => 0)).toBe(RETRY_BASE_MS / 2);
		expect(nextRetryDelay(-3, () => 0.5)).toBe(1_500);
	});

	it('stays below the ceiling even for a random source that returns 1', () => {
		expect(nextRetryDelay(1, () => 1)).toBeLessThan(RETRY_BASE_MS);
		expect(nextRetryDelay(20, () => 1)).toBeLessThan(RETRY_CAP_MS);
	});

	it('spreads tablets that failed together (seeded)', () => {
		const random = seededRandom(42);
		const delays = Array.from({ length: 20 }, () => nextRetryDelay(4, random));
		expect(new Set(delays).size).toBeGreaterThan(15);
		for (const d of delays) {
			expect(d).toBeGreaterThanOrEqual(8_000);
			expect(d).toBeLessThan(16_000);
		}
	});

	it('seededRandom repeats for the same seed', () => {
		const a = seededRandom(7);
		const b = seededRandom(7);
		expect([a(), a(), a()]).toEqual([b(), b(), b()]);
	});
});
