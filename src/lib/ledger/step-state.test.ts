import { describe, expect, it } from 'vitest';
import { completionRecords, conflictsOf, currentRecords, stepState, type StepRecord } from './step-state';

// Shop rules of this product (common practice, no published source): a correction voids what it names; a
// verification counts only for the sign-off it names while that sign-off is current; an N/A step counts as done.
const r = (id: string, kind: string, body: Record<string, unknown>): StepRecord => ({ id, kind, body });
const s1 = r('s1', 'signoff', { stepIndex: 0 });
const v1 = r('v1', 'verification', { stepIndex: 0, signoffId: 's1' });
const c1 = r('c1', 'supersession', { stepIndex: 0, supersedes: 's1', reason: 'wrong bore' });
const s2 = r('s2', 'signoff', { stepIndex: 0 });
const na = r('n1', 'na_approval', { stepIndex: 1 });

describe('step state from a chain', () => {
	it.each([
		{ name: 'signed and verified', chain: [s1, v1], signed: [[0, 's1']], verified: [0] },
		{ name: 'signed, verified, then corrected', chain: [s1, v1, c1], signed: [], verified: [] },
		{
			name: 'corrected and signed again, not yet re-verified',
			chain: [s1, v1, c1, s2],
			signed: [[0, 's2']],
			verified: []
		}
	])('$name', ({ chain, signed, verified }) => {
		const st = stepState(chain);
		expect([...st.signoffOf]).toEqual(signed);
		expect([...st.verified]).toEqual(verified);
	});

	it('keeps superseded records in the chain but not in the current view', () => {
		expect(currentRecords([s1, v1, c1, s2]).map((x) => x.id)).toEqual(['c1', 's2']);
		expect(stepState([s1, c1]).superseded.get('s1')).toEqual({ id: 'c1', reason: 'wrong bore' });
	});

	it('counts an N/A step as signed and verified, and a corrected N/A not at all', () => {
		expect(completionRecords([s1, v1, na])).toEqual([
			{ kind: 'signoff', stepIndex: 0 },
			{ kind: 'verification', stepIndex: 0 },
			{ kind: 'signoff', stepIndex: 1 },
			{ kind: 'verification', stepIndex: 1 }
		]);
		const undo = r('c2', 'supersession', { stepIndex: 1, supersedes: 'n1', reason: 'does apply' });
		expect(completionRecords([na, undo])).toEqual([]);
		expect(stepState([na]).notApplicable.get(1)).toBe('n1');
	});

	describe('signed on two tablets (conflictsWith, written by the server)', () => {
		// Shop rule of this product (common practice, no published source): the later sign-off supersedes the
		// earlier one, both stay readable, and a verification of the earlier one no longer counts.
		const a = r('a', 'signoff', { stepIndex: 0 });
		const va = r('va', 'verification', { stepIndex: 0, signoffId: 'a' });
		const b = r('b', 'signoff', { stepIndex: 0, conflictsWith: 'a' });

		it('makes the later sign-off current and voids the earlier one and its verification', () => {
			const st = stepState([a, va, b]);
			expect([...st.signoffOf]).toEqual([[0, 'b']]);
			expect([...st.verified]).toEqual([]);
			expect([...st.conflicts]).toEqual([['a', { id: 'b', current: true }]]);
			expect(currentRecords([a, va, b]).map((x) => x.id)).toEqual(['b']);
			expect(completionRecords([a, va, b])).toEqual([{ kind: 'signoff', stepIndex: 0 }]);
		});

		it('brings the earlier sign-off back when the later one is corrected', () => {
			const undo = r('u', 'supersession', { stepIndex: 0, supersedes: 'b', reason: 'wrong unit' });
			const st = stepState([a, va, b, undo]);
			expect(st.conflicts.get('a')).toEqual({ id: 'b', current: false });
			expect([...st.signoffOf]).toEqual([[0, 'a']]);
			expect([...st.verified]).toEqual([0]);
		});

		it('follows a clash of three: only the latest counts; correcting it revives the middle one only', () => {
			const c = r('c', 'signoff', { stepIndex: 0, conflictsWith: 'b' });
			expect(currentRecords([a, b, c]).map((x) => x.id)).toEqual(['c']);
			const undo = r('u', 'supersession', { stepIndex: 0, supersedes: 'c', reason: 'wrong unit' });
			expect(currentRecords([a, b, c, undo]).map((x) => x.id)).toEqual(['b', 'u']);
			expect(conflictsOf([a, b, c, undo]).get('b')).toEqual({ id: 'c', current: false });
		});

		it('ignores conflictsWith on anything but a sign-off', () => {
			const odd = r('f', 'finding', { stepIndex: 0, conflictsWith: 'a' });
			expect(conflictsOf([a, odd]).size).toBe(0);
			expect(stepState([a, odd]).signoffOf.get(0)).toBe('a');
		});
	});
});
