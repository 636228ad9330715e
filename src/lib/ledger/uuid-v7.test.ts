import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { createUuidV7, isUuidV7, uuidv7, uuidV7Time } from './uuid-v7';

describe('uuidv7 (RFC 9562 §5.7, from memory)', () => {
	it('has version nibble 7 and variant bits 10, and zod agrees it is a v7', () => {
		for (let i = 0; i < 200; i++) {
			const id = uuidv7();
			expect(id[14]).toBe('7');
			expect('89ab').toContain(id[19]);
			expect(isUuidV7(id)).toBe(true);
			expect(z.uuidv7().safeParse(id).success).toBe(true);
		}
	});

	it('carries the current time in milliseconds', () => {
		const before = Date.now();
		const t = uuidV7Time(uuidv7());
		expect(t).toBeGreaterThanOrEqual(before);
		expect(t).toBeLessThanOrEqual(Date.now());
	});

	it('reads the timestamp of the RFC 9562 Appendix A.6 example (from memory): 2022-02-22 19:22:22 UTC', () => {
		expect(uuidV7Time('017f22e2-79b0-7cc3-98c4-dc0c0c07398f')).toBe(Date.UTC(2022, 1, 22, 19, 22, 22));
	});

	it('ids made later sort later as text', () => {
		const ids = Array.from({ length: 2000 }, () => uuidv7());
		expect([...ids].sort()).toEqual(ids);
		expect(new Set(ids).size).toBe(ids.length);
	});

	it('stays strictly increasing within one millisecond, past the counter, and when the clock steps back', () => {
		let t = 1_764_590_000_000;
		const times = [t, t, t, t - 5000];
		let call = 0;
		const make = createUuidV7({
			now: () => (call < times.length ? times[call++] : t),
			random: (b) => b.fill(0xff) // worst case: the counter starts at its highest random start, 0x7ff
		});
		const ids = Array.from({ length: 5000 }, () => make());
		expect([...ids].sort()).toEqual(ids);
		expect(new Set(ids).size).toBe(ids.length);
		// 0x7ff…0xfff is 2049 ids per millisecond, so 5000 ids borrow two milliseconds from the future.
		expect(uuidV7Time(ids.at(-1)!)).toBe(t + 2);
		t += 10;
		expect(uuidV7Time(make())).toBe(t);
	});

	it.each([
		['017f22e2-79b0-4cc3-98c4-dc0c0c07398f', false], // version 4
		['017f22e2-79b0-7cc3-c8c4-dc0c0c07398f', false], // variant 110
		['017F22E2-79B0-7CC3-98C4-DC0C0C07398F', false], // upper case: the ledger stores lower case
		['017f22e2-79b0-7cc3-98c4-dc0c0c07398f', true]
	])('isUuidV7(%s) → %s', (id, ok) => {
		expect(isUuidV7(id)).toBe(ok);
	});
});
