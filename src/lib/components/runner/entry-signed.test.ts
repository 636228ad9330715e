import { describe, expect, it } from 'vitest';
import { evaluate } from '$lib/checks/evaluate';
import { isPristine, signedCheckpoints, signedEvaluation, stateFromSigned, toEntry } from './entry';
import { clips, sensor, torque, wrench } from './entry-fixtures';

// Preset torque 8 N·m ±10 % in two passes (pass 1 = 4 N·m), a 2–12 N·m ±4 % click wrench and a part fitted four
// times: see entry-fixtures.ts.
const presetEntry = {
	passes: [
		{ C1: { reached: true }, C2: { reached: true } },
		{ C1: { reached: true }, C2: { reached: true } }
	]
};
const signoff = (id: string, extra: Record<string, unknown> = {}) => ({
	id,
	kind: 'signoff',
	body: {
		stepIndex: 0,
		tools: ['tw'],
		entries: [{ checkpointId: 'cover', entry: presetEntry, setTo: ['4', '8'], claimed: 'pass' }],
		...extra
	}
});

describe('part quantity', () => {
	it('sends the counted quantity only where the procedure asks for more than one', () => {
		expect(toEntry(clips, { values: {}, part: { number: 'KL-9901-12', quantity: 4 } })).toEqual({
			number: 'KL-9901-12',
			quantity: 4
		});
		expect(toEntry(sensor, { values: {}, part: { number: 'KL-4410-03C', serial: 'PS26110451', quantity: 3 } })).toEqual(
			{
				number: 'KL-4410-03C',
				serial: 'PS26110451'
			}
		);
	});
	it.each([
		// FORMAT.md §part: quantity defaults to 1; evaluatePart fails a count other than the one asked for.
		[undefined, 'incomplete'],
		[3, 'fail'],
		[4, 'pass'],
		[5, 'fail']
	] as const)('quantity %s of 4 is judged %s by the engine', (quantity, status) => {
		const entry = toEntry(clips, {
			values: {},
			part: { number: 'KL-9901-12', ...(quantity !== undefined && { quantity }) }
		});
		expect(evaluate(clips, entry).status).toBe(status);
	});
});

describe('signed entries after a reload', () => {
	it('reads the latest current sign-off with its settings, tools and the stored evaluation', () => {
		const stored = evaluate(torque, presetEntry, { tool: { ...wrench, setTo: ['4', '8'] } });
		const got = signedCheckpoints([
			signoff('a'),
			signoff('b', { evaluation: [{ ...stored, claimed: 'pass' }] }),
			{ id: 'n', kind: 'note', body: null }
		]);
		expect(got.cover).toMatchObject({ recordId: 'b', setTo: ['4', '8'], tools: ['tw'] });
		expect(got.cover.evaluation?.status).toBe('pass');
	});
	it('drops a sign-off a correction superseded', () => {
		const got = signedCheckpoints([
			signoff('a'),
			{ id: 's', kind: 'supersession', body: { supersedes: 'a', reason: 'Wrong unit.' } }
		]);
		expect(got.cover).toBeUndefined();
	});
	it('judges a signed preset entry as signed, not "not finished", with the wrench and settings it names', () => {
		const signed = signedCheckpoints([signoff('a')]).cover;
		// Without the tool context (what the reloaded page had): the engine asks for the wrench setting.
		const bare = evaluate(torque, signed.entry, {});
		expect(bare.status).toBe('incomplete');
		expect(signedEvaluation(torque, signed, { tw: wrench }, bare).status).toBe('pass');
		// A stored server evaluation wins over re-judging.
		const stored = { ...bare, status: 'fail' as const };
		expect(signedEvaluation(torque, { ...signed, evaluation: stored }, { tw: wrench }, bare).status).toBe('fail');
	});
	it('shows the signed entry again on the tablet: settings and reached taps', () => {
		const s = stateFromSigned(torque, signedCheckpoints([signoff('a')]).cover);
		expect(s.values).toEqual({ set0: '4', set1: '8' });
		expect(s.reached).toEqual({ 'p0/C1': true, 'p0/C2': true, 'p1/C1': true, 'p1/C2': true });
		expect(toEntry(torque, s, 'preset')).toEqual(presetEntry);
		const part = stateFromSigned(clips, { recordId: 'x', entry: { number: 'KL-9901-12', quantity: 4 }, tools: [] });
		expect(toEntry(clips, part)).toEqual({ number: 'KL-9901-12', quantity: 4 });
	});
	it('is pristine only until something is entered', () => {
		expect(isPristine({ values: {} })).toBe(true);
		expect(isPristine({ values: { r0: '1' } })).toBe(false);
		expect(isPristine({ values: {}, reached: {} })).toBe(false);
	});
});
