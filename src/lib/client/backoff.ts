/**
 * Retry timing for sync. Exponential backoff with "equal jitter": the ceiling doubles per failed attempt from
 * {@link RETRY_BASE_MS} up to {@link RETRY_CAP_MS}, and the delay is drawn from the upper half of it, so tablets
 * that lost the network together do not come back in step, and no retry is ever immediate.
 * Base 2 s and cap 5 min: common practice, no source.
 */

/** First ceiling: 2 s (common practice, no source). */
export const RETRY_BASE_MS = 2_000;
/** Largest ceiling: 5 min (common practice, no source). */
export const RETRY_CAP_MS = 5 * 60_000;

/** A source of numbers in [0, 1), like `Math.random`; seeded in tests. */
export type Random = () => number;

/**
 * The wait before retry number `attempt` (1 = after the first failure):
 * `ceiling = min(cap, base · 2^(attempt−1))`, delay in `[ceiling/2, ceiling)`, whole milliseconds.
 */
export function nextRetryDelay(attempt: number, random: Random): number {
	const n = Math.max(1, Math.floor(attempt));
	// 2^30 · 2 s is far past the cap; clamping the exponent keeps the arithmetic finite for any attempt count.
	const ceiling = Math.min(RETRY_CAP_MS, RETRY_BASE_MS * 2 ** Math.min(n - 1, 30));
	const r = Math.min(Math.max(random(), 0), 1);
	// min(…, ceiling − 1): keeps the interval half-open even for r = 1 or rounding at the top.
	return Math.min(ceiling - 1, Math.floor(ceiling / 2 + r * (ceiling / 2)));
}

/** A small seeded generator (mulberry32) for repeatable jitter in tests and the chaos script. */
export function seededRandom(seed: number): Random {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}
