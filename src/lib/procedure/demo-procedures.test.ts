import { describe, expect, it } from 'vitest';
import { CHECKPOINT_KINDS } from './model';
import { parse } from './parse';
import { contentHash } from './hash';
import { renderProcedure } from './render';

import { demoSources } from './demo-sources';

const files = Object.keys(demoSources);
const read = (f: string) => demoSources[f];

describe('demo procedures', () => {
	it('are three', () => expect(files).toHaveLength(3));

	it.each(files)('%s parses with zero errors and zero warnings', (f) => {
		const r = parse(read(f));
		expect(r.errors).toEqual([]);
		expect(r.warnings).toEqual([]);
		expect(r.procedure?.meta.specs).toMatch(/invented/i);
		expect(renderProcedure(r.procedure!)).toContain('<section class="step');
	});

	it('together use every checkpoint kind', () => {
		const kinds = new Set(
			files.flatMap((f) => parse(read(f)).procedure!.steps.flatMap((s) => s.checkpoints.map((c) => c.kind)))
		);
		expect([...kinds].sort()).toEqual([...CHECKPOINT_KINDS].sort());
	});

	it('together carry the required safety cautions', () => {
		const all = files
			.map((f) => read(f))
			.join('\n')
			.toLowerCase();
		for (const phrase of [
			'scald',
			'stored hydraulic pressure',
			'heavy',
			'eye protection',
			'local rules',
			"manufacturer's service information",
			'qualified person'
		]) {
			expect(all).toContain(phrase);
		}
	});

	it.each(files)('%s has the same content hash with CRLF and LF', (f) => {
		const lf = read(f).replace(/\r\n/g, '\n');
		expect(contentHash(lf.replace(/\n/g, '\r\n'))).toBe(contentHash(lf));
		expect(parse(lf.replace(/\n/g, '\r\n')).procedure?.hash).toBe(parse(lf).procedure?.hash);
	});
});
