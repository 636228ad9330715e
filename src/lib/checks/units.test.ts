import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { eq, ex, ratio, toDecimalString, toFixed } from './exact';
import { allUnits, convert, convertInterval, findUnit, unitById, unitsOf } from './units';

describe('findUnit', () => {
	it.each([
		['N·m', 'N_m'],
		['N.m', 'N_m'],
		['Nm', 'N_m'],
		['NM', 'N_m'],
		['N-m', 'N_m'],
		['N m', 'N_m'],
		['N⋅m', 'N_m'],
		['newton metre', 'N_m'],
		['Newton-meters', 'N_m'],
		['lbf·ft', 'lbf_ft'],
		['lbf-ft', 'lbf_ft'],
		['lb-ft', 'lbf_ft'],
		['ft-lb', 'lbf_ft'],
		['ft-lbs', 'lbf_ft'],
		['ft·lbf', 'lbf_ft'],
		['ftlb', 'lbf_ft'],
		['FT.LBS', 'lbf_ft'],
		['lbf·in', 'lbf_in'],
		['in-lb', 'lbf_in'],
		['in-lbs', 'lbf_in'],
		['lb-in', 'lbf_in'],
		['inlb', 'lbf_in'],
		['mm', 'mm'],
		[' mm ', 'mm'],
		['µm', 'um'], // U+00B5 MICRO SIGN
		['μm', 'um'], // U+03BC GREEK SMALL LETTER MU
		['um', 'um'],
		['in', 'in'],
		['inch', 'in'],
		['"', 'in'],
		['L', 'L'],
		['l', 'L'],
		['mL', 'mL'],
		['ml', 'mL'],
		['US qt', 'US_qt'],
		['qt', 'US_qt'],
		['US gal', 'US_gal'],
		['gal', 'US_gal'],
		['°', 'deg'],
		['deg', 'deg'],
		['°C', 'degC'],
		['degC', 'degC'],
		['℃', 'degC'], // U+2103 folds to °C under NFKC
		['°F', 'degF'],
		['kPa', 'kPa'],
		['bar', 'bar'],
		['psi', 'psi']
	])('%j → %s', (text, id) => {
		expect(findUnit(text)?.id).toBe(id);
	});

	it.each([
		['nm'], // nanometre symbol, refused on purpose
		['C'], // coulomb
		['F'], // farad
		[''],
		['lbs'],
		['furlong'],
		['kg']
	])('refuses %j', (text) => {
		expect(findUnit(text)).toBeUndefined();
	});
});

describe('unit registry', () => {
	it('has every contracted id, base unit first', () => {
		for (const id of [
			'mm',
			'um',
			'in',
			'N_m',
			'lbf_ft',
			'lbf_in',
			'L',
			'mL',
			'US_qt',
			'US_gal',
			'deg',
			'degC',
			'degF',
			'kPa',
			'bar',
			'psi'
		]) {
			expect(unitById(id).id).toBe(id);
		}
		expect(unitsOf('length').map((u) => u.id)).toEqual(['mm', 'um', 'in']);
		expect(unitsOf('torque')[0].id).toBe('N_m');
		expect(() => unitById('furlong')).toThrow(RangeError);
	});
});

describe('conversion factors', () => {
	it.each([
		// unit, places, rounded factor to the base unit, source
		['lbf_ft', 6, '1.355818'], // NIST SP 811:2008 B.8, pound-force foot → N·m 1.355 818
		['lbf_in', 7, '0.1129848'], // NIST SP 811:2008 B.8, pound-force inch → N·m 1.129 848 E-01
		['US_qt', 9, '0.946352946'], // NIST SP 811:2008 B.8, quart (U.S. liquid) → m³ 9.463 529 E-04 (exact 9.463 529 46)
		['US_gal', 6, '3.785412'], // NIST SP 811:2008 B.8, gallon (U.S.) → m³ 3.785 412 E-03
		['psi', 6, '6.894757'], // NIST SP 811:2008 B.8, psi → kPa 6.894 757
		['in', 1, '25.4'], // NIST SP 811:2008 B.8, inch → m 2.54 E-02 exact
		['bar', 0, '100'], // NIST SP 811:2008 B.8, bar → kPa 1.0 E+02 exact
		['mL', 3, '0.001'] // SI prefix milli (NIST SP 811:2008 §4.3)
	])('1 %s in base units rounds to %s places as %s', (id, places, factor) => {
		const u = unitById(id);
		expect(toFixed(convert(ex(1), u, unitsOf(u.dimension)[0]), places)).toBe(factor);
	});

	it.each([
		['212', '100'], // boiling point of water, definition of the Celsius and Fahrenheit scales (NIST SP 811:2008 B.8 note)
		['32', '0'], // freezing point, same source
		['-40', '-40'], // scales cross at −40 (arithmetic)
		['68', '20'] // ISO 1 reference temperature 20 °C = 68 °F (arithmetic)
	])('%s °F = %s °C', (f, c) => {
		expect(toDecimalString(convert(ex(f), unitById('degF'), unitById('degC')))).toBe(c);
		expect(toDecimalString(convert(ex(c), unitById('degC'), unitById('degF')))).toBe(f);
	});

	it('a difference of 9 °F is 5 °C', () => {
		// interval conversion: offsets cancel (NIST SP 811:2008 §4.2.1.1, from memory)
		expect(toDecimalString(convertInterval(ex(9), unitById('degF'), unitById('degC')))).toBe('5');
	});

	it('12 lbf·in is exactly 1 lbf·ft', () => {
		// 1 ft = 12 in (definition)
		expect(eq(convert(ex(12), unitById('lbf_in'), unitById('lbf_ft')), ex(1))).toBe(true);
	});

	it('refuses to convert across dimensions', () => {
		expect(() => convert(ex(1), unitById('mm'), unitById('N_m'))).toThrow(RangeError);
		expect(() => convertInterval(ex(1), unitById('psi'), unitById('L'))).toThrow(RangeError);
	});
});

describe('properties', () => {
	const arbValue = fc
		.tuple(fc.bigInt({ min: -(10n ** 12n), max: 10n ** 12n }), fc.bigInt({ min: 1n, max: 10n ** 6n }))
		.map(([n, d]) => ratio(n, d));
	const arbPair = fc
		.constantFrom(...allUnits())
		.chain((from) => fc.tuple(fc.constant(from), fc.constantFrom(...unitsOf(from.dimension))));
	it('converting there and back is the identity', () => {
		fc.assert(
			fc.property(arbValue, arbPair, (v, [from, to]) => {
				expect(convert(convert(v, from, to), to, from)).toEqual(v);
			}),
			{ numRuns: 300 }
		);
	});
});
