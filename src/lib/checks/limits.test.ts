import { describe, expect, it } from 'vitest';
import { type Exact, ex, mul, toDecimalString } from './exact';
import {
	atLeast,
	atMost,
	between,
	deviations,
	judge,
	limitsIn,
	parsePositiveReading,
	parseReading,
	plusMinus,
	plusMinusPercent
} from './limits';
import { convert, unitById } from './units';

const s = (x: Exact | undefined): string | undefined => (x === undefined ? undefined : toDecimalString(x));
const MM = unitById('mm');
const IN = unitById('in');
const NM = unitById('N_m');
const LBF_FT = unitById('lbf_ft');
const LBF_IN = unitById('lbf_in');

describe('building limits', () => {
	// arithmetic on the stated tolerance (common practice, no source)
	it.each([
		['24', '2', '22', '26'],
		['25.4', '0.0125', '25.3875', '25.4125'],
		['10', '0', '10', '10']
	])('%s ± %s → %s…%s', (nominal, tol, lo, hi) => {
		const l = plusMinus(ex(nominal), ex(tol), NM);
		expect([s(l.min), s(l.max)]).toEqual([lo, hi]);
	});
	it.each([
		['24', '10', '21.6', '26.4'],
		['55', '5', '52.25', '57.75'],
		['-8', '25', '-10', '-6']
	])('%s ± %s percent → %s…%s', (nominal, pct, lo, hi) => {
		const l = plusMinusPercent(ex(nominal), ex(pct), NM);
		expect([s(l.min), s(l.max)]).toEqual([lo, hi]);
	});
	it.each([
		['25', '0.021', '0', '25', '25.021'], // drawing notation 25 +0.021/0, ISO 286-2 H7 example
		['25', '-0.007', '-0.020', '24.98', '24.993'], // 25 g6 as deviations, ISO 286-2 g6
		['40', '0.008', '-0.008', '39.992', '40.008']
	])('%s %s/%s → %s…%s', (nominal, upper, lower, lo, hi) => {
		const l = deviations(ex(nominal), ex(upper), ex(lower), MM);
		expect([s(l.min), s(l.max)]).toEqual([lo, hi]);
	});
	it('refuses impossible limits', () => {
		expect(() => plusMinus(ex(24), ex(-1), NM)).toThrow(RangeError);
		expect(() => plusMinusPercent(ex(24), ex(-1), NM)).toThrow(RangeError);
		expect(() => deviations(ex(25), ex('-0.02'), ex('0.01'), MM)).toThrow(RangeError);
		expect(() => between(ex(2), ex(1), MM)).toThrow(RangeError);
		expect(() => limitsIn({ unit: MM }, IN)).not.toThrow(); // no bounds to convert
	});
	it('expresses limits exactly in another unit', () => {
		const l = limitsIn(between(ex('12.7'), ex('25.4'), MM), IN);
		expect([s(l.min), s(l.max), l.unit.id]).toEqual(['0.5', '1', 'in']); // 1 in = 25.4 mm exactly, NIST SP 811:2008 B.8
		expect(limitsIn(atMost(ex(1), IN), MM)).toEqual({ max: ex('25.4'), unit: MM });
	});
});

describe('judge', () => {
	const h7 = deviations(ex(25), ex('0.021'), ex(0), MM); // 25 H7, ISO 286-2:2010

	it.each([
		['25.000', 'pass'], // on the minimum
		['25.021', 'pass'], // on the maximum
		['25.010', 'pass'],
		['25.0211', 'fail'],
		['24.9999', 'fail']
	])('25 H7 and %s mm → %s', (reading, verdict) => {
		expect(judge(ex(reading), MM, h7).verdict).toBe(verdict);
	});

	// on-limit readings entered in another unit; 1 in = 25.4 mm exactly (NIST SP 811:2008 B.8)
	it.each([
		['1.0000', 'in', 'max', '25.4', 'mm', 'pass'],
		['0.5', 'in', 'max', '12.7', 'mm', 'pass'],
		['0.5001', 'in', 'max', '12.7', 'mm', 'fail'],
		['0.5', 'in', 'min', '12.7', 'mm', 'pass'],
		['0.4999', 'in', 'min', '12.7', 'mm', 'fail'],
		['25400', 'um', 'max', '1', 'in', 'pass'],
		['25401', 'um', 'max', '1', 'in', 'fail']
	])('%s %s against %s %s %s → %s', (reading, unit, side, bound, limitUnit, verdict) => {
		const limits = (side === 'max' ? atMost : atLeast)(ex(bound), unitById(limitUnit));
		expect(judge(ex(reading), unitById(unit), limits).verdict).toBe(verdict);
	});

	it('a torque exactly on a lbf·ft limit passes when entered in lbf·in (×12, 1 ft = 12 in)', () => {
		const limits = between(ex(18), ex(22), LBF_FT);
		expect(judge(ex(264), LBF_IN, limits).verdict).toBe('pass'); // 22 × 12
		expect(judge(ex(216), LBF_IN, limits).verdict).toBe('pass'); // 18 × 12
		expect(judge(ex('264.001'), LBF_IN, limits).verdict).toBe('fail');
	});

	it('a torque exactly on a N·m limit passes when entered as its exact lbf·ft equivalent', () => {
		const limits = atMost(ex(30), NM);
		const onLimit = convert(ex(30), NM, LBF_FT); // 30 / 1.355 817 948 331 400 4, non-terminating
		expect(judge(onLimit, LBF_FT, limits).verdict).toBe('pass');
		expect(judge(mul(onLimit, ex('1.000000001')), LBF_FT, limits).verdict).toBe('fail');
	});

	it('gives reasons in the entry unit and the limits in both', () => {
		expect(judge(ex('25.033'), MM, h7).reason).toBe('0.012 mm above the maximum of 25.021 mm.');
		expect(judge(ex('24.99'), MM, h7).reason).toBe('0.01 mm below the minimum of 25 mm.');
		expect(judge(ex('0.5001'), IN, atMost(ex('12.7'), MM)).reason).toBe(
			'0.0001 in above the maximum of 12.7 mm (0.5 in).'
		);
		const j = judge(ex('0.98508'), IN, h7); // 25.021 mm = 0.985 078 740… in
		expect(j.verdict).toBe('fail');
		expect(j.reason).toBe('0.00000125984 in above the maximum of 25.021 mm (0.985079 in).');
		expect(judge(ex('25.01'), MM, h7).reason).toBeUndefined();
	});

	it('returns the limits as written and in the entry unit', () => {
		const j = judge(ex('0.985'), IN, h7);
		expect(j.limits).toBe(h7);
		expect(j.limitsInEntryUnit.unit.id).toBe('in');
		expect(s(j.limitsInEntryUnit.max)).toBe('0.985078740157'); // 25.021 / 25.4, rounded to 12 places for display
	});

	it('one-sided limits: max only and min only', () => {
		const runout = atMost(ex('0.05'), MM); // common practice, no source
		expect(judge(ex('0.05'), MM, runout).verdict).toBe('pass');
		expect(judge(ex('-3'), MM, runout).verdict).toBe('pass');
		expect(judge(ex('0.051'), MM, runout).verdict).toBe('fail');
		const wall = atLeast(ex('2.5'), MM);
		expect(judge(ex('1000'), MM, wall).verdict).toBe('pass');
		expect(judge(ex('2.49'), MM, wall).reason).toBe('0.01 mm below the minimum of 2.5 mm.');
	});

	it('°F readings against °C limits', () => {
		// 212 °F = 100 °C exactly (NIST SP 811:2008 B.8 temperature conversion)
		const limits = atMost(ex(100), unitById('degC'));
		expect(judge(ex(212), unitById('degF'), limits).verdict).toBe('pass');
		expect(judge(ex('212.9'), unitById('degF'), limits).reason).toBe('0.9 °F above the maximum of 100 °C (212 °F).');
	});

	it('throws when the reading is of another dimension', () => {
		expect(() => judge(ex(1), NM, h7)).toThrow(RangeError);
	});
});

describe('parseReading', () => {
	it.each([
		['25.012', '25.012'],
		['  25.012 ', '25.012'],
		['-0.4', '-0.4'],
		['+3', '3'],
		['1.5e-3', '0.0015'],
		['.5', '0.5'],
		['0', '0']
	])('%j → %s', (text, value) => {
		const r = parseReading(text);
		expect(r.ok && toDecimalString(r.value)).toBe(value);
	});
	it.each([
		['', 'No reading was entered.'],
		['   ', 'No reading was entered.'],
		['NaN', '"NaN" is not a number; enter a reading such as 25.012.'],
		['Infinity', '"Infinity" is not a number; enter a reading such as 25.012.'],
		['abc', '"abc" is not a number; enter a reading such as 25.012.'],
		['0x10', '"0x10" is not a number; enter a reading such as 25.012.'],
		['1,5', 'Write the decimal with a point: 1.5, not 1,5.'],
		['25.01 mm', 'Enter the number only; the step already sets the unit.'],
		['24Nm', 'Enter the number only; the step already sets the unit.'],
		['1e999', '"1e999" is too large to be a reading.'],
		['1e12', '"1e12" is too large to be a reading.'],
		['1e99999', '"1e99999" is too large or too small to be a reading.']
	])('%j → %s', (text, reason) => {
		expect(parseReading(text)).toEqual({ ok: false, reason });
	});
	it('parsePositiveReading refuses zero and negatives', () => {
		expect(parsePositiveReading('-3')).toEqual({
			ok: false,
			reason: 'The reading must be greater than zero.'
		});
		expect(parsePositiveReading('0')).toEqual({
			ok: false,
			reason: 'The reading must be greater than zero.'
		});
		expect(parsePositiveReading('24')).toEqual({ ok: true, value: ex(24) });
		expect(parsePositiveReading('x')).toMatchObject({ ok: false });
	});
});
