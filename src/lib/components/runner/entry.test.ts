import { describe, expect, it } from 'vitest';
import { evaluate } from '$lib/checks/evaluate';
import { parse } from '$lib/procedure/parse';
import { slotsFor, toEntry, unitSymbol } from './entry';

// Invented test procedure: a 22 mm H7 bore = 22.000–22.021 mm (ISO 286-2: IT7 for 18–30 mm is 21 µm, H → EI = 0).
const src = `---
title: Entry test
family: Invented family
purpose: Test.
---

## Bore

\`\`\`measure bore-1
feature: bore
nominal: 22 mm
tolerance: H7
angles: [0°, 90°]
zero-check: yes
\`\`\`
`;
const cp = parse(src).procedure!.steps[0].checkpoints[0];

describe('runner entries', () => {
	it('asks one keypad reading per position, in mm', () => {
		expect(slotsFor(cp).map((s) => s.label)).toEqual(['Reading 1 (0°)', 'Reading 2 (90°)']);
		expect(unitSymbol(cp)).toBe('mm');
	});
	it('builds the measure entry the engine judges: 22.030 fails, 22.010 passes once zeroed', () => {
		const high = toEntry(cp, { values: { r0: '22.030', r1: '22.010' }, zeroed: true });
		expect(evaluate(cp, high).status).toBe('fail');
		const good = toEntry(cp, { values: { r0: '22.010', r1: '22.011' }, zeroed: true });
		expect(good).toEqual({ readings: ['22.010', '22.011'], zeroed: true });
		expect(evaluate(cp, good).status).toBe('pass');
		expect(evaluate(cp, toEntry(cp, { values: { r0: '22.010' }, zeroed: true })).status).toBe('incomplete');
	});
});
