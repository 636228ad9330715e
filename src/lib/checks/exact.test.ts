import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
	abs,
	add,
	cmp,
	div,
	eq,
	ex,
	exact,
	fromNm,
	ge,
	gt,
	isZero,
	le,
	lt,
	max,
	min,
	mul,
	neg,
	ONE,
	ratio,
	sign,
	sub,
	toDecimalString,
	toFixed,
	toNm,
	toNumber,
	toSignificant,
	ZERO
} from './exact';

// Expected values in this file are plain arithmetic (common practice, no source).
describe('exact()', () => {
	it.each([
		['12', 12n, 1n],
		['-0.021', -21n, 1000n],
		['+3.5', 7n, 2n],
		['1.5e-3', 3n, 2000n],
		['1.5E3', 1500n, 1n],
		['.5', 1n, 2n],
		['12.', 12n, 1n],
		['-0', 0n, 1n],
		['0.000', 0n, 1n],
		['007.50', 15n, 2n],
		['2e+2', 200n, 1n],
		['1e999', 10n ** 999n, 1n]
	])('parses %s', (text, n, d) => {
		expect(exact(text)).toEqual({ n, d });
	});

	it.each([
		[''],
		['   '],
		[' 12'],
		['12 '],
		['NaN'],
		['Infinity'],
		['-Infinity'],
		['1,5'],
		['0x10'],
		['.'],
		['+'],
		['e5'],
		['1e'],
		['1.2.3'],
		['--1'],
		['1e1001'],
		['1e-99999999999']
	])('rejects %j', (text) => {
		expect(exact(text)).toBeUndefined();
	});
});

describe('ex()', () => {
	it('takes numbers through their shortest decimal text', () => {
		expect(ex(0.1)).toEqual({ n: 1n, d: 10n });
		expect(ex(1e21)).toEqual({ n: 10n ** 21n, d: 1n });
		expect(ex(-2.5e-7)).toEqual({ n: -1n, d: 4_000_000n });
		expect(ex(7n)).toEqual({ n: 7n, d: 1n });
		expect(ex('25.021')).toEqual({ n: 25021n, d: 1000n });
	});
	it.each([[Number.NaN], [Infinity], [-Infinity], ['abc']])('throws on %s', (v) => {
		expect(() => ex(v)).toThrow(RangeError);
	});
});

describe('arithmetic', () => {
	it('keeps fractions reduced with a positive denominator', () => {
		expect(ratio(6n, -4n)).toEqual({ n: -3n, d: 2n });
		expect(ratio(0n, -7n)).toEqual(ZERO);
		expect(() => ratio(1n, 0n)).toThrow(RangeError);
	});
	it.each([
		// a, b, a+b, a−b, a×b, a÷b
		['0.1', '0.2', '0.3', '-0.1', '0.02', '0.5'],
		['25.4', '-12.7', '12.7', '38.1', '-322.58', '-2'],
		['1', '3', '4', '-2', '3', undefined]
	])('%s and %s', (a, b, s, d, p, q) => {
		expect(eq(add(ex(a), ex(b)), ex(s))).toBe(true);
		expect(eq(sub(ex(a), ex(b)), ex(d))).toBe(true);
		expect(eq(mul(ex(a), ex(b)), ex(p))).toBe(true);
		if (q !== undefined) expect(eq(div(ex(a), ex(b)), ex(q))).toBe(true);
	});
	it('1/3 × 3 is exactly 1', () => {
		expect(mul(div(ONE, ex(3)), ex(3))).toEqual(ONE);
	});
	it('throws on division by zero', () => {
		expect(() => div(ONE, ZERO)).toThrow(RangeError);
	});
	it('neg, abs, sign, isZero, min, max', () => {
		expect(neg(ex('1.5'))).toEqual(ex('-1.5'));
		expect(abs(ex('-1.5'))).toEqual(ex('1.5'));
		expect([sign(ex(-2)), sign(ZERO), sign(ex('0.001'))]).toEqual([-1, 0, 1]);
		expect(isZero(ex('-0.000'))).toBe(true);
		expect(min(ex(2), ex('1.99'))).toEqual(ex('1.99'));
		expect(max(ex(-2), ex(-3))).toEqual(ex(-2));
	});
	it.each([
		['1', '2', -1],
		['2', '1', 1],
		['0.50', '.5', 0],
		['-1', '-0.5', -1]
	])('cmp(%s, %s) = %i', (a, b, c) => {
		expect(cmp(ex(a), ex(b))).toBe(c);
		expect(lt(ex(a), ex(b))).toBe(c < 0);
		expect(le(ex(a), ex(b))).toBe(c <= 0);
		expect(gt(ex(a), ex(b))).toBe(c > 0);
		expect(ge(ex(a), ex(b))).toBe(c >= 0);
	});
});

describe('display', () => {
	it.each([
		['2.5', 0, '3'],
		['-2.5', 0, '-3'],
		['0.0125', 3, '0.013'],
		['-0.0125', 3, '-0.013'],
		['1', 3, '1.000'],
		['-0.0004', 3, '0.000'],
		['123.456', 1, '123.5']
	])('toFixed(%s, %i) = %s (half away from zero)', (v, p, s) => {
		expect(toFixed(ex(v), p)).toBe(s);
	});
	it('toFixed of 2/3', () => {
		expect(toFixed(ratio(2n, 3n), 4)).toBe('0.6667');
	});
	it.each([
		[ex('25.0210'), 12, '25.021'],
		[ex('-0.5'), 12, '-0.5'],
		[ex(100), 12, '100'],
		[ratio(1n, 3n), 12, '0.333333333333'],
		[ratio(2n, 3n), 4, '0.6667'],
		[ratio(1n, 2n ** 20n), 2, '0.00000095367431640625'], // terminating: exact regardless of maxPlaces
		[ratio(-1n, 3n * 10n ** 13n), 12, '0']
	])('toDecimalString(%o, %i) = %s', (v, p, s) => {
		expect(toDecimalString(v, p)).toBe(s);
	});
	it.each([
		[ratio(1n, 254000n), '0.00000393701'],
		[ex('25.021'), '25.021'],
		[ex('123456789'), '123456789'],
		[ratio(100n, 3n), '33.3333']
	])('toSignificant(%o) = %s', (v, s) => {
		expect(toSignificant(v)).toBe(s);
	});
	it.each([
		[ex('0.1'), 0.1],
		[ratio(1n, 3n), 1 / 3],
		[ex('-25.021'), -25.021],
		[ratio(10n ** 30n + 1n, 3n * 10n ** 10n), 1e30 / 3e10],
		[ex('1e-400'), 0]
	])('toNumber(%o) = %d', (v, n) => {
		expect(toNumber(v)).toBe(n);
	});
});

describe('nanometres', () => {
	it.each([
		[25021000n, '25.021'],
		[-1n, '-0.000001'],
		[0n, '0']
	])('fromNm(%i) = %s mm', (nm, mm) => {
		expect(toDecimalString(fromNm(nm))).toBe(mm);
	});
	it.each([
		['25.021', 25021000n],
		['0.0000005', 1n],
		['-0.0000005', -1n],
		['0.0000004', 0n]
	])('toNm(%s mm) = %i (half away from zero)', (mm, nm) => {
		expect(toNm(ex(mm))).toBe(nm);
	});
});

const arbExact = fc
	.tuple(fc.bigInt({ min: -(10n ** 15n), max: 10n ** 15n }), fc.bigInt({ min: 1n, max: 10n ** 9n }))
	.map(([n, d]) => ratio(n, d));

/** Terminating decimals: n / (2^a · 5^b). */
const arbTerminating = fc
	.tuple(fc.bigInt({ min: -(10n ** 18n), max: 10n ** 18n }), fc.nat(30), fc.nat(30))
	.map(([n, a, b]) => ratio(n, 2n ** BigInt(a) * 5n ** BigInt(b)));

describe('properties', () => {
	it('exact(toDecimalString(x)) = x for terminating decimals', () => {
		fc.assert(
			fc.property(arbTerminating, (x) => {
				expect(exact(toDecimalString(x))).toEqual(x);
			}),
			{ numRuns: 300 }
		);
	});
	it('cmp is antisymmetric and agrees with sub', () => {
		fc.assert(
			fc.property(arbExact, arbExact, (a, b) => {
				expect(cmp(a, b)).toBe(-cmp(b, a) || 0);
				expect(cmp(a, b)).toBe(sign(sub(a, b)));
			}),
			{ numRuns: 300 }
		);
	});
	it('sub undoes add and div undoes mul', () => {
		fc.assert(
			fc.property(arbExact, arbExact, (a, b) => {
				expect(sub(add(a, b), b)).toEqual(a);
				if (!isZero(b)) expect(div(mul(a, b), b)).toEqual(a);
			}),
			{ numRuns: 300 }
		);
	});
});
