/**
 * Fundamental deviations of shafts d, e, f, g, k, m, n, p and the Δ values for holes, in µm,
 * for nominal sizes up to 500 mm. Hole deviations are derived from these by the rules of
 * ISO 286-1:2010 §5.3 (see iso286.ts), exactly as the standard derives its own table 3.
 *
 * Source: ISO 286-1:2010 tables 2 (shafts) and 3 (holes, Δ columns), from memory. Columns
 * follow RANGE_UPPER_MM. For these letters the standard does not split the main ranges, so one
 * value per main range is complete.
 */

/** Upper deviation es of shafts a–h (negative: below the zero line). h is 0. */
export const SHAFT_ES: Readonly<Record<'d' | 'e' | 'f' | 'g', readonly number[]>> = {
	d: [-20, -30, -40, -50, -65, -80, -100, -120, -145, -170, -190, -210, -230],
	e: [-14, -20, -25, -32, -40, -50, -60, -72, -85, -100, -110, -125, -135],
	f: [-6, -10, -13, -16, -20, -25, -30, -36, -43, -50, -56, -62, -68],
	g: [-2, -4, -5, -6, -7, -9, -10, -12, -14, -15, -17, -18, -20]
};

/** Lower deviation ei of shafts m, n, p (independent of grade). */
export const SHAFT_EI: Readonly<Record<'m' | 'n' | 'p', readonly number[]>> = {
	m: [2, 4, 6, 7, 8, 9, 11, 13, 15, 17, 20, 21, 23],
	n: [4, 8, 10, 12, 15, 17, 20, 23, 27, 31, 34, 37, 40],
	p: [6, 12, 15, 18, 22, 26, 32, 37, 43, 50, 56, 62, 68]
};

/** Lower deviation ei of shaft k for grades 4 to 7; for grades ≤ 3 and > 7 it is 0. */
export const SHAFT_K_EI_IT4_TO_IT7: readonly number[] = [0, 1, 1, 1, 2, 2, 2, 3, 3, 4, 4, 4, 5];

/**
 * Δ = IT(n) − IT(n−1) for grades 3 to 8, added to ES of holes K, M, N (≤ IT8) and P (≤ IT7).
 * Tabulated rather than computed so that the test comparing it with the IT table checks both.
 */
export const DELTA: Readonly<Record<3 | 4 | 5 | 6 | 7 | 8, readonly number[]>> = {
	3: [0, 1, 1, 1, 1.5, 1.5, 2, 2, 3, 3, 4, 4, 5],
	4: [0, 1.5, 1.5, 2, 2, 3, 3, 4, 4, 4, 4, 5, 5],
	5: [0, 1, 2, 3, 3, 4, 5, 5, 6, 6, 7, 7, 7],
	6: [0, 3, 3, 3, 4, 5, 6, 7, 7, 9, 9, 11, 13],
	7: [0, 4, 6, 7, 8, 9, 11, 13, 15, 17, 20, 21, 23],
	8: [0, 6, 7, 9, 12, 14, 16, 19, 23, 26, 29, 32, 34]
};
