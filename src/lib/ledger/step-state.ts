/**
 * What a run's records say about each step once corrections and not-applicable approvals are taken into account.
 * Pure: the runner (browser) and the submit service (server) read the same chain the same way.
 *
 * - A `supersession` record voids the record it names (`body.supersedes`); the voided record stays in the chain and
 *   is shown struck through, but no longer counts.
 * - A verification counts only while the sign-off it names is current: correcting a verified sign-off means the
 *   step is signed and verified again.
 * - A current `na_approval` makes its step count as done.
 * - Signed on two tablets (offline issue, `run-conflicts.ts`): a sign-off whose server-written `body.conflictsWith`
 *   names an earlier sign-off of the same step supersedes it; both stay in the chain and both are shown. The earlier
 *   one stops counting only while the later one counts (a correction of the later one brings the earlier back).
 */

/** The fields of a record this module reads (a stored row, a view of one, or a record being appended). */
export interface StepRecord {
	id: string;
	kind: string;
	body: unknown;
}

/** The reasons a technician taps when a step does not apply (`other` needs words). Invented shop wording. */
export const NA_REASONS = {
	not_fitted: 'The part is not fitted on this unit',
	variant: "The step is for another variant than this unit's",
	done_on_other_run: 'Done on another run of this job',
	customer_declined: 'The customer declined this work',
	other: 'Another reason (say which)'
} as const;
export type NaReason = keyof typeof NA_REASONS;

/** Kinds a correction may supersede. */
export const CORRECTABLE_KINDS = ['signoff', 'attempt', 'na_approval'] as const;

const field = (r: StepRecord, key: string): unknown =>
	r.body !== null && typeof r.body === 'object' ? (r.body as Record<string, unknown>)[key] : undefined;

/** The step a record is about, or -1. */
export function stepIndexOf(r: StepRecord): number {
	const v = field(r, 'stepIndex');
	return typeof v === 'number' ? v : -1;
}

/** Superseded record id → the supersession that voided it (its id and reason). */
export function supersededBy(records: readonly StepRecord[]): Map<string, { id: string; reason: string }> {
	const out = new Map<string, { id: string; reason: string }>();
	for (const r of records) {
		if (r.kind !== 'supersession') continue;
		const target = field(r, 'supersedes');
		if (typeof target === 'string' && !out.has(target))
			out.set(target, { id: r.id, reason: String(field(r, 'reason') ?? '') });
	}
	return out;
}

/** A sign-off that lost a clash: the later sign-off of the same step (signed on another tablet or by someone else). */
export interface Conflict {
	/** The later sign-off, which names this one in `body.conflictsWith`. */
	id: string;
	/** False when the later sign-off was itself corrected: the earlier one then counts again. */
	current: boolean;
}

/**
 * Earlier sign-off id → the later sign-off that names it in `conflictsWith`. A later sign-off that was corrected
 * (superseded by a `supersession`) no longer voids the one it named; one that lost a still later clash still does.
 */
export function conflictsOf(records: readonly StepRecord[]): Map<string, Conflict> {
	const corrected = supersededBy(records);
	const out = new Map<string, Conflict>();
	for (const r of records) {
		const target = r.kind === 'signoff' ? field(r, 'conflictsWith') : undefined;
		if (typeof target === 'string' && !out.has(target)) out.set(target, { id: r.id, current: !corrected.has(r.id) });
	}
	return out;
}

/**
 * The records that still count: superseded ones dropped (by a correction, or by a later sign-off on another tablet),
 * verifications of a superseded (or missing) sign-off dropped. Order is kept.
 */
export function currentRecords<T extends StepRecord>(records: readonly T[]): T[] {
	const voided = new Set(supersededBy(records).keys());
	for (const [id, c] of conflictsOf(records)) if (c.current) voided.add(id);
	const live = records.filter((r) => !voided.has(r.id));
	const signoffs = new Set(live.filter((r) => r.kind === 'signoff').map((r) => r.id));
	return live.filter((r) => r.kind !== 'verification' || signoffs.has(String(field(r, 'signoffId'))));
}

export interface StepState {
	/** Step index → id of its latest current sign-off. */
	signoffOf: Map<number, string>;
	/** Steps whose current sign-off is verified. */
	verified: Set<number>;
	/** Step index → the current N/A approval's id. */
	notApplicable: Map<number, string>;
	/** Superseded record id → the supersession. */
	superseded: Map<string, { id: string; reason: string }>;
	/** Sign-off id → the later sign-off of the same step that clashed with it (see {@link conflictsOf}). */
	conflicts: Map<string, Conflict>;
}

/** Each step's sign-off, verification and N/A as the chain stands now. */
export function stepState(records: readonly StepRecord[]): StepState {
	const current = currentRecords(records);
	const signoffOf = new Map<number, string>();
	const verified = new Set<number>();
	const notApplicable = new Map<number, string>();
	for (const r of current) {
		const i = stepIndexOf(r);
		if (r.kind === 'signoff') signoffOf.set(i, r.id);
		else if (r.kind === 'na_approval') notApplicable.set(i, r.id);
	}
	for (const r of current)
		if (r.kind === 'verification' && signoffOf.get(stepIndexOf(r)) === field(r, 'signoffId'))
			verified.add(stepIndexOf(r));
	return { signoffOf, verified, notApplicable, superseded: supersededBy(records), conflicts: conflictsOf(records) };
}

/**
 * The chain reduced to what completion counts, in the `{ kind, stepIndex }` form the submit service's completion
 * rule reads: current sign-offs and verifications, and each not-applicable step as signed and verified.
 */
export function completionRecords(records: readonly StepRecord[]): { kind: string; stepIndex: number }[] {
	const out: { kind: string; stepIndex: number }[] = [];
	for (const r of currentRecords(records)) {
		const stepIndex = stepIndexOf(r);
		if (r.kind === 'na_approval') out.push({ kind: 'signoff', stepIndex }, { kind: 'verification', stepIndex });
		else if (r.kind === 'signoff' || r.kind === 'verification') out.push({ kind: r.kind, stepIndex });
	}
	return out;
}
