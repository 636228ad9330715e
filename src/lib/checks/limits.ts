/**
 * Limits of a checkpoint and the pass/fail judgement of one reading against them.
 *
 * Judgement is exact: the reading is converted to the limits' unit as a rational and compared,
 * so a reading exactly on a limit passes whatever unit it was entered in. Display rounding is
 * applied only to the sentence explaining a failure.
 */
import { abs, add, cmp, div, type Exact, exact, ex, ge, gt, le, lt, mul, sign, sub } from './exact';
import { formatQuantity } from './format';
import { convert, findUnit, type Unit } from './units';

/** Acceptable range of a quantity; at least one bound, min ≤ max when both are present. */
export interface Limits {
	readonly min?: Exact;
	readonly max?: Exact;
	readonly unit: Unit;
}

function checked(l: Limits): Limits {
	if (l.min === undefined && l.max === undefined) {
		throw new RangeError('Limits need a minimum, a maximum or both.');
	}
	if (l.min !== undefined && l.max !== undefined && gt(l.min, l.max)) {
		throw new RangeError('The minimum of a limit is above its maximum.');
	}
	return Object.freeze({ ...l });
}

/** Two-sided limits min…max. Throws RangeError when min > max. */
export function between(min: Exact, max: Exact, unit: Unit): Limits {
	return checked({ min, max, unit });
}

/** One-sided limit: at most `max`. */
export function atMost(max: Exact, unit: Unit): Limits {
	return checked({ max, unit });
}

/** One-sided limit: at least `min`. */
export function atLeast(min: Exact, unit: Unit): Limits {
	return checked({ min, unit });
}

/** The same limits expressed exactly in another unit of the same dimension. */
export function limitsIn(l: Limits, unit: Unit): Limits {
	if (l.unit.id === unit.id) return l;
	return Object.freeze({
		...(l.min !== undefined && { min: convert(l.min, l.unit, unit) }),
		...(l.max !== undefined && { max: convert(l.max, l.unit, unit) }),
		unit
	});
}

/** nominal ± tol. Throws RangeError when tol is negative. */
export function plusMinus(nominal: Exact, tol: Exact, unit: Unit): Limits {
	if (sign(tol) < 0) throw new RangeError('A ± tolerance cannot be negative.');
	return between(sub(nominal, tol), add(nominal, tol), unit);
}

/** nominal ± percent % of nominal (e.g. 24 N·m ± 10 % → 21.6…26.4). Throws for a negative percent. */
export function plusMinusPercent(nominal: Exact, percent: Exact, unit: Unit): Limits {
	if (sign(percent) < 0) throw new RangeError('A ± percentage cannot be negative.');
	return plusMinus(nominal, abs(div(mul(nominal, percent), ex(100))), unit);
}

/**
 * Nominal with upper and lower deviations, as drawings write them: 25 +0.021/0 → 25.000…25.021.
 * Throws RangeError when the lower deviation is above the upper one.
 */
export function deviations(nominal: Exact, upper: Exact, lower: Exact, unit: Unit): Limits {
	if (gt(lower, upper)) throw new RangeError('The lower deviation is above the upper deviation.');
	return between(add(nominal, lower), add(nominal, upper), unit);
}

/** Outcome of a reading against limits. */
export type Verdict = 'pass' | 'fail';

/** The outcome of one reading. */
export interface Judgement {
	verdict: Verdict;
	/** The reading as entered. */
	value: Exact;
	/** The unit the reading was entered in. */
	unit: Unit;
	/** The limits as written in the procedure. */
	limits: Limits;
	/** The limits expressed exactly in the reading's unit. */
	limitsInEntryUnit: Limits;
	/** Plain sentence when failed, e.g. "0.012 mm above the maximum of 25.021 mm." */
	reason?: string;
}

/** "25.021 mm", or "25.021 mm (0.985079 in)" when the reading was entered in another unit. */
function boundText(written: Exact, writtenUnit: Unit, converted: Exact, entryUnit: Unit): string {
	const text = formatQuantity(written, writtenUnit);
	if (writtenUnit.id === entryUnit.id) return text;
	return `${text} (${formatQuantity(converted, entryUnit)})`;
}

/**
 * Judges a reading against limits. A value exactly on a limit passes (limits are inclusive),
 * compared exactly after unit conversion. Throws RangeError when the reading's unit is of
 * another dimension than the limits (the procedure checker must catch that first).
 */
export function judge(value: Exact, valueUnit: Unit, limits: Limits): Judgement {
	const entry = limitsIn(limits, valueUnit);
	const base = { value, unit: valueUnit, limits, limitsInEntryUnit: entry };
	if (entry.max !== undefined && limits.max !== undefined && gt(value, entry.max)) {
		const over = formatQuantity(sub(value, entry.max), valueUnit);
		return {
			...base,
			verdict: 'fail',
			reason: `${over} above the maximum of ${boundText(limits.max, limits.unit, entry.max, valueUnit)}.`
		};
	}
	if (entry.min !== undefined && limits.min !== undefined && lt(value, entry.min)) {
		const under = formatQuantity(sub(entry.min, value), valueUnit);
		return {
			...base,
			verdict: 'fail',
			reason: `${under} below the minimum of ${boundText(limits.min, limits.unit, entry.min, valueUnit)}.`
		};
	}
	return { ...base, verdict: 'pass' };
}

/** Whether value (in the limits' unit) lies within the limits, bounds included. */
export function within(value: Exact, l: Limits): boolean {
	return (l.min === undefined || ge(value, l.min)) && (l.max === undefined || le(value, l.max));
}

/** Result of parsing typed reading text: the exact value or a sentence saying what is wrong. */
export type ReadingParse = { ok: true; value: Exact } | { ok: false; reason: string };

/** Readings at or beyond this magnitude are typing errors ("1e999"), not measurements. */
const ABSURD = ex('1e12');

/**
 * Parses what a technician typed into a reading field. Surrounding spaces are ignored; a plain
 * decimal ("25.012", "-0.4", "1.5e-3") is accepted. Anything else gets a sentence saying why.
 * Negative values are accepted (a deviation can be negative); see `parsePositiveReading`.
 */
export function parseReading(text: string): ReadingParse {
	const t = text.trim();
	if (t === '') return { ok: false, reason: 'No reading was entered.' };
	const value = exact(t);
	if (value === undefined) {
		if (/^[+-]?\d+,\d+$/.test(t)) {
			return {
				ok: false,
				reason: `Write the decimal with a point: ${t.replace(',', '.')}, not ${t}.`
			};
		}
		const withUnit = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?\s*(\D.*)$/.exec(t);
		if (withUnit && findUnit(withUnit[1])) {
			return { ok: false, reason: 'Enter the number only; the step already sets the unit.' };
		}
		if (/^[+-]?(\d+\.?\d*|\.\d+)[eE][+-]?\d+$/.test(t)) {
			return { ok: false, reason: `"${t}" is too large or too small to be a reading.` };
		}
		return { ok: false, reason: `"${t}" is not a number; enter a reading such as 25.012.` };
	}
	if (cmp(abs(value), ABSURD) >= 0) {
		return { ok: false, reason: `"${t}" is too large to be a reading.` };
	}
	return { ok: true, value };
}

/** As `parseReading`, and the value must be greater than zero (torque, volume, resolution). */
export function parsePositiveReading(text: string): ReadingParse {
	const r = parseReading(text);
	if (r.ok && sign(r.value) <= 0) {
		return { ok: false, reason: 'The reading must be greater than zero.' };
	}
	return r;
}
