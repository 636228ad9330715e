import { describe, expect, it } from 'vitest';
import { ex, toDecimalString } from './exact';
import { atMost, between, plusMinus, plusMinusPercent } from './limits';
import { passTarget, type TorqueTool, toolSuitsTorque, usableRange } from './torque';
import { unitById } from './units';

const NM = unitById('N_m');
const LBF_FT = unitById('lbf_ft');

/** A 100 N·m click wrench, ±4 % (ISO 6789-1:2017 permissible deviation for many types, from memory). */
const wrench: TorqueTool = { kind: 'preset', max: ex(100), unit: NM, accuracyPercent: ex(4) };

describe('usableRange', () => {
	it('defaults to 20 %–100 % of max (ISO 6789-1:2017 §5.1.5, from memory)', () => {
		const r = usableRange(wrench);
		expect([toDecimalString(r.min), toDecimalString(r.max)]).toEqual(['20', '100']);
	});
	it('uses the registered minimum when given', () => {
		expect(toDecimalString(usableRange({ ...wrench, min: ex(5) }).min)).toBe('5');
	});
});

describe('toolSuitsTorque: range', () => {
	/** Only the range errors: the tolerances below are chosen for range, not accuracy. */
	const rangeErrors = (r: { errors: string[] }) => r.errors.filter((e) => e.includes('usable range'));

	// Range limits per ISO 6789-1:2017 usable range, from memory.
	it.each([
		['20', 0], // exactly the bottom of the default range
		['19.99', 1],
		['100', 0], // exactly the top
		['100.01', 1],
		['55', 0]
	])('target %s N·m with a 20–100 N·m tool → %i range errors', (target, errors) => {
		const r = toolSuitsTorque(wrench, ex(target), NM, plusMinus(ex(target), ex(0), NM));
		expect(rangeErrors(r)).toHaveLength(errors);
	});

	it('checks both limits, not only the target', () => {
		const r = toolSuitsTorque(wrench, ex(21), NM, plusMinus(ex(21), ex(2), NM));
		expect(r.ok).toBe(false);
		expect(r.errors).toEqual(["The lower limit 19 N·m is below the tool's usable range of 20–100 N·m."]);
	});

	it('converts a lbf·ft target to the tool unit', () => {
		// 12 lbf·ft = 16.27 N·m (NIST SP 811:2008 B.8: 1.355 818 N·m per lbf·ft)
		const r = toolSuitsTorque(wrench, ex(12), LBF_FT, plusMinus(ex(12), ex(2), LBF_FT));
		expect(r.errors[0]).toBe("The target 12 lbf·ft (16.2698 N·m) is below the tool's usable range of 20–100 N·m.");
		// 50 lbf·ft = 67.79 N·m, inside
		expect(toolSuitsTorque(wrench, ex(50), LBF_FT, plusMinus(ex(50), ex(5), LBF_FT)).ok).toBe(true);
	});

	it('uses an explicit minimum', () => {
		const small = { ...wrench, min: ex(5), max: ex(25) };
		expect(toolSuitsTorque(small, ex(6), NM, between(ex(5), ex(8), NM)).ok).toBe(true);
		expect(rangeErrors(toolSuitsTorque(small, ex(4), NM, atMost(ex(5), NM)))).toHaveLength(1);
	});
});

describe('toolSuitsTorque: accuracy (4:1 rule, common practice, no source)', () => {
	it.each([
		// target, tolerance ±, errors, warnings; band = 4 % of target
		['30', '6', 0, 0], // band 1.2, a quarter of the half-width is 1.5
		['25', '4', 0, 0], // band 1 = a quarter of 4 exactly: not more than a quarter
		['24', '2', 0, 1], // band 0.96 > 0.5
		['25', '1', 0, 1], // band 1 = half-width exactly: warning, not error
		['25', '0.5', 1, 0] // band 1 > 0.5
	])('%s ± %s N·m → %i errors, %i warnings', (target, tol, errors, warnings) => {
		const r = toolSuitsTorque(wrench, ex(target), NM, plusMinus(ex(target), ex(tol), NM));
		expect([r.errors.length, r.warnings.length]).toEqual([errors, warnings]);
		expect(r.ok).toBe(errors === 0);
	});

	it('explains the accuracy problem', () => {
		const r = toolSuitsTorque(wrench, ex(24), NM, plusMinusPercent(ex(24), ex(10), NM));
		// ±10 % of 24 is ±2.4; 4 % of 24 is 0.96 > 2.4 / 4
		expect(r.warnings).toEqual([
			"The tool's accuracy of ±4 % (±0.96 N·m at 24 N·m) is more than a quarter of the tolerance of ±2.4 N·m; a more accurate tool is advised."
		]);
		const e = toolSuitsTorque(wrench, ex(50), NM, plusMinus(ex(50), ex(1), NM));
		expect(e.errors).toEqual([
			"The tool's accuracy of ±4 % (±2 N·m at 50 N·m) is wider than the tolerance of ±1 N·m; use a more accurate tool."
		]);
	});

	it('uses the nearer limit of an asymmetric or one-sided tolerance', () => {
		// 30 N·m, 29–40: the nearer limit is 1 below; band 1.2 > 1 → error
		expect(toolSuitsTorque(wrench, ex(30), NM, between(ex(29), ex(40), NM)).errors).toHaveLength(1);
		// 30 N·m, at most 40: half-width 10, band 1.2 ≤ 2.5 → fine
		expect(toolSuitsTorque(wrench, ex(30), NM, atMost(ex(40), NM))).toEqual({
			ok: true,
			errors: [],
			warnings: []
		});
	});

	it('compares in the target unit when the tolerance is in another unit', () => {
		// 40 lbf·ft ± 3 lbf·ft, tool in N·m: band 1.6 lbf·ft ≤ 3, > 0.75 → warning
		const r = toolSuitsTorque(wrench, ex(40), LBF_FT, plusMinus(ex(40), ex(3), LBF_FT));
		expect([r.ok, r.warnings.length]).toEqual([true, 1]);
	});

	it('rejects a target outside its own tolerance and non-torque units', () => {
		expect(toolSuitsTorque(wrench, ex(30), NM, between(ex(20), ex(25), NM)).errors).toEqual([
			'The target 30 N·m lies outside its own tolerance.'
		]);
		expect(toolSuitsTorque(wrench, ex(30), unitById('mm'), atMost(ex(40), NM)).errors).toEqual([
			'The target is in mm, which is not a torque unit.'
		]);
	});
});

describe('passTarget', () => {
	it.each([
		['24', '50', '12'], // brief's example
		['55', '30', '16.5'],
		['55', '100', '55'],
		['7.5', '33', '2.475']
	])('%s at %s percent → %s (arithmetic, no source)', (target, pct, pass) => {
		expect(toDecimalString(passTarget(ex(target), ex(pct)))).toBe(pass);
	});
});
