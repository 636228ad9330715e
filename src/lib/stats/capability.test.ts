import { describe, expect, it } from 'vitest';
import { indices, MIN_READINGS_FOR_INDICES, performance, summarise } from './capability';

describe('indices (NIST/SEMATECH e-Handbook of Statistical Methods, 6.1.6 "What is Process Capability?")', () => {
	// The handbook's worked example, from memory: USL = 20, LSL = 8, μ = 16, σ = 2 gives Cp = 1.0,
	// Cpu = (20 − 16)/6 = 0.6667, Cpl = (16 − 8)/6 = 1.3333 and Cpk = 0.6667. With σ = s these are Pp, Ppk.
	it('reproduces the handbook example', () => {
		const r = indices(16, 2, 8, 20);
		expect(r.pp).toBeCloseTo(1.0, 10);
		expect(r.ppu).toBeCloseTo(0.6667, 4);
		expect(r.ppl).toBeCloseTo(1.3333, 4);
		expect(r.ppk).toBeCloseTo(0.6667, 4);
	});

	it.each([
		// One-sided limits: only the index of the limit that exists (same handbook section: Cpu / Cpl alone).
		{ lsl: null, usl: 20, pp: null, ppk: 0.6667 },
		{ lsl: 8, usl: null, pp: null, ppk: 1.3333 }
	])('one-sided limits lsl=$lsl usl=$usl', ({ lsl, usl, pp, ppk }) => {
		const r = indices(16, 2, lsl, usl);
		expect(r.pp).toBe(pp);
		expect(r.ppk).toBeCloseTo(ppk, 4);
	});

	it('a mean outside the limits gives a negative Ppk (handbook: Cpk < 0 when μ lies outside)', () => {
		expect(indices(21, 2, 8, 20).ppk).toBeCloseTo(-1 / 6, 10);
	});
});

describe('summarise: overall sample standard deviation (n − 1)', () => {
	// Textbook data set 2, 4, 4, 4, 5, 5, 7, 9: mean 5, Σ(x − x̄)² = 32, so s = √(32/7) = 2.13809 (the population
	// σ of the same data is 2). Common worked example (e.g. the "Standard deviation" article of Wikipedia), from memory.
	it('matches the worked example', () => {
		const s = summarise([2, 4, 4, 4, 5, 5, 7, 9])!;
		expect(s.mean).toBe(5);
		expect(s.s).toBeCloseTo(Math.sqrt(32 / 7), 12);
		expect(s.s).toBeCloseTo(2.13809, 5);
		expect([s.min, s.max, s.n]).toEqual([2, 9, 8]);
	});
	it('is null for no readings and has no s for one', () => {
		expect(summarise([])).toBeNull();
		expect(summarise([3])!.s).toBeNull();
	});
	it('refuses non-finite readings', () => {
		expect(() => summarise([1, Number.NaN])).toThrow(RangeError);
	});
});

describe('performance: indices only from 25 readings up', () => {
	// 25 readings: twelve at 10, twelve at 12, one at 11 → mean 11, Σ(x − x̄)² = 24, s = √(24/24) = 1 (worked by hand).
	const values = [...Array(12).fill(10), ...Array(12).fill(12), 11];

	it('gives Pp and Ppk at 25 readings', () => {
		const p = performance(values, 8, 15)!;
		expect(p.n).toBe(MIN_READINGS_FOR_INDICES);
		expect(p.mean).toBe(11);
		expect(p.s).toBeCloseTo(1, 12);
		expect(p.pp).toBeCloseTo(7 / 6, 12); // (15 − 8) / 6
		expect(p.ppk).toBeCloseTo(1, 12); // min(15 − 11, 11 − 8) / 3 = 3 / 3
		expect(p.withheld).toBeNull();
	});
	it('withholds them at 24 readings, with the reason', () => {
		const p = performance(values.slice(0, 24), 8, 15)!;
		expect(p.pp).toBeNull();
		expect(p.ppk).toBeNull();
		expect(p.withheld).toMatch(/from 25 readings; there are 24/);
	});
	it('withholds them when every reading is the same', () => {
		expect(performance(Array(30).fill(5), 4, 6)!.withheld).toMatch(/spread is zero/);
	});
});
