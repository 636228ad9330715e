/**
 * Process performance indices for one measured characteristic, as defined in the NIST/SEMATECH e-Handbook of
 * Statistical Methods, section 6.1.6 "What is Process Capability?": Cp = (USL − LSL) / 6σ and
 * Cpk = min(USL − μ, μ − LSL) / 3σ. With σ estimated by the OVERALL sample standard deviation s (n − 1 divisor) of
 * every reading, the same formulas give the performance indices Pp and Ppk — they describe the readings taken, not
 * a process shown to be in statistical control, and are labelled so wherever they are shown.
 *
 * Pure: no framework imports. Readings arrive as numbers (converted from the ledger's decimal text by the caller).
 */

/** Below this many readings the indices are not shown (the brief's rule; s is too uncertain with fewer). */
export const MIN_READINGS_FOR_INDICES = 25;

export interface Summary {
	n: number;
	mean: number;
	/** Overall sample standard deviation (n − 1 divisor); null with fewer than 2 readings. */
	s: number | null;
	min: number;
	max: number;
}

export interface Performance extends Summary {
	/** (USL − LSL) / 6s; null when a limit is missing, s is 0/null, or n < {@link MIN_READINGS_FOR_INDICES}. */
	pp: number | null;
	/** min(USL − mean, mean − LSL) / 3s, or the one-sided value when only one limit exists; null as for pp. */
	ppk: number | null;
	/** Upper and lower one-sided indices (Ppu, Ppl) when their limit exists. */
	ppu: number | null;
	ppl: number | null;
	/** Why the indices are not given, in words, or null when they are. */
	withheld: string | null;
}

/** Mean and overall sample standard deviation (two-pass, numerically steadier than the one-pass sum of squares). */
export function summarise(values: readonly number[]): Summary | null {
	const n = values.length;
	if (n === 0) return null;
	if (values.some((v) => !Number.isFinite(v))) throw new RangeError('Every reading must be a finite number.');
	const mean = values.reduce((a, v) => a + v, 0) / n;
	const ss = values.reduce((a, v) => a + (v - mean) ** 2, 0);
	return {
		n,
		mean,
		s: n > 1 ? Math.sqrt(ss / (n - 1)) : null,
		min: Math.min(...values),
		max: Math.max(...values)
	};
}

/**
 * The indices from a known mean and standard deviation (the handbook's formulas with σ = s). Either limit may be
 * null (a one-sided wear limit): then Pp is null and Ppk is the one-sided index that exists.
 */
export function indices(
	mean: number,
	s: number,
	lsl: number | null,
	usl: number | null
): { pp: number | null; ppk: number | null; ppu: number | null; ppl: number | null } {
	if (!(s > 0)) return { pp: null, ppk: null, ppu: null, ppl: null };
	const ppu = usl === null ? null : (usl - mean) / (3 * s);
	const ppl = lsl === null ? null : (mean - lsl) / (3 * s);
	const pp = usl !== null && lsl !== null ? (usl - lsl) / (6 * s) : null;
	const sides = [ppu, ppl].filter((x): x is number => x !== null);
	return { pp, ppk: sides.length ? Math.min(...sides) : null, ppu, ppl };
}

/** Summary of `values` with Pp/Ppk against the limits, withheld below {@link MIN_READINGS_FOR_INDICES} readings. */
export function performance(values: readonly number[], lsl: number | null, usl: number | null): Performance | null {
	const sum = summarise(values);
	if (!sum) return null;
	const none = { pp: null, ppk: null, ppu: null, ppl: null };
	if (sum.n < MIN_READINGS_FOR_INDICES)
		return {
			...sum,
			...none,
			withheld: `Pp and Ppk are shown from ${MIN_READINGS_FOR_INDICES} readings; there are ${sum.n}.`
		};
	if (lsl === null && usl === null) return { ...sum, ...none, withheld: 'The checkpoint has no limits.' };
	if (!sum.s) return { ...sum, ...none, withheld: 'Every reading is the same: the spread is zero.' };
	return { ...sum, ...indices(sum.mean, sum.s, lsl, usl), withheld: null };
}
