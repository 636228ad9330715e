import { describe, expect, it } from 'vitest';
import { parse } from '$lib/procedure';
import { blockSchema, DEFAULTS, INSERT_KINDS, toBlock, type BlockData, type InsertKind } from './blocks';

/** The checkpoints that the clearance and choice forms below refer to (all invented, for the tests). */
const OTHERS = [
	'```measure bore-1\nfeature: bore\nnominal: 18 mm\ntolerance: H7\n```',
	'```measure piston-1\nfeature: shaft\nnominal: 18 mm\ntolerance: g6\n```',
	'```part new-sensor\nnumber: KL-4410-##@\n```',
	'```part donor-sensor\nnumber: KL-4410-##@\n```',
	'```photo donor-photo\nprompt: Photograph the donor label.\n```'
].join('\n\n');

const wrap = (block: string, others = '') =>
	`---\ntitle: T\nfamily: F\npurpose: P\n---\n\n## Step\n\n${others ? others + '\n\n' : ''}${block}\n`;
const context = () => wrap('', OTHERS);

const filled: { [K in InsertKind]: BlockData<K> } = {
	torque: {
		...DEFAULTS.torque,
		id: 'cover-screws',
		target: '8',
		fasteners: 'C1, C2, C3',
		passes: '50 %, 100 %',
		tool: 'preset'
	},
	measure: {
		...DEFAULTS.measure,
		id: 'bore-2',
		nominal: '22',
		angles: '0°, 90°',
		depths: 'top, bottom',
		resolution: '0.001 mm'
	},
	confirm: { ...DEFAULTS.confirm, id: 'magnet-1', prompt: 'Magnet faces the sensor pocket.', photo: 'required' },
	part: { ...DEFAULTS.part, id: 'new-sensor-2', number: 'KL-4410-##@', serial: 'PS########', lot: 'required' },
	clearance: { ...DEFAULTS.clearance, id: 'piston-1-clearance', bore: 'bore-1', shaft: 'piston-1' },
	choice: {
		...DEFAULTS.choice,
		id: 'sensor-disposition',
		prompt: 'What was fitted in place of the old sensor?',
		options: 'Reused, Replaced new, Replaced from donor',
		then: 'Replaced new: new-sensor; replaced-from-donor: donor-sensor, donor-photo'
	},
	fluid: {
		...DEFAULTS.fluid,
		id: 'fill',
		spec: 'KLW DCF-7 (invented dual-clutch fluid)',
		lot: 'FL-####-@@',
		amountMin: '5.0',
		amountMax: '5.4',
		level: 'fluid just runs from the check plug, engine idling',
		tempMin: '35',
		tempMax: '45'
	},
	test: {
		...DEFAULTS.test,
		id: 'seal-test',
		prompt: 'Hold the test pressure for two minutes: no drop.',
		value: '1100 to 1300 kPa',
		qualification: 'transmission control adaptation'
	},
	text: { ...DEFAULTS.text, id: 'bore-findings', prompt: 'Describe the condition of the bores.', minLength: '10' },
	photo: { ...DEFAULTS.photo, id: 'vb-as-found', prompt: 'Photograph the valve body as found.', min: '2' }
};

const issues = <K extends InsertKind>(kind: K, data: BlockData<K>) => {
	const r = blockSchema(kind, context).safeParse(data);
	return r.success ? [] : r.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
};

describe('insert forms', () => {
	it.each(INSERT_KINDS)('%s: a valid form writes a block the engine parses clean', (kind) => {
		const data = filled[kind];
		expect(issues(kind, data as never)).toEqual([]);
		const r = parse(wrap(toBlock(kind, data as never), OTHERS));
		expect(r.errors).toEqual([]);
		expect(r.warnings).toEqual([]);
		expect(r.procedure!.steps[0].checkpoints.at(-1)).toMatchObject({ kind, id: data.id });
	});

	it('computes the bore limits from the ISO class the form wrote (ISO 286-2: 22 H7 = +0.021/0 mm)', () => {
		const r = parse(wrap(toBlock('measure', filled.measure)));
		const cp = r.procedure!.steps[0].checkpoints[0];
		expect(cp.kind === 'measure' && cp.stages[0].limits).toEqual({ min: '22', max: '22.021', unit: 'mm' });
	});

	it('puts the engine’s complaint beside the field that caused it', () => {
		const bad = blockSchema('measure').safeParse({ ...filled.measure, tolerance: 'H77' });
		expect(bad.success).toBe(false);
		expect(bad.error!.issues[0]).toMatchObject({ path: ['tolerance'], message: expect.stringMatching(/H77/) });
		const order = blockSchema('torque').safeParse({ ...filled.torque, id: 'Cover Screws' });
		expect(order.error!.issues[0].path).toEqual(['id']);
		const target = blockSchema('torque').safeParse({ ...filled.torque, target: '8,5' });
		expect(target.error!.issues[0]).toMatchObject({
			path: ['target'],
			message: expect.stringMatching(/decimal point/)
		});
	});

	it('writes a clearance from a fit designation and computes its limits (ISO 286-2: 18 H7/g6 = +0.006 to +0.035 mm)', () => {
		const data = { ...filled.clearance, from: 'fit' as const, fit: '18 H7/g6' };
		expect(issues('clearance', data)).toEqual([]);
		const block = toBlock('clearance', data);
		expect(block).toBe('```clearance piston-1-clearance\nfit: 18 H7/g6\n```');
		const cp = parse(wrap(block)).procedure!.steps[0].checkpoints[0];
		// 18 mm lies in 10–18: H7 = 0/+0.018, g6 = −0.006/−0.017 → clearance 0.006 … 0.035 mm.
		expect(cp.kind === 'clearance' && cp.limits).toEqual({ min: '0.006', max: '0.035', unit: 'mm' });
	});

	it('writes the choice options as key: label lines and the follow-ups under their option keys', () => {
		const cp = parse(wrap(toBlock('choice', filled.choice), OTHERS)).procedure!.steps[0].checkpoints.at(-1)!;
		expect(cp.kind === 'choice' && cp.options).toEqual([
			{ key: 'reused', label: 'Reused', then: [] },
			{ key: 'replaced-new', label: 'Replaced new', then: ['new-sensor'] },
			{ key: 'replaced-from-donor', label: 'Replaced from donor', then: ['donor-sensor', 'donor-photo'] }
		]);
	});

	it('quotes free text that YAML would misread (a colon and a space, a leading #)', () => {
		const data = { ...filled.fluid, spec: '#7: invented', level: 'check plug: fluid just runs' };
		expect(issues('fluid', data)).toEqual([]);
		const cp = parse(wrap(toBlock('fluid', data))).procedure!.steps[0].checkpoints[0];
		expect(cp).toMatchObject({ spec: '#7: invented', level: { description: 'check plug: fluid just runs' } });
	});

	it.each<[InsertKind, Record<string, string>, string, RegExp]>([
		['clearance', { bore: 'bore-9' }, 'bore', /"bore: bore-9" names a checkpoint that does not exist/],
		['clearance', { shaft: 'new-sensor' }, 'shaft', /is a part checkpoint/],
		['clearance', { bore: 'piston-1', shaft: 'bore-1' }, 'bore', /measures a shaft/],
		['clearance', { shaft: '' }, 'shaft', /shaft/],
		['clearance', { from: 'fit', fit: '18 H7/q6' }, 'fit', /not a fit|q6/],
		['clearance', { from: 'reading', limits: '0.070 to 0.020 mm' }, 'limits', /minimum/],
		['choice', { options: 'Reused' }, 'options', /at least two/],
		['choice', { options: 'Reused, reused' }, 'options', /twice/],
		['choice', { then: 'Replaced old: new-sensor' }, 'then', /"replaced-old", which is not one of/],
		['choice', { then: 'Replaced new: no-such-part' }, 'then', /no checkpoint with that id/],
		['choice', { then: 'Replaced new new-sensor' }, 'then', /colon/],
		['fluid', { amountMin: '5.4', amountMax: '5.0' }, 'amountMax', /minimum 5.4 L is above the maximum 5 L/],
		['fluid', { amountMin: '5,0' }, 'amountMin', /decimal point/],
		['fluid', { amountMax: '' }, 'amountMax', /largest amount/],
		['fluid', { amountMin: '', amountMax: '', level: '' }, 'amountMin', /amount .* or describe the level/],
		['fluid', { level: '', amountMin: '5.0' }, 'tempMin', /belongs to a level check/],
		['fluid', { lot: 'FL-#{99}' }, 'lot', /not a usable lot pattern/],
		['fluid', { spec: '' }, 'spec', /specification/],
		['fluid', { id: 'new-sensor' }, 'id', /already used/],
		['test', { value: '1300 to 1100 kPa' }, 'value', /minimum/],
		['test', { value: '1100 to 1300 bananas' }, 'value', /bananas/],
		['test', { prompt: '' }, 'prompt', /tested/],
		['text', { minLength: '5000' }, 'minLength', /0 to 2000/],
		['photo', { min: '0' }, 'min', /1 to 50/]
	])('%s: %j comes back beside "%s"', (kind, change, field, message) => {
		const found = issues(kind, { ...filled[kind], ...change } as never);
		expect(found.length).toBeGreaterThan(0);
		expect(found[0]).toEqual({ path: field, message: expect.stringMatching(message) });
	});
});
