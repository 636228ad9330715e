import { addDays } from './dates';
import type { CalibrationKind, ToleranceResult } from './tool-kinds';

export interface CalibrationFacts {
	kind: CalibrationKind;
	performedOn: string;
	asFound: ToleranceResult;
	asLeft: ToleranceResult | null;
	nextDueOn: string | null;
	/** Tie-break for two records on the same day: the later entry wins. */
	recordedAt: Date;
}

export type ToolStatus =
	| { usable: true; dueOn: string; dueSoon: boolean }
	| { usable: false; reason: 'never_calibrated' | 'past_due' | 'out_of_tolerance' | 'retired'; dueOn: string | null };

export const DUE_SOON_DAYS = 30;

export const TOOL_STATUS_TEXT: Record<Exclude<ToolStatus, { usable: true }>['reason'], string> = {
	never_calibrated: 'Blocked: no calibration on record',
	past_due: 'Blocked: calibration past due',
	out_of_tolerance: 'Blocked: found out of tolerance, not recalibrated since',
	retired: 'Retired'
};

const newestFirst = (a: CalibrationFacts, b: CalibrationFacts) =>
	b.performedOn.localeCompare(a.performedOn) || b.recordedAt.getTime() - a.recordedAt.getTime();

/**
 * Whether a tool may be used on `on` (ISO date). The reference is the newest calibration that left the tool in
 * tolerance. Blocked when any record after it found the tool out of tolerance (a failed in-house check, or a
 * calibration that could not bring it back: "not recalibrated since"), when there is no such calibration, or when
 * its next-due date is before `on` (the due date itself is still usable). Records dated after `on` are ignored.
 */
export function toolStatus(records: readonly CalibrationFacts[], on: string, active = true): ToolStatus {
	const sorted = records.filter((r) => r.performedOn <= on).sort(newestFirst);
	const goodAt = sorted.findIndex((r) => r.kind === 'calibration' && r.asLeft === 'in');
	const good = goodAt >= 0 ? sorted[goodAt] : undefined;
	const dueOn = good?.nextDueOn ?? null;
	if (!active) return { usable: false, reason: 'retired', dueOn };
	const since = goodAt >= 0 ? sorted.slice(0, goodAt) : sorted;
	if (since.some((r) => r.asFound === 'out' || r.asLeft === 'out'))
		return { usable: false, reason: 'out_of_tolerance', dueOn };
	if (!good || !dueOn) return { usable: false, reason: 'never_calibrated', dueOn };
	if (dueOn < on) return { usable: false, reason: 'past_due', dueOn };
	return { usable: true, dueOn, dueSoon: dueOn <= addDays(on, DUE_SOON_DAYS) };
}
