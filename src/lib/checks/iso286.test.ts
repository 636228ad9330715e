import { describe, expect, it } from 'vitest';
import { type Exact, ex, toDecimalString } from './exact';
import { fitKind, fitLimits, iso286Deviations, parseFit, parseToleranceClass, standardTolerance } from './iso286';

const mm = (x: Exact): string => toDecimalString(x);
const um = (x: number): string => toDecimalString(ex(x / 1000));

describe('parseToleranceClass', () => {
	it.each([
		['H7', { letter: 'H', grade: 7, feature: 'hole' }],
		['g6', { letter: 'g', grade: 6, feature: 'shaft' }],
		['JS7', { letter: 'JS', grade: 7, feature: 'hole' }],
		['js6', { letter: 'js', grade: 6, feature: 'shaft' }],
		['h11', { letter: 'h', grade: 11, feature: 'shaft' }],
		[' P7 ', { letter: 'P', grade: 7, feature: 'hole' }],
		['ZC18', { letter: 'ZC', grade: 18, feature: 'hole' }]
	])('%j', (text, cls) => {
		expect(parseToleranceClass(text)).toEqual(cls);
	});
	// ISO 286-1:2010: letters I, L, O, Q, W are not used; grades are 01, 0, 1…18 (from memory)
	it.each([['H77'], ['H19'], ['H0'], ['H01'], ['Js7'], ['jS7'], ['I7'], ['L7'], ['W7'], ['H'], ['7'], ['H 7'], ['']])(
		'refuses %j',
		(text) => {
			expect(parseToleranceClass(text)).toBeUndefined();
		}
	);
});

describe('standardTolerance', () => {
	it.each([
		[25, 7, 21], // ISO 286-1:2010 table 1, over 18 up to 30, IT7, from memory
		[18, 7, 18], // table 1, 18 belongs to over 10 up to 18
		[500, 11, 400], // table 1, over 400 up to 500, IT11
		[2, 1, 0.8], // table 1, up to 3, IT1
		[100, 16, 2200], // table 1, over 80 up to 120, IT16 = 2.2 mm
		[1, 13, 140] // table 1, up to 3, IT13 = 0.14 mm
	])('at %s mm IT%i = %s µm', (size, grade, value) => {
		expect(mm(standardTolerance(ex(size), grade) as Exact)).toBe(um(value));
	});
	it.each([
		[0, 7],
		[-5, 7],
		[500.001, 7],
		[25, 0],
		[25, 19],
		[1, 14] // ISO 286-1:2010 table 1 footnote: IT14–IT18 not used up to 1 mm, from memory
	])('none at %s mm grade %i', (size, grade) => {
		expect(standardTolerance(ex(size), grade)).toBeUndefined();
	});
});

// Expected limit deviations in µm (upper, lower). Source of each row beside it. "ISO 286-2" rows are
// the tables of ISO 286-2:2010 for that class (recalled, from memory); rows derived by a rule name it.
const CASES: [number, string, number, number, string][] = [
	// holes H
	[25, 'H7', 21, 0, 'ISO 286-2:2010 H7, over 18 up to 30, from memory'],
	[18, 'H7', 18, 0, 'ISO 286-2:2010 H7, 18 mm is in over 10 up to 18'],
	[18.001, 'H7', 21, 0, 'ISO 286-2:2010 H7, just over 18 → over 18 up to 30'],
	[30, 'H7', 21, 0, 'ISO 286-2:2010 H7, 30 mm is in over 18 up to 30'],
	[30.5, 'H7', 25, 0, 'ISO 286-2:2010 H7, over 30 up to 50'],
	[50, 'H7', 25, 0, 'ISO 286-2:2010 H7, 50 mm is in over 30 up to 50'],
	[50.01, 'H7', 30, 0, 'ISO 286-2:2010 H7, over 50 up to 80'],
	[3, 'H7', 10, 0, 'ISO 286-2:2010 H7, 3 mm is in up to 3'],
	[3.5, 'H7', 12, 0, 'ISO 286-2:2010 H7, over 3 up to 6'],
	[400, 'H7', 57, 0, 'ISO 286-2:2010 H7, 400 mm is in over 315 up to 400'],
	[450, 'H7', 63, 0, 'ISO 286-2:2010 H7, over 400 up to 500'],
	[500, 'H7', 63, 0, 'ISO 286-2:2010 H7, 500 mm is in over 400 up to 500'],
	[6, 'H8', 18, 0, 'ISO 286-2:2010 H8, over 3 up to 6'],
	[10, 'H9', 36, 0, 'ISO 286-2:2010 H9, over 6 up to 10'],
	[120, 'H11', 220, 0, 'ISO 286-2:2010 H11, over 80 up to 120'],
	[250, 'H6', 29, 0, 'ISO 286-2:2010 H6, over 180 up to 250'],
	// holes D E F G
	[25, 'D10', 149, 65, 'ISO 286-2:2010 D10, over 18 up to 30'],
	[25, 'E9', 92, 40, 'ISO 286-2:2010 E9, over 18 up to 30'],
	[25, 'F8', 53, 20, 'ISO 286-2:2010 F8, over 18 up to 30'],
	[25, 'G7', 28, 7, 'ISO 286-2:2010 G7, over 18 up to 30'],
	[100, 'F7', 71, 36, 'ISO 286-2:2010 F7, over 80 up to 120'],
	// holes K M N P with Δ (ES = −ei + Δ, ISO 286-1:2010 table 3)
	[25, 'K7', 6, -15, 'ISO 286-2:2010 K7, over 18 up to 30 (−2 + Δ8)'],
	[60, 'K7', 9, -21, 'ISO 286-2:2010 K7, over 50 up to 80 (−2 + Δ11)'],
	[100, 'K7', 10, -25, 'ISO 286-2:2010 K7, over 80 up to 120 (−3 + Δ13)'],
	[500, 'K7', 18, -45, 'ISO 286-2:2010 K7, over 400 up to 500 (−5 + Δ23)'],
	[25, 'K6', 2, -11, 'ISO 286-2:2010 K6, over 18 up to 30 (−2 + Δ4)'],
	[25, 'K8', 10, -23, 'ISO 286-2:2010 K8, over 18 up to 30 (−2 + Δ12)'],
	[25, 'M7', 0, -21, 'ISO 286-2:2010 M7, over 18 up to 30 (−8 + Δ8)'],
	[8, 'M7', 0, -15, 'ISO 286-2:2010 M7, over 6 up to 10 (−6 + Δ6)'],
	[60, 'M7', 0, -30, 'ISO 286-2:2010 M7, over 50 up to 80 (−11 + Δ11)'],
	[25, 'M6', -4, -17, 'ISO 286-2:2010 M6, over 18 up to 30 (−8 + Δ4)'],
	[25, 'M8', 4, -29, 'ISO 286-2:2010 M8, over 18 up to 30 (−8 + Δ12)'],
	[280, 'M6', -9, -41, 'ISO 286-1:2010 table 3 special case: M6 over 250 up to 315 has ES = −9 µm'],
	[25, 'N7', -7, -28, 'ISO 286-2:2010 N7, over 18 up to 30 (−15 + Δ8)'],
	[60, 'N7', -9, -39, 'ISO 286-2:2010 N7, over 50 up to 80 (−20 + Δ11)'],
	[150, 'N7', -12, -52, 'ISO 286-2:2010 N7, over 120 up to 180 (−27 + Δ15)'],
	[499.9, 'N7', -17, -80, 'ISO 286-2:2010 N7, over 400 up to 500 (−40 + Δ23)'],
	[25, 'N6', -11, -24, 'ISO 286-2:2010 N6, over 18 up to 30 (−15 + Δ4)'],
	[25, 'P7', -14, -35, 'ISO 286-2:2010 P7, over 18 up to 30 (−22 + Δ8)'],
	[8, 'P7', -9, -24, 'ISO 286-2:2010 P7, over 6 up to 10 (−15 + Δ6)'],
	[60, 'P7', -21, -51, 'ISO 286-2:2010 P7, over 50 up to 80 (−32 + Δ11)'],
	[100, 'P7', -24, -59, 'ISO 286-2:2010 P7, over 80 up to 120 (−37 + Δ13)'],
	[280, 'P7', -36, -88, 'ISO 286-2:2010 P7, over 250 up to 315 (−56 + Δ20)'],
	[25, 'P6', -18, -31, 'ISO 286-2:2010 P6, over 18 up to 30 (−22 + Δ4)'],
	// above the Δ grades
	[25, 'P8', -22, -55, 'ISO 286-2:2010 P8, over 18 up to 30 (no Δ above IT7)'],
	[25, 'N9', 0, -52, 'ISO 286-2:2010 N9, over 18 up to 30 (ES = 0 above IT8)'],
	[280, 'N9', 0, -130, 'ISO 286-2:2010 N9, over 250 up to 315'],
	[25, 'M9', -8, -60, 'ISO 286-1:2010 table 3 rule: M above IT8 has ES = −ei (m = 8)'],
	[25, 'K9', 0, -52, 'ISO 286-1:2010 table 3 rule: K above IT8 has ES = 0, from memory'],
	// up to 3 mm: no Δ
	[2, 'K7', 0, -10, 'ISO 286-2:2010 K7, up to 3'],
	[2, 'M7', -2, -12, 'ISO 286-2:2010 M7, up to 3'],
	[2, 'N7', -4, -14, 'ISO 286-2:2010 N7, up to 3'],
	[2, 'P7', -6, -16, 'ISO 286-2:2010 P7, up to 3'],
	[2, 'N9', -4, -29, 'ISO 286-2:2010 N9, over 1 up to 3'],
	// JS: ±IT/2, odd IT of grades 7–11 evened down first
	[25, 'JS7', 10, -10, 'ISO 286-2:2010 JS7, over 18 up to 30: IT7 = 21 → ±10'],
	[8, 'JS7', 7, -7, 'ISO 286-2:2010 JS7, over 6 up to 10: IT7 = 15 → ±7'],
	[4, 'JS7', 6, -6, 'ISO 286-2:2010 JS7, over 3 up to 6: IT7 = 12 (even) → ±6'],
	[100, 'JS7', 17, -17, 'ISO 286-2:2010 JS7, over 80 up to 120: IT7 = 35 → ±17'],
	[350, 'JS7', 28, -28, 'ISO 286-2:2010 JS7, over 315 up to 400: IT7 = 57 → ±28'],
	[460, 'JS7', 31, -31, 'ISO 286-2:2010 JS7, over 400 up to 500: IT7 = 63 → ±31'],
	[25, 'JS8', 16, -16, 'ISO 286-2:2010 JS8, over 18 up to 30: IT8 = 33 → ±16'],
	[450, 'JS9', 77, -77, 'ISO 286-2:2010 JS9, over 400 up to 500: IT9 = 155 → ±77'],
	[4, 'JS11', 37, -37, 'ISO 286-2:2010 JS11, over 3 up to 6: IT11 = 75 → ±37'],
	[25, 'JS6', 6.5, -6.5, 'ISO 286-2:2010 JS6, over 18 up to 30: grade 6 keeps ±6.5'],
	[25, 'js5', 4.5, -4.5, 'ISO 286-2:2010 js5, over 18 up to 30: IT5 = 9 → ±4.5'],
	[500, 'js6', 20, -20, 'ISO 286-2:2010 js6, over 400 up to 500'],
	// shafts
	[25, 'g6', -7, -20, 'ISO 286-2:2010 g6, over 18 up to 30'],
	[18, 'g6', -6, -17, 'ISO 286-2:2010 g6, 18 mm is in over 10 up to 18'],
	[40, 'g6', -9, -25, 'ISO 286-2:2010 g6, over 30 up to 50'],
	[500, 'g6', -20, -60, 'ISO 286-2:2010 g6, over 400 up to 500'],
	[25, 'f7', -20, -41, 'ISO 286-2:2010 f7, over 18 up to 30'],
	[60, 'f7', -30, -60, 'ISO 286-2:2010 f7, over 50 up to 80'],
	[500, 'f7', -68, -131, 'ISO 286-2:2010 f7, over 400 up to 500'],
	[40, 'e8', -50, -89, 'ISO 286-2:2010 e8, over 30 up to 50'],
	[25, 'd9', -65, -117, 'ISO 286-2:2010 d9, over 18 up to 30'],
	[25, 'h6', 0, -13, 'ISO 286-2:2010 h6, over 18 up to 30'],
	[40, 'h9', 0, -62, 'ISO 286-2:2010 h9, over 30 up to 50'],
	[25, 'js7', 10, -10, 'ISO 286-2:2010 js7, over 18 up to 30: IT7 = 21 → ±10'],
	[25, 'k6', 15, 2, 'ISO 286-2:2010 k6, over 18 up to 30'],
	[25, 'k5', 11, 2, 'ISO 286-2:2010 k5, over 18 up to 30'],
	[100, 'k6', 25, 3, 'ISO 286-2:2010 k6, over 80 up to 120'],
	[25, 'k8', 33, 0, 'ISO 286-1:2010 table 2 rule: k above IT7 has ei = 0'],
	[25, 'm6', 21, 8, 'ISO 286-2:2010 m6, over 18 up to 30'],
	[60, 'm6', 30, 11, 'ISO 286-2:2010 m6, over 50 up to 80'],
	[25, 'n6', 28, 15, 'ISO 286-2:2010 n6, over 18 up to 30'],
	[25, 'p6', 35, 22, 'ISO 286-2:2010 p6, over 18 up to 30'],
	[60, 'p6', 51, 32, 'ISO 286-2:2010 p6, over 50 up to 80'],
	[500, 'p6', 108, 68, 'ISO 286-2:2010 p6, over 400 up to 500']
];

describe('iso286Deviations', () => {
	it.each(CASES)('%s %s → %s/%s µm (%s)', (size, cls, upper, lower) => {
		const r = iso286Deviations(ex(size), cls);
		expect(r.ok).toBe(true);
		if (!r.ok) return;
		expect([mm(r.upper), mm(r.lower)]).toEqual([um(upper), um(lower)]);
	});

	it('25 H7 gives 25.000/25.021 mm and IT 0.021', () => {
		// ISO 286-2:2010 H7 over 18 up to 30, from memory
		const r = iso286Deviations(ex(25), 'H7');
		expect(r).toMatchObject({ ok: true });
		if (r.ok) expect([mm(r.it), mm(r.lower), mm(r.upper)]).toEqual(['0.021', '0', '0.021']);
	});

	it('reports the table IT for JS even when the deviations use the evened value', () => {
		const r = iso286Deviations(ex(25), 'JS7');
		if (r.ok) expect(mm(r.it)).toBe('0.021'); // ISO 286-1:2010 table 1, IT7 over 18 up to 30
	});

	it.each([
		[25, 'H77', '"H77" is not a tolerance class; write a letter and a grade such as H7.'],
		[25, 'Js7', '"Js7" is not a tolerance class; write a letter and a grade such as H7.'],
		[25, 'H0', 'Grades IT0 and IT01 are not supported; "H0" needs grade 1 to 18.'],
		[600, 'H7', 'ISO 286 values are built in up to 500 mm only; 600 mm is beyond that.'],
		[500.001, 'H7', 'ISO 286 values are built in up to 500 mm only; 500.001 mm is beyond that.'],
		[0, 'H7', 'A nominal size must be greater than 0 mm.'],
		[-4, 'g6', 'A nominal size must be greater than 0 mm.'],
		[25, 'K2', 'ISO 286 gives K holes from grade 3 only; K2 has no Δ value.'],
		[0.5, 'N9', 'ISO 286 does not use N holes above grade 8 for sizes up to 1 mm.'],
		[1, 'H14', 'ISO 286 gives no grade 14 for sizes up to 1 mm; use grade 13 or finer.']
	])('%s %s → message', (size, cls, message) => {
		expect(iso286Deviations(ex(size), cls)).toEqual({ ok: false, message });
	});

	it('names the supported letters for a valid class it cannot compute', () => {
		const r = iso286Deviations(ex(25), 'r6');
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.message).toMatch(/^Tolerance class r6 is not supported yet; supported are holes D, E/);
	});
});

describe('parseFit', () => {
	it.each([
		['18 H7/g6', '18', 'H7', 'g6'],
		['18H7/g6', '18', 'H7', 'g6'],
		['Ø18 H7/g6', '18', 'H7', 'g6'],
		['⌀ 25.4 mm H8/f7', '25.4', 'H8', 'f7'],
		['  40 JS7 / js6 ', '40', 'JS7', 'js6']
	])('%j', (text, nominal, hole, shaft) => {
		const f = parseFit(text);
		expect(f && { nominal: mm(f.nominal), hole: f.hole, shaft: f.shaft }).toEqual({
			nominal,
			hole,
			shaft
		});
	});
	it.each([['H7/g6'], ['18 g6/H7'], ['18 H7'], ['18 H7/'], ['abc'], ['18,5 H7/g6']])('refuses %j', (text) => {
		expect(parseFit(text)).toBeUndefined();
	});
});

describe('fitLimits', () => {
	it.each([
		// text, hole min/max, shaft min/max, clearance min/max (mm), kind; limits from the ISO 286-2 rows above
		['25 H7/g6', '25', '25.021', '24.98', '24.993', '0.007', '0.041', 'clearance'],
		['18 H7/g6', '18', '18.018', '17.983', '17.994', '0.006', '0.035', 'clearance'],
		['40 H8/f7', '40', '40.039', '39.95', '39.975', '0.025', '0.089', 'clearance'],
		['25 H7/h6', '25', '25.021', '24.987', '25', '0', '0.034', 'clearance'],
		['25 H7/k6', '25', '25.021', '25.002', '25.015', '-0.015', '0.019', 'transition'],
		['25 H7/n6', '25', '25.021', '25.015', '25.028', '-0.028', '0.006', 'transition'],
		['25 H7/p6', '25', '25.021', '25.022', '25.035', '-0.035', '-0.001', 'interference'],
		['500 H7/p6', '500', '500.063', '500.068', '500.108', '-0.108', '-0.005', 'interference']
	])('%s', (text, hMin, hMax, sMin, sMax, cMin, cMax, kind) => {
		const r = fitLimits(parseFit(text)!);
		expect(r.ok).toBe(true);
		if (!r.ok) return;
		expect([mm(r.hole.min), mm(r.hole.max), mm(r.shaft.min), mm(r.shaft.max)]).toEqual([hMin, hMax, sMin, sMax]);
		expect([mm(r.minClearance), mm(r.maxClearance)]).toEqual([cMin, cMax]);
		expect(fitKind(r.minClearance, r.maxClearance)).toBe(kind);
	});

	it('passes on the message of the failing class', () => {
		expect(fitLimits({ nominal: ex(600), hole: 'H7', shaft: 'g6' })).toMatchObject({ ok: false });
		expect(fitLimits({ nominal: ex(25), hole: 'g6', shaft: 'H7' })).toEqual({
			ok: false,
			message: 'g6 is a shaft class; write the hole first, such as H7/g6.'
		});
	});
});
