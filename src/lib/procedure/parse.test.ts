import { describe, expect, it } from 'vitest';
import { block, doc } from './test-helpers';
import { parse } from './parse';
import { contentHash, normaliseSource } from './hash';
import { MAX_DOCUMENT_BYTES, MAX_STEPS } from './version';
import { ProcedureSchema } from './model';

// In doc(): line 7 is the step heading, line 9 the first line of the step body, so a block's
// fence is line 9 and its first key line 10.
const FENCE = 9;
const KEY1 = 10;

describe('parser errors point at the right line', () => {
	it.each([
		[
			'tolerance class typo (H77), at the tolerance key',
			block('measure bore-2', 'nominal: 18 mm\ntolerance: H77'),
			KEY1 + 1,
			'Step 1, checkpoint bore-2: "H77" is not a tolerance class; write a letter and a grade such as H7.'
		],
		[
			'unknown kind, at the fence',
			block('torq t1', 'target: 1 N·m'),
			FENCE,
			/"torq" is not a checkpoint kind.*Did you mean "torque"/
		],
		[
			'unknown unit, at the key',
			block('torque t1', 'fasteners: 2\ntarget: 24 furlongs\ntolerance: ±10 %'),
			KEY1 + 1,
			/"furlongs" is not a unit/
		],
		[
			'unit of the wrong dimension',
			block('torque t1', 'target: 24 mm\ntolerance: ±10 %\nfasteners: 2'),
			KEY1,
			/unit of length/
		],
		[
			'impossible limits (min > max)',
			block('torque t1', 'target: 24 N·m\ntolerance: 26 to 22 N·m\nfasteners: 2'),
			KEY1 + 1,
			/impossible: the minimum 26 N·m is above the maximum 22 N·m/
		],
		[
			'negative torque',
			block('torque t1', 'target: -24 N·m\ntolerance: ±10 %\nfasteners: 2'),
			KEY1,
			/greater than zero/
		],
		[
			'tolerance reaching below zero',
			block('torque t1', 'target: 2 N·m\ntolerance: ±3 N·m\nfasteners: 2'),
			KEY1 + 1,
			/below zero/
		],
		[
			'size outside the ISO table (600 mm)',
			block('measure big', 'nominal: 600 mm\ntolerance: H7'),
			KEY1 + 1,
			/Step 1, checkpoint big: .*500/
		],
		['ISO class on an inch nominal', block('measure b', 'nominal: 1 in\ntolerance: H7'), KEY1 + 1, /metric/],
		[
			'missing required key, at the fence',
			block('torque t1', 'target: 24 N·m\nfasteners: 2'),
			FENCE,
			/needs "tolerance", for example "tolerance: ±10 %"/
		],
		['missing id', block('torque', 'target: 24 N·m'), FENCE, /needs an id/],
		['bad id', block('torque T_1', 'target: 24 N·m'), FENCE, /cannot be a checkpoint id/],
		['bad part pattern', block('part p1', 'number: BX-#{99}'), KEY1, /not a usable part-number pattern/],
		['bad serial pattern', block('part p1', 'number: BX-1\nserial: SN-\\'), KEY1 + 1, /not a usable serial pattern/],
		[
			'clearance referring to a missing checkpoint',
			block('clearance c1', 'bore: nope\nshaft: nada'),
			FENCE,
			/"bore: nope" names a checkpoint that does not exist/
		],
		[
			'clearance referring to a non-measure',
			block('confirm x', 'prompt: ok') + block('confirm y', 'prompt: ok') + block('clearance c1', 'bore: x\nshaft: y'),
			FENCE + 6,
			/is a confirm checkpoint/
		],
		[
			'choice follow-up to a missing checkpoint',
			block('choice c', 'prompt: p\noptions: [a, b]\nthen:\n  a: [ghost]'),
			FENCE,
			/needs checkpoint "ghost"/
		],
		[
			'order not naming every fastener',
			block('torque t1', 'target: 24 N·m\ntolerance: ±10 %\nfasteners: [A, B, C]\norder: [A, C]'),
			KEY1 + 3,
			/"B" is missing/
		],
		[
			'passes not ending at 100 %',
			block('torque t1', 'target: 24 N·m\ntolerance: ±10 %\nfasteners: 2\npasses: 30 %, 60 %'),
			KEY1 + 3,
			/last pass must be 100 %/
		],
		[
			'ovality without angles',
			block('measure b', 'nominal: 18 mm\ntolerance: H7\novality: max 0.005 mm'),
			KEY1 + 2,
			/ovality needs readings at 2 or more angles/
		],
		[
			'YAML syntax error, at its line',
			block('torque t1', 'target: 24 N·m\ntolerance: ±10 %: x\nfasteners: 2'),
			KEY1 + 1,
			/not valid "key: value"/
		],
		[
			'YAML duplicate key, at the second key',
			block('torque t1', 'target: 24 N·m\ntarget: 25 N·m\ntolerance: ±10 %\nfasteners: 2'),
			KEY1 + 1,
			/written twice/
		],
		[
			'YAML alias rejected',
			block('torque t1', 'target: &t 24 N·m\ntolerance: ±10 %\nfasteners: 2\nprompt: *t'),
			KEY1,
			/anchors|aliases/
		],
		['decimal comma', block('measure b', 'nominal: 18,5 mm\ntolerance: ±0.01 mm'), KEY1, /decimal comma/],
		['checkpoint before the first step', '', 0, /before the first step/],
		['a fluid with neither amount nor level', block('fluid f', 'spec: X'), FENCE, /needs "amount".*or "level"/],
		['bad step attribute value', block('step', 'critical: maybe'), KEY1, /"critical" must be yes or no/]
	])('%s', (_name, body, line, message) => {
		const source =
			line === 0
				? `---\ntitle: T\nfamily: F\npurpose: P\n---\n\n${block('confirm early', 'prompt: x')}\n## Step\n`
				: doc(body);
		const r = parse(source);
		expect(r.procedure).toBeNull();
		const e = r.errors[0];
		expect(e, JSON.stringify(r.errors)).toBeDefined();
		if (typeof message === 'string') expect(e.message).toBe(message);
		else expect(e.message).toMatch(message);
		expect(e.line).toBe(line === 0 ? 7 : line);
		expect(e.column).toBeGreaterThanOrEqual(1);
	});

	it('duplicate checkpoint id points at the second one and names the first line', () => {
		const r = parse(doc(block('confirm c1', 'prompt: a') + '\n' + block('confirm c1', 'prompt: b')));
		expect(r.errors).toHaveLength(1);
		expect(r.errors[0]).toMatchObject({ line: FENCE + 4, stepIndex: 0, checkpointId: 'c1' });
		expect(r.errors[0].message).toMatch(/already used by the checkpoint on line 9/);
	});

	it('front matter: missing and misspelt keys', () => {
		const r = parse('---\ntitle: T\nfamly: F\n---\n\n## S\n');
		expect(r.errors.map((e) => e.message)).toEqual([
			'Front matter: "family" is missing; add a line such as "family: KX-7 (invented)".',
			'Front matter: "purpose" is missing; add a line such as "purpose: Why this procedure exists".'
		]);
		expect(r.warnings[0]).toMatchObject({ line: 3, message: expect.stringMatching(/"famly".*Did you mean "family"/) });
	});

	it('no front matter at all', () => {
		expect(parse('## Step\n').errors[0]).toMatchObject({
			line: 1,
			message: expect.stringMatching(/must begin with front matter/)
		});
	});
});

describe('warnings', () => {
	it.each([
		[
			'unknown key in a checkpoint',
			block('confirm c1', 'prompt: ok\ncolour: red'),
			KEY1 + 1,
			/"colour" is not a key of a confirm checkpoint/
		],
		[
			'misspelt key suggests the right one',
			block('torque t1', 'target: 24 N·m\ntolerence: ±10 %\ntolerance: ±10 %\nfasteners: 2'),
			KEY1 + 1,
			/Did you mean "tolerance"/
		],
		['unknown step attribute', block('step', 'minutes: 5\nweather: dry'), KEY1 + 1, /not a step attribute/],
		[
			'coarse gauge resolution',
			block('measure b', 'nominal: 18 mm\ntolerance: H7\nresolution: 0.01 mm'),
			KEY1 + 2,
			/coarser than a tenth/
		],
		['a # heading', '# Big\n', FENCE, /"#" heading/],
		[
			'a fence inside a list',
			'- item\n\n  ```confirm c\n  prompt: x\n  ```\n',
			FENCE + 2,
			/inside a list or quote is not read/
		]
	])('%s', (_n, body, line, message) => {
		const r = parse(doc(body));
		expect(r.errors).toEqual([]);
		expect(r.procedure).not.toBeNull();
		expect(r.warnings[0]?.message).toMatch(message);
		expect(r.warnings[0]?.line).toBe(line);
	});
});

describe('size limits', () => {
	it(`refuses a document over ${MAX_DOCUMENT_BYTES} bytes (UTF-8), counting multi-byte characters`, () => {
		// 'ü' is 2 bytes in UTF-8: 500 001 of them are 1 000 002 bytes, though only 500 001 UTF-16 units.
		const r = parse(doc('ü'.repeat(500_001)));
		expect(r.procedure).toBeNull();
		expect(r.errors[0].message).toMatch(/bytes \(UTF-8\); the limit is 1,000,000 bytes/);
	});

	it(`refuses more than ${MAX_STEPS} steps, at the first extra heading`, () => {
		const steps = Array.from({ length: MAX_STEPS + 3 }, (_, i) => `## Step ${i + 1}\n`).join('\n');
		const r = parse(`---\ntitle: T\nfamily: F\npurpose: P\n---\n\n${steps}`);
		expect(r.procedure).toBeNull();
		expect(r.errors).toHaveLength(1);
		expect(r.errors[0].message).toMatch(/more than 500 steps/);
		expect(r.errors[0].line).toBe(7 + MAX_STEPS * 2);
	});

	it(`accepts exactly ${MAX_STEPS} steps`, () => {
		const steps = Array.from({ length: MAX_STEPS }, (_, i) => `## Step ${i + 1}\n`).join('\n');
		expect(parse(`---\ntitle: T\nfamily: F\npurpose: P\n---\n\n${steps}`).procedure?.steps).toHaveLength(MAX_STEPS);
	});
});

describe('model', () => {
	const source = doc(
		block(
			'step',
			'critical: yes\nminutes: 12.5\ntools: [dial bore gauge, setting ring 18 mm]\nqualification: valve-body rebuild'
		) +
			'Clean first.\n\n> Caution: solvent vapour; ventilate.\n\n' +
			block('measure b', 'stages:\n  standard: 18 mm H7\n  oversize 0.25: 18.25 mm H7')
	);

	it('is JSON-serialisable and survives a round trip through the schema', () => {
		const p = parse(source).procedure!;
		const copy = JSON.parse(JSON.stringify(p));
		expect(ProcedureSchema.parse(copy)).toEqual(p);
	});

	it('records step attributes, callouts and repair stages', () => {
		const r = parse(
			doc(
				block('step', 'critical: yes\nminutes: 12.5\ntools: [dial bore gauge]\nqualification: valve-body rebuild') +
					'> Caution: solvent vapour.\n\n' +
					block('measure b', 'stages:\n  standard: 18 mm H7\n  oversize 0.25: 18.25 mm H7')
			)
		);
		const step = r.procedure!.steps[0];
		expect(step).toMatchObject({
			critical: true,
			minutes: 12.5,
			tools: ['dial bore gauge'],
			qualification: 'valve-body rebuild'
		});
		expect(step.blocks[0]).toMatchObject({ type: 'callout', level: 'caution', markdown: 'solvent vapour.' });
		const b = step.checkpoints[0];
		// 18 H7 = 18.000 … 18.018; 18.25 H7 stays in the 10–18? no: over 18 to 30 → IT7 21 µm (ISO 286-2, from memory).
		expect(b.kind === 'measure' && b.stages.map((s) => [s.name, s.limits.min, s.limits.max])).toEqual([
			['standard', '18', '18.018'],
			['oversize 0.25', '18.25', '18.271']
		]);
	});

	it('computes torque limits for ±, %, range and converted units (hand-computed)', () => {
		const lim = (tol: string, target = '24 N·m') => {
			const r = parse(doc(block('torque t', `target: ${target}\ntolerance: ${tol}\nfasteners: 1`)));
			const c = r.procedure?.steps[0].checkpoints[0];
			return c?.kind === 'torque' ? c.limits : r.errors[0]?.message;
		};
		expect(lim('±10 %')).toEqual({ min: '21.6', max: '26.4', unit: 'N_m' });
		expect(lim('+/- 2 N·m')).toEqual({ min: '22', max: '26', unit: 'N_m' });
		expect(lim('22–26 N·m')).toEqual({ min: '22', max: '26', unit: 'N_m' });
		expect(lim('±1 lbf·ft', '18 ft-lb')).toEqual({ min: '17', max: '19', unit: 'lbf_ft' });
		// 1 lbf·ft = 1.3558179483314004 N·m exactly (NIST SP 811 B.8 factors): 24 ± 1.3558… N·m
		expect(lim('±1 lbf·ft')).toEqual({ min: '22.6441820516685996', max: '25.3558179483314004', unit: 'N_m' });
	});
});

describe('content hash', () => {
	const lf = doc('Line one\nLine two\n');
	it.each([
		['CRLF', lf.replace(/\n/g, '\r\n')],
		['CR', lf.replace(/\n/g, '\r')],
		['BOM', '\uFEFF' + lf],
		['extra trailing newlines', lf + '\n\n\n'],
		['no final newline', lf.replace(/\n+$/, '')],
		['NFD accents', lf.replace('Line one', 'Lìne one'.normalize('NFD'))]
	])('is stable across %s', (name, variant) => {
		const base = name === 'NFD accents' ? lf.replace('Line one', 'Lìne one') : lf;
		expect(contentHash(variant)).toBe(contentHash(base));
	});

	it('changes when trailing spaces change (they are a Markdown line break)', () => {
		expect(contentHash(lf.replace('Line one', 'Line one  '))).not.toBe(contentHash(lf));
	});

	it('is a 64-character hex sha256 of the normalised text', () => {
		// sha256("abc\n") = edeaaff3f1774ad2888673770c6d64097e391bc362d7d6fb34982ddf0efd18cb (coreutils sha256sum, from memory)
		expect(contentHash('abc')).toBe('edeaaff3f1774ad2888673770c6d64097e391bc362d7d6fb34982ddf0efd18cb');
		expect(normaliseSource('a\r\nb\r\n\r\n')).toBe('a\nb\n');
	});

	it('the parsed model carries the hash, the same for CRLF and LF', () => {
		expect(parse(lf).procedure!.hash).toBe(parse(lf.replace(/\n/g, '\r\n')).procedure!.hash);
	});
});
