import { describe, expect, it } from 'vitest';
import { toolStatus, type CalibrationFacts } from './tool-status';

// Shop rules for a usable tool (common practice, no source): calibrated, not past its due date, and not found out
// of tolerance since the last calibration that left it in tolerance.
const at = (iso: string) => new Date(`${iso}T12:00:00Z`);
const cal = (performedOn: string, nextDueOn: string, asFound: 'in' | 'out' = 'in', asLeft: 'in' | 'out' = 'in') =>
	({ kind: 'calibration', performedOn, nextDueOn, asFound, asLeft, recordedAt: at(performedOn) }) as CalibrationFacts;
const check = (performedOn: string, asFound: 'in' | 'out') =>
	({
		kind: 'check',
		performedOn,
		nextDueOn: null,
		asFound,
		asLeft: null,
		recordedAt: at(performedOn)
	}) as CalibrationFacts;

describe('toolStatus', () => {
	it.each([
		['never calibrated', [], '2026-06-01', 'never_calibrated'],
		['in date', [cal('2026-01-10', '2027-01-10')], '2026-06-01', 'usable'],
		['due today is still usable', [cal('2026-01-10', '2026-06-01')], '2026-06-01', 'usable'],
		['one day past due', [cal('2026-01-10', '2026-05-31')], '2026-06-01', 'past_due'],
		[
			'failed check after calibration',
			[cal('2026-01-10', '2027-01-10'), check('2026-03-01', 'out')],
			'2026-06-01',
			'out_of_tolerance'
		],
		[
			'failed check, then a passing check: still not recalibrated',
			[cal('2026-01-10', '2027-01-10'), check('2026-03-01', 'out'), check('2026-03-02', 'in')],
			'2026-06-01',
			'out_of_tolerance'
		],
		[
			'failed check, then recalibrated',
			[cal('2026-01-10', '2027-01-10'), check('2026-03-01', 'out'), cal('2026-03-05', '2027-03-05', 'out', 'in')],
			'2026-06-01',
			'usable'
		],
		['found out, adjusted back in', [cal('2026-01-10', '2027-01-10', 'out', 'in')], '2026-06-01', 'usable'],
		['calibration left it out', [cal('2026-01-10', '2027-01-10', 'out', 'out')], '2026-06-01', 'out_of_tolerance'],
		[
			'failed check dated after the day asked about',
			[cal('2026-01-10', '2027-01-10'), check('2026-07-01', 'out')],
			'2026-06-01',
			'usable'
		]
	])('%s', (_name, records, on, want) => {
		const s = toolStatus(records, on);
		expect(s.usable ? 'usable' : s.reason).toBe(want);
	});

	it('flags a due date within 30 days as due soon', () => {
		expect(toolStatus([cal('2026-01-10', '2026-06-20')], '2026-06-01')).toMatchObject({ usable: true, dueSoon: true });
		expect(toolStatus([cal('2026-01-10', '2026-08-20')], '2026-06-01')).toMatchObject({ usable: true, dueSoon: false });
	});

	it('treats a retired tool as blocked', () => {
		expect(toolStatus([cal('2026-01-10', '2027-01-10')], '2026-06-01', false)).toMatchObject({
			usable: false,
			reason: 'retired'
		});
	});
});
