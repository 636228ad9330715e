import { describe, expect, it } from 'vitest';
import { eq, ex, ratio, toDecimalString, toFixed } from './exact';
import { atMost, between } from './limits';
import {
	correctTo20C,
	expansionCoefficient,
	MATERIALS,
	mean,
	ovality,
	resolutionWarning,
	taper,
	taperOfDepths,
	temperatureWarning
} from './measure';
import { unitById } from './units';

const xs = (...v: string[]) => v.map((s) => ex(s));
const MM = unitById('mm');

describe('ovality and taper (definitions: common practice, no source)', () => {
	it.each([
		[['25.012', '25.018', '25.015'], '0.006'],
		[['25.010', '25.010'], '0'],
		[['-0.002', '0.003', '0.001', '0'], '0.005']
	])('ovality of %j is %s', (readings, value) => {
		expect(toDecimalString(ovality(xs(...readings)))).toBe(value);
	});
	it('taper of depth means is largest − smallest', () => {
		expect(toDecimalString(taper(xs('25.014', '25.020', '25.011')))).toBe('0.009');
	});
	it('taper from raw readings uses the mean at each depth, so ovality is not counted as taper', () => {
		// top: 25.010 and 25.020 (mean 25.015); bottom: 25.014 and 25.018 (mean 25.016)
		const t = taperOfDepths([xs('25.010', '25.020'), xs('25.014', '25.018')]);
		expect(toDecimalString(t)).toBe('0.001');
	});
	it('mean is exact', () => {
		expect(eq(mean(xs('1', '1', '2')), ratio(4n, 3n))).toBe(true);
	});
	it('needs at least two readings', () => {
		expect(() => ovality(xs('25'))).toThrow(RangeError);
		expect(() => taper([])).toThrow(RangeError);
		expect(() => mean([])).toThrow(RangeError);
	});
});

describe('thermal correction to 20 °C', () => {
	it('has a positive coefficient below 30 × 10⁻⁶ /°C for every material', () => {
		for (const m of MATERIALS) {
			const a = expansionCoefficient(m);
			expect(a.n > 0n && a.n * 1_000_000n < 30n * a.d).toBe(true);
		}
	});

	it.each([
		// Worked by hand (series 1/(1+x) = 1 − x + x² − …), coefficients from measure.ts:
		// steel α = 11.5e-6, 25 mm at 30 °C: 1 + 11.5e-6 × 10 = 1.000115;
		//   25 / 1.000115 = 25 − 0.002875 + 0.00000033 = 24.99712533 → 24.997125
		['steel', '25', '30', '24.997125'],
		// aluminium α = 23e-6, 10 mm at 35 °C: 1 + 23e-6 × 15 = 1.000345;
		//   10 / 1.000345 = 10 − 0.00345 + 0.00000119 = 9.99655119 → 9.996551
		['aluminium', '10', '35', '9.996551'],
		// steel, 50 mm at 10 °C: 1 − 0.000115 = 0.999885;
		//   50 / 0.999885 = 50 + 0.00575 + 0.00000066 = 50.00575066 → 50.005751
		['steel', '50', '10', '50.005751'],
		// at 20 °C nothing changes
		['cast_iron', '80', '20', '80.000000']
	] as const)('%s %s mm at %s °C → %s mm', (m, length, t, at20) => {
		expect(toFixed(correctTo20C(ex(length), ex(t), m), 6)).toBe(at20);
	});

	it('is exact: 25 mm steel at 30 °C is 5 000 000 / 200 023 mm', () => {
		// 25 / (1 000 115 / 1 000 000) = 25 000 000 / 1 000 115 = 5 000 000 / 200 023
		expect(correctTo20C(ex(25), ex(30), 'steel')).toEqual(ratio(5_000_000n, 200_023n));
	});

	it.each([
		['20', undefined],
		['25', undefined], // 5 °C off exactly: no warning (threshold: common practice, no source)
		['15', undefined],
		[
			'25.1',
			'The part is at 25.1 °C, 5.1 °C from the 20 °C reference; let it settle or correct the reading for temperature.'
		],
		[
			'14.5',
			'The part is at 14.5 °C, 5.5 °C from the 20 °C reference; let it settle or correct the reading for temperature.'
		]
	])('temperatureWarning(%s °C)', (t, warning) => {
		expect(temperatureWarning(ex(t))).toBe(warning);
	});
});

describe('resolutionWarning (10:1 rule, common practice, no source)', () => {
	const h7 = between(ex(25), ex('25.021'), MM); // 25 H7, ISO 286-2:2010
	it.each([
		[
			'0.01',
			'mm',
			'The instrument reads in steps of 0.01 mm, coarser than a tenth of the 0.021 mm tolerance; use a finer instrument.'
		],
		['0.002', 'mm', undefined], // 0.02 ≤ 0.021
		['0.0021', 'mm', undefined], // exactly a tenth
		[
			'0.0022',
			'mm',
			'The instrument reads in steps of 0.0022 mm, coarser than a tenth of the 0.021 mm tolerance; use a finer instrument.'
		],
		['2', 'um', undefined],
		[
			'3',
			'um',
			'The instrument reads in steps of 3 µm, coarser than a tenth of the 0.021 mm tolerance; use a finer instrument.'
		],
		[
			'0.0001',
			'in',
			'The instrument reads in steps of 0.0001 in, coarser than a tenth of the 0.021 mm tolerance; use a finer instrument.'
		] // 0.00254 mm
	])('%s %s against 25 H7', (res, unit, warning) => {
		expect(resolutionWarning(ex(res), h7, unitById(unit))).toBe(warning);
	});
	it('has nothing to say about one-sided limits and refuses a zero resolution', () => {
		expect(resolutionWarning(ex('0.1'), atMost(ex('0.05'), MM))).toBeUndefined();
		expect(() => resolutionWarning(ex(0), h7)).toThrow(RangeError);
	});
});
