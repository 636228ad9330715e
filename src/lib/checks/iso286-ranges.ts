/**
 * The nominal size ranges of ISO 286-1:2010 tables 1–3 up to 500 mm.
 * A range is "over lower up to and including upper": 18 mm belongs to 10–18, 18.001 to 18–30.
 */
import { type Exact, ex, gt, le } from './exact';

/** Upper limits of the ranges in mm (ISO 286-1:2010 table 1, first column). */
export const RANGE_UPPER_MM = [3, 6, 10, 18, 30, 50, 80, 120, 180, 250, 315, 400, 500] as const;

/** Lower limits ("over") of the same ranges in mm. */
export const RANGE_LOWER_MM = [0, 3, 6, 10, 18, 30, 50, 80, 120, 180, 250, 315, 400] as const;

/** Largest nominal size the tables here cover. */
export const MAX_NOMINAL_MM = 500;

const UPPER = RANGE_UPPER_MM.map((u) => ex(u));

/** Index of the range holding the nominal size, or undefined when not 0 < nominal ≤ 500 mm. */
export function rangeIndex(nominalMm: Exact): number | undefined {
	if (!gt(nominalMm, ex(0))) return undefined;
	const i = UPPER.findIndex((upper) => le(nominalMm, upper));
	return i === -1 ? undefined : i;
}

/** "over 10 up to 18 mm" for messages. */
export function rangeText(i: number): string {
	const lower = RANGE_LOWER_MM[i];
	const upper = RANGE_UPPER_MM[i];
	return lower === 0 ? `up to ${upper} mm` : `over ${lower} up to ${upper} mm`;
}
