import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { canonicalize } from './jcs';
import { bodyProblem, jsonBodySchema, MAX_BODY_DEPTH } from './schema';

/**
 * The body check as it was before the single walk: a depth walk, then `z.json()`, then `canonicalize`. The one walk
 * must accept and refuse exactly what this accepted and refused.
 */
const before = z
	.unknown()
	.refine((v) => bodyProblem(v) !== 'deep')
	.pipe(
		z.json().superRefine((value, ctx) => {
			try {
				canonicalize(value);
			} catch {
				ctx.addIssue({ code: 'custom', message: 'not canonical' });
			}
		})
	);

class Part {
	readonly no = 'KT-1';
}
const holey: unknown[] = [1];
holey[2] = 3; // index 1 is a hole
const nested = (n: number) => JSON.parse('['.repeat(n) + ']'.repeat(n)) as unknown;

describe('jsonBodySchema (one walk)', () => {
	it.each<[string, unknown, boolean]>([
		['a reading body', { stepIndex: 0, entries: [{ checkpointId: 'bore-1', entry: { readings: ['22.010'] } }] }, true],
		['null, true, 0, -0, a string', [null, true, 0, -0, 'x'], true],
		['a paired surrogate (an emoji)', { note: 'ok \ud83d\udd27' }, true],
		['nested exactly 32 levels', nested(MAX_BODY_DEPTH), true],
		['an object with no prototype', Object.assign(Object.create(null), { a: 1 }), true],
		['nested 33 levels', nested(MAX_BODY_DEPTH + 1), false],
		['a lone high surrogate', JSON.parse('{"note":"\\ud800"}'), false],
		['a lone low surrogate in a member name', JSON.parse('{"\\udc00":1}'), false],
		['NaN', { value: NaN }, false],
		['Infinity', [Infinity], false],
		['a Date', { at: new Date(0) }, false],
		['a class instance', { part: new Part() }, false],
		['a Map', new Map(), false],
		['a bigint', { n: 1n }, false],
		['a function', { f: () => 1 }, false],
		['undefined in an array', [1, undefined], false],
		['an array hole', holey, false],
		['undefined as the body', undefined, false]
	])('%s: accepted %s, as before', (_what, value, ok) => {
		expect(jsonBodySchema.safeParse(value).success).toBe(ok);
		expect(before.safeParse(value).success).toBe(ok);
	});

	it('refuses an undefined member, as z.json() did (canonicalize alone would drop it)', () => {
		expect(before.safeParse({ a: undefined }).success).toBe(false);
		const r = jsonBodySchema.safeParse({ a: undefined });
		expect(r.error?.issues[0].message).toMatch(/undefined/);
	});

	it('names where a bad value is, in canonicalize’s words', () => {
		const r = jsonBodySchema.safeParse({ entries: [{ note: JSON.parse('"\\ud800"') }] });
		expect(r.error?.issues[0].message).toMatch(/\/entries\/0\/note.*lone surrogate/);
	});

	it('refuses a cycle as too deep instead of looping', () => {
		const loop: Record<string, unknown> = {};
		loop.self = loop;
		expect(bodyProblem(loop)).toBe('deep');
	});

	it('walks a hostile 100,000-deep body without overflowing the stack', () => {
		expect(bodyProblem(nested(100_000))).toBe('deep');
	});
});
