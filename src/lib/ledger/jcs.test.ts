import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { canonicalize, canonicalNumber, canonicalString, JcsError } from './jcs';

/** The double whose IEEE 754 bit pattern is `hex` (Appendix B lists numbers that way). */
function fromBits(hex: string): number {
	const view = new DataView(new ArrayBuffer(8));
	view.setBigUint64(0, BigInt('0x' + hex));
	return view.getFloat64(0);
}

describe('RFC 8785 published examples', () => {
	it('§3.2.2 example: numbers, string escapes and literals (RFC 8785 §3.2.2, from memory)', () => {
		const input = JSON.parse(
			'{"numbers": [333333333.33333329, 1E30, 4.50, 2e-3, 0.000000000000000000000000001],' +
				' "string": "\\u20ac$\\u000F\\u000aA\'\\u0042\\u0022\\u005c\\\\\\"\\/",' +
				' "literals": [null, true, false]}'
		);
		expect(canonicalize(input)).toBe(
			'{"literals":[null,true,false],"numbers":[333333333.3333333,1e+30,4.5,0.002,1e-27],' +
				'"string":"€$\\u000f\\nA\'B\\"\\\\\\\\\\"/"}'
		);
	});

	it('§3.2.3 sorting example: UTF-16 code-unit order, so the emoji sorts before U+FB33 (RFC 8785 §3.2.3, from memory)', () => {
		const input = JSON.parse(
			'{"\\u20ac": "Euro Sign", "\\r": "Carriage Return", "\\ufb33": "Hebrew Letter Dalet With Dagesh",' +
				' "1": "One", "\\ud83d\\ude00": "Emoji: Grinning Face", "\\u0080": "Control",' +
				' "\\u00f6": "Latin Small Letter O With Diaeresis"}'
		);
		expect(canonicalize(input)).toBe(
			'{"\\r":"Carriage Return","1":"One","\u0080":"Control","\u00f6":"Latin Small Letter O With Diaeresis",' +
				'"\u20ac":"Euro Sign","\ud83d\ude00":"Emoji: Grinning Face","\ufb33":"Hebrew Letter Dalet With Dagesh"}'
		);
	});

	// RFC 8785 Appendix B, "Number Serialization Samples", IEEE 754 bits → JSON text, from memory.
	it.each([
		['0000000000000000', '0'],
		['8000000000000000', '0'], // minus zero
		['0000000000000001', '5e-324'],
		['8000000000000001', '-5e-324'],
		['7fefffffffffffff', '1.7976931348623157e+308'],
		['ffefffffffffffff', '-1.7976931348623157e+308'],
		['4340000000000000', '9007199254740992'],
		['c340000000000000', '-9007199254740992'],
		['4430000000000000', '295147905179352830000'],
		['44b52d02c7e14af5', '9.999999999999997e+22'],
		['44b52d02c7e14af6', '1e+23'],
		['44b52d02c7e14af7', '1.0000000000000001e+23'],
		['444b1ae4d6e2ef4e', '999999999999999700000'],
		['444b1ae4d6e2ef4f', '999999999999999900000'],
		['444b1ae4d6e2ef50', '1e+21'],
		['3eb0c6f7a0b5ed8c', '9.999999999999997e-7'],
		['3eb0c6f7a0b5ed8d', '0.000001'],
		['41b3de4355555553', '333333333.3333332'],
		['41b3de4355555554', '333333333.33333325'],
		['41b3de4355555555', '333333333.3333333'],
		['41b3de4355555556', '333333333.3333334'],
		['41b3de4355555557', '333333333.33333343'],
		['becbf647612f3696', '-0.0000033333333333333333'],
		['43143ff3c1cb0959', '1424953923781206.2']
	])('Appendix B: bits %s → %s', (bits, expected) => {
		expect(canonicalNumber(fromBits(bits))).toBe(expected);
	});

	// The same samples given as literals in the brief (RFC 8785 Appendix B / §3.2.2.3, from memory).
	it.each([
		[1e30, '1e+30'],
		[4.5, '4.5'],
		[0.002, '0.002'],
		[1e-27, '1e-27'],
		[333333333.3333333, '333333333.3333333'],
		[-0, '0'],
		[9007199254740992, '9007199254740992'],
		[295147905179352830000, '295147905179352830000']
	])('number %d → %s', (n, expected) => {
		expect(canonicalize(n)).toBe(expected);
	});

	it.each([
		['7fffffffffffffff', 'NaN'],
		['7ff0000000000000', 'Infinity'],
		['fff0000000000000', '-Infinity']
	])('Appendix B: bits %s (%s) is refused', (bits) => {
		expect(() => canonicalNumber(fromBits(bits))).toThrow(JcsError);
	});
});

describe('strings (RFC 8785 §3.2.2.2, from memory)', () => {
	it.each([
		['"', '"\\""'],
		['\\', '"\\\\"'],
		['\b\t\n\f\r', '"\\b\\t\\n\\f\\r"'],
		['\u0000\u0001\u000b\u001f', '"\\u0000\\u0001\\u000b\\u001f"'], // lower-case hex
		['\u007f', '"\u007f"'], // DEL is not escaped
		['\u2028\u2029', '"\u2028\u2029"'], // not escaped either
		['/', '"/"'], // solidus stays literal
		['12.700 mm', '"12.700 mm"'],
		['µm ±0.015 °C 😀', '"µm ±0.015 °C 😀"']
	])('%j → %s', (s, expected) => {
		expect(canonicalString(s)).toBe(expected);
	});

	// RFC 8785 §3.1 requires I-JSON (RFC 7493), whose strings must be valid Unicode: a lone surrogate is refused.
	it.each(['\ud800', 'a\udc00', '\ude00\ud83d', 'x\ud83d'])('refuses the lone surrogate in %j', (s) => {
		expect(() => canonicalString(s)).toThrow(/lone surrogate/);
	});

	it('agrees with JSON.stringify on every well-formed string, and refuses every ill-formed one', () => {
		const anyUnit = fc.integer({ min: 0, max: 0xffff }).map((u) => String.fromCharCode(u));
		fc.assert(
			fc.property(fc.string({ unit: fc.oneof(anyUnit, fc.constantFrom('😀', '\ud83d', '"', '\\')) }), (s) => {
				const native = JSON.stringify(s);
				// ES2019 JSON.stringify writes a lone surrogate as \udxxx: a JSON-level oracle for "ill-formed".
				if (/\\ud[89a-f]/.test(native)) expect(() => canonicalString(s)).toThrow(JcsError);
				else expect(canonicalString(s)).toBe(native);
			}),
			{ numRuns: 300 }
		);
	});
});

describe('refusals name the place', () => {
	class Reading {
		value = '1';
	}
	it.each<[string, unknown, string]>([
		['NaN', { a: NaN }, '/a'],
		['Infinity', [1, Infinity], '/1'],
		['undefined in an array', { list: [1, undefined] }, '/list/1'],
		// eslint-disable-next-line no-sparse-arrays -- a hole on purpose
		['an array hole', [1, , 3], '/1'],
		['a function', { f: () => 1 }, '/f'],
		['a bigint', { n: 1n }, '/n'],
		['a symbol', { s: Symbol('x') }, '/s'],
		['a Date', { at: new Date(0) }, '/at'],
		['a Map', { m: new Map() }, '/m'],
		['a class instance', { r: new Reading() }, '/r'],
		['a key with a slash', { 'a/b': NaN }, '/a~1b'],
		['undefined itself', undefined, '']
	])('%s', (_what, value, path) => {
		let error: unknown;
		try {
			canonicalize(value);
		} catch (e) {
			error = e;
		}
		expect(error).toBeInstanceOf(JcsError);
		expect((error as JcsError).path).toBe(path);
	});

	it('a cycle', () => {
		const a: Record<string, unknown> = {};
		a.self = a;
		expect(() => canonicalize(a)).toThrow(/cycle/);
	});

	it('the same object twice is not a cycle', () => {
		const shared = { v: '1' };
		expect(canonicalize([shared, shared])).toBe('[{"v":"1"},{"v":"1"}]');
	});

	it('leaves out undefined object members, as a JSON round trip does', () => {
		expect(canonicalize({ b: undefined, a: 1 })).toBe('{"a":1}');
	});

	it('sorts integer-like keys as strings, not in the numeric order JS objects iterate them (§3.2.3)', () => {
		expect(canonicalize({ 10: 'a', 9: 'b', 1: 'c', b: 'd', B: 'e' })).toBe(
			'{"1":"c","10":"a","9":"b","B":"e","b":"d"}'
		);
	});

	it('accepts objects without a prototype', () => {
		const o = Object.create(null) as Record<string, unknown>;
		o.z = true;
		o.a = null;
		expect(canonicalize(o)).toBe('{"a":null,"z":true}');
	});
});

describe('properties', () => {
	const json = fc.jsonValue({ maxDepth: 4 });

	/** The same value with every object's keys inserted in a shuffled order. */
	function reorder(v: unknown, seed: number): unknown {
		if (Array.isArray(v)) return v.map((x, i) => reorder(x, seed + i));
		if (v === null || typeof v !== 'object') return v;
		const keys = Object.keys(v);
		const shuffled = keys
			.map((k, i) => [k, Math.sin(seed * 9301 + i * 49297) * 1e4] as const)
			.sort((a, b) => (a[1] % 1) - (b[1] % 1))
			.map(([k]) => k);
		const out: Record<string, unknown> = {};
		for (const k of shuffled) {
			Object.defineProperty(out, k, {
				value: reorder((v as Record<string, unknown>)[k], seed + 1),
				enumerable: true,
				writable: true,
				configurable: true
			});
		}
		return out;
	}

	it('parses back to the same value', () => {
		fc.assert(
			fc.property(json, (v) => {
				// JSON.stringify's view of the value: -0 becomes 0, which JSON cannot tell apart anyway.
				expect(JSON.parse(canonicalize(v))).toEqual(JSON.parse(JSON.stringify(v)));
			}),
			{ numRuns: 300 }
		);
	});

	it('does not depend on the order keys were inserted', () => {
		fc.assert(
			fc.property(json, fc.integer(), (v, seed) => {
				expect(canonicalize(reorder(v, seed))).toBe(canonicalize(v));
			}),
			{ numRuns: 300 }
		);
	});

	it('is idempotent: jcs(JSON.parse(jcs(x))) === jcs(x)', () => {
		fc.assert(
			fc.property(json, (v) => {
				const once = canonicalize(v);
				expect(canonicalize(JSON.parse(once))).toBe(once);
			}),
			{ numRuns: 300 }
		);
	});

	it('has no whitespace outside strings', () => {
		fc.assert(
			fc.property(json, (v) => {
				expect(canonicalize(v).replace(/"(?:[^"\\]|\\.)*"/g, '')).not.toMatch(/\s/);
			}),
			{ numRuns: 200 }
		);
	});

	it('writes every finite double so that it reads back exactly (§3.2.2.3)', () => {
		fc.assert(
			fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (d) => {
				expect(Number(canonicalNumber(d))).toBe(d === 0 ? 0 : d);
			}),
			{ numRuns: 300 }
		);
	});
});
