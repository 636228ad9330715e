import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parse } from '../procedure/parse';
import type { Checkpoint } from '../procedure/model';
import { entrySchemas, evaluate, type EvaluationContext } from './evaluate';
import { evaluateOnTablet } from './evaluate-on-tablet';

// The tablet's judgement must be the server's for every entry the runner can build: the same judging functions,
// only without the parse. Checked over every checkpoint of the shop's demo procedures with generated entries.
const sources = import.meta.glob<string>('../../../procedures/ktx7-*.md', {
	query: '?raw',
	import: 'default',
	eager: true
});
const checkpoints: Checkpoint[] = Object.values(sources).flatMap(
	(text) => parse(text).procedure?.steps.flatMap((s) => s.checkpoints) ?? []
);
const byId = Object.fromEntries(checkpoints.map((c) => [c.id, c]));

const decimal = fc.oneof(
	fc.integer({ min: -2_000, max: 40_000 }).map((n) => (n / 1000).toFixed(3)),
	fc.integer({ min: 0, max: 400 }).map(String),
	fc.constantFrom('', '1e3', '-0', 'abc', '22.0209', '0.0005')
);
const maybe = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: undefined });
const unit = maybe(fc.constantFrom('mm', 'um', 'in', 'N_m', 'lbf_ft', 'L', 'qt_us', 'kPa', 'bar'));
const tempUnit = maybe(fc.constantFrom('degC' as const, 'degF' as const));
const photos = maybe(fc.array(fc.constantFrom('p1.jpg', 'p2.jpg', 'photo-3'), { maxLength: 3 }));
const ident = maybe(fc.oneof(fc.constantFrom('', 'KL-0000', 'LOT 24-118'), fc.string({ maxLength: 12 })));

function entryFor(cp: Checkpoint): fc.Arbitrary<unknown> {
	switch (cp.kind) {
		case 'torque': {
			const fastener = fc.record({ reached: maybe(fc.boolean()), value: maybe(decimal) }, { requiredKeys: [] });
			const pass = fc.dictionary(fc.constantFrom(...cp.fasteners, 'X9'), fastener, { maxKeys: cp.fasteners.length });
			const angle = fc.dictionary(
				fc.constantFrom(...cp.fasteners),
				fc.record({ turned: maybe(fc.boolean()), value: maybe(decimal) }, { requiredKeys: [] })
			);
			return fc.record(
				{ unit, passes: maybe(fc.array(pass, { maxLength: 4 })), angles: maybe(fc.array(angle, { maxLength: 2 })) },
				{ requiredKeys: [] }
			);
		}
		case 'measure':
			return fc.record(
				{
					unit,
					stage: maybe(fc.constantFrom('before', 'after', 'final')),
					readings: maybe(fc.array(decimal, { maxLength: 6 })),
					partTemperature: maybe(decimal),
					temperatureUnit: tempUnit,
					zeroed: maybe(fc.boolean()),
					resolution: maybe(fc.constantFrom('0.001', '0.01', '0.0001', '0'))
				},
				{ requiredKeys: [] }
			);
		case 'clearance':
			return fc.record({ unit, reading: maybe(decimal) }, { requiredKeys: [] });
		case 'confirm':
			return fc.record({ confirmed: maybe(fc.boolean()), photos }, { requiredKeys: [] });
		case 'choice':
			return fc.record(
				{ option: maybe(fc.constantFrom(...cp.options.map((o) => o.key), 'nope')) },
				{ requiredKeys: [] }
			);
		case 'part':
			return fc.record(
				{ number: ident, serial: ident, lot: ident, quantity: maybe(fc.integer({ min: 0, max: 6 })) },
				{ requiredKeys: [] }
			);
		case 'fluid':
			return fc.record(
				{
					specConfirmed: maybe(fc.boolean()),
					lot: ident,
					amount: maybe(decimal),
					unit,
					level: maybe(fc.constantFrom('ok' as const, 'low' as const, 'high' as const)),
					temperature: maybe(decimal),
					temperatureUnit: tempUnit
				},
				{ requiredKeys: [] }
			);
		case 'test':
			return fc.record(
				{ result: maybe(fc.constantFrom('pass' as const, 'fail' as const)), reading: maybe(decimal), unit },
				{ requiredKeys: [] }
			);
		case 'text':
			return fc.record({ text: maybe(fc.string({ maxLength: 40 })) }, { requiredKeys: [] });
		case 'photo':
			return fc.record({ photos }, { requiredKeys: [] });
	}
}

const tool = fc.option(
	fc.record({
		kind: fc.constantFrom('preset' as const, 'indicating' as const),
		max: fc.constantFrom('40', '60', '100'),
		unit: fc.constantFrom('N_m', 'lbf_ft'),
		accuracyPercent: fc.constantFrom('2', '4', '6'),
		setTo: maybe(fc.array(decimal, { maxLength: 3 }))
	}),
	{ nil: undefined }
);

describe('evaluateOnTablet', () => {
	it('the demo procedures give checkpoints of every kind to check against', () => {
		expect(new Set(checkpoints.map((c) => c.kind)).size).toBe(Object.keys(entrySchemas).length);
	});

	for (const cp of checkpoints) {
		it(`judges ${cp.kind} ${cp.id} exactly as the server's evaluate does`, () => {
			// Clearance and choice read the run's other entries: generate a measure entry for each measure checkpoint.
			const others = checkpoints.filter((c) => c.kind === 'measure');
			fc.assert(
				fc.property(
					entryFor(cp),
					fc.tuple(...others.map(entryFor)),
					tool,
					fc.constantFrom<string[][]>([], ['adaptation']),
					(entry, otherEntries, t, qualifications) => {
						fc.pre(entrySchemas[cp.kind].safeParse(entry).success);
						const context: EvaluationContext = {
							tool: t,
							checkpoints: byId,
							entries: Object.fromEntries(others.map((c, i) => [c.id, otherEntries[i]])),
							qualifications
						};
						expect(evaluateOnTablet(cp, entry, context)).toEqual(evaluate(cp, entry, context));
					}
				),
				{ numRuns: 60, seed: 8785 }
			);
		});
	}

	it('says nothing is recorded yet, as evaluate does', () => {
		expect(evaluateOnTablet(checkpoints[0], undefined)).toEqual(evaluate(checkpoints[0], undefined));
	});
});
