/** Property tests: the parser never throws and every problem points inside the document. */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parse } from './parse';
import { compilePattern, matchPattern } from './pattern';
import { render } from './render';

import { demoSources } from './demo-sources';

const demos = Object.values(demoSources);

function lineCount(s: string): number {
	return (s.startsWith('\uFEFF') ? s.slice(1) : s).replace(/\r\n?/g, '\n').split('\n').length;
}

function checkProblems(source: string) {
	const r = parse(source);
	const n = lineCount(source);
	for (const p of [...r.errors, ...r.warnings]) {
		expect(p.line).toBeGreaterThanOrEqual(1);
		expect(p.line).toBeLessThanOrEqual(n);
		expect(p.column).toBeGreaterThanOrEqual(1);
		expect(typeof p.message).toBe('string');
	}
	expect(r.procedure === null).toBe(r.errors.length > 0);
}

type Mutation = { op: 'delete' | 'duplicate' | 'swap' | 'insert'; at: number; other: number; text: string };
const mutation = fc.record({
	op: fc.constantFrom<Mutation['op']>('delete', 'duplicate', 'swap', 'insert'),
	at: fc.nat(),
	other: fc.nat(),
	text: fc.oneof(
		fc.string({ maxLength: 8 }),
		fc.constantFrom('```', '---', '## ', '> Warning: ', ': ', '&a', '*a', '[', '±', '\r', '\t', 'H77', '\u0000')
	)
});

function mutate(source: string, ms: Mutation[]): string {
	const lines = source.split('\n');
	for (const m of ms) {
		if (lines.length === 0) break;
		const i = m.at % lines.length;
		const j = m.other % lines.length;
		if (m.op === 'delete') lines.splice(i, 1);
		else if (m.op === 'duplicate') lines.splice(i, 0, lines[i]);
		else if (m.op === 'swap') [lines[i], lines[j]] = [lines[j], lines[i]];
		else {
			const col = m.other % (lines[i].length + 1);
			lines[i] = lines[i].slice(0, col) + m.text + lines[i].slice(col);
		}
	}
	return lines.join('\n');
}

describe('parse never throws', () => {
	it('on random strings', () => {
		fc.assert(
			fc.property(fc.string({ maxLength: 400 }), (s) => checkProblems(s)),
			{ numRuns: 150 }
		);
	});

	it('on random strings after valid front matter', () => {
		fc.assert(
			fc.property(fc.string({ maxLength: 300 }), (s) =>
				checkProblems(`---\ntitle: T\nfamily: F\npurpose: P\n---\n## S\n${s}`)
			),
			{ numRuns: 150 }
		);
	});

	it('on mutated demo documents (delete, duplicate, swap lines, insert characters)', () => {
		fc.assert(
			fc.property(fc.nat({ max: demos.length - 1 }), fc.array(mutation, { minLength: 1, maxLength: 6 }), (d, ms) => {
				const source = mutate(demos[d], ms);
				checkProblems(source);
				expect(() => render(source)).not.toThrow();
			}),
			{ numRuns: 60 }
		);
	});
});

describe('patterns', () => {
	it('a compiled pattern matches text generated from it, and nothing of another length', () => {
		const slot = fc.constantFrom('#', '@', '*', '-', 'K', '\\#');
		fc.assert(
			fc.property(fc.array(slot, { minLength: 1, maxLength: 20 }), fc.nat(), (slots, seed) => {
				const p = compilePattern(slots.join(''));
				expect(p.ok).toBe(true);
				if (!p.ok) return;
				const sample = slots
					.map((s, i) =>
						s === '#'
							? String((seed + i) % 10)
							: s === '@'
								? 'abcXYZ'[(seed + i) % 6]
								: s === '*'
									? 'a1Z9'[(seed + i) % 4]
									: s === '\\#'
										? '#'
										: s
					)
					.join('');
				expect(matchPattern(p.pattern, sample)).toBe(true);
				expect(matchPattern(p.pattern, sample + 'x')).toBe(false);
			}),
			{ numRuns: 100 }
		);
	});

	it.each([
		['KL-4410-##@', 'KL-4410-07K', true],
		['KL-4410-##@', 'kl-4410-07k', true],
		['KL-4410-##@', 'KL-4410-0AK', false],
		['PS#{8}', 'PS12345678', true],
		['PS#{8}', 'PS1234567', false],
		['\\#*{3}', '#A1b', true],
		['\\#*{3}', 'XA1b', false]
	])('%s matches %s → %s', (pattern, text, expected) => {
		const p = compilePattern(pattern);
		expect(p.ok && matchPattern(p.pattern, text)).toBe(expected);
	});

	it.each([[''], ['A\\'], ['{3}'], ['#{0}'], ['#{33}'], ['#}'], ['#'.repeat(65)]])('rejects %s', (pattern) => {
		expect(compilePattern(pattern).ok).toBe(false);
	});

	it('matches a long hostile input in linear time', () => {
		const p = compilePattern('*{32}*{32}');
		expect(p.ok).toBe(true);
		const t0 = performance.now();
		if (p.ok) for (let i = 0; i < 1000; i++) matchPattern(p.pattern, 'a'.repeat(10_000));
		expect(performance.now() - t0).toBeLessThan(2000);
	});
});
