import { describe, expect, it } from 'vitest';
import { evaluate } from '$lib/checks/evaluate';
import { parse } from '$lib/procedure/parse';
import { setToOf, slotsFor, toEntry, toolContextFor, torqueMode, unitSymbol } from './entry';
import { clearance, photo, sensor as part, torque, wrench } from './entry-fixtures';

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

// Preset torque 8 N·m ±10 % in two passes (pass 1 = 4 N·m) with a 2–12 N·m click wrench: see entry-fixtures.ts.

describe('entries for preset torque, part, clearance and photo', () => {
	it('records a preset wrench as its settings (setTo) and "reached" taps; the engine passes it', () => {
		expect(torqueMode(torque, undefined)).toBe('preset');
		expect(slotsFor(torque, 'preset').map((s) => s.key)).toEqual(['set0', 'set1']);
		const s = {
			values: { set0: '4', set1: '8' },
			reached: { 'p0/C1': true, 'p0/C2': true, 'p1/C1': true, 'p1/C2': true }
		};
		expect(setToOf(torque, s, 'preset')).toEqual(['4', '8']);
		const ctx = toolContextFor(torque, s, wrench);
		expect(ctx.tool?.setTo).toEqual(['4', '8']);
		expect(evaluate(torque, toEntry(torque, s, 'preset'), ctx).status).toBe('pass');
		// Set to 5 N·m for pass 1 (which needs 4 N·m): a fail.
		const wrong = { ...s, values: { set0: '5', set1: '8' } };
		expect(evaluate(torque, toEntry(torque, wrong, 'preset'), toolContextFor(torque, wrong, wrench)).status).toBe(
			'fail'
		);
	});
	it('sends the part fields the checkpoint records, trimmed', () => {
		expect(toEntry(part, { values: {}, part: { number: ' KL-4410-03C ', serial: 'PS26110451', lot: 'x' } })).toEqual({
			number: 'KL-4410-03C',
			serial: 'PS26110451'
		});
	});
	it('asks one direct clearance reading for a fit alone, and photos by id', () => {
		expect(slotsFor(clearance).map((s) => s.key)).toEqual(['clearance']);
		expect(unitSymbol(clearance)).toBe('mm');
		// 8 H7/g6 (ISO 286-2): hole 8.000–8.015, shaft 7.986–7.995 → clearance 0.005–0.029 mm.
		expect(evaluate(clearance, toEntry(clearance, { values: { clearance: '0.010' } })).status).toBe('pass');
		expect(evaluate(clearance, toEntry(clearance, { values: { clearance: '0.040' } })).status).toBe('fail');
		expect(toEntry(photo, { values: {}, photos: [{ id: 'a1', url: '/images/a1' }] })).toEqual({ photos: ['a1'] });
	});
});
