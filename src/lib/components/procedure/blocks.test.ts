import { describe, expect, it } from 'vitest';
import { parse } from '$lib/procedure';
import { blockSchema, DEFAULTS, INSERT_KINDS, toBlock, type BlockData, type InsertKind } from './blocks';

const wrap = (block: string) => `---\ntitle: T\nfamily: F\npurpose: P\n---\n\n## Step\n\n${block}\n`;

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
		id: 'bore-1',
		nominal: '22',
		angles: '0°, 90°',
		depths: 'top, bottom',
		resolution: '0.001 mm'
	},
	confirm: { ...DEFAULTS.confirm, id: 'magnet-1', prompt: 'Magnet faces the sensor pocket.', photo: 'required' },
	part: { ...DEFAULTS.part, id: 'new-sensor', number: 'KL-4410-##@', serial: 'PS########', lot: 'required' }
};

describe('insert forms', () => {
	it.each(INSERT_KINDS)('%s: a valid form writes a block the engine parses clean', (kind) => {
		const data = filled[kind];
		expect(blockSchema(kind).safeParse(data).success).toBe(true);
		const r = parse(wrap(toBlock(kind, data as never)));
		expect(r.errors).toEqual([]);
		expect(r.warnings).toEqual([]);
		expect(r.procedure!.steps[0].checkpoints[0]).toMatchObject({ kind, id: data.id });
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
});
