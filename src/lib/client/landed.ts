/**
 * After an online record the runner used to fetch the whole runner view again (`GET /api/runs/:id/runner`: every
 * step's HTML, tools, lots, people). When the server's answer already says what changed, the record is laid into
 * the view here instead, and kept in the tablet's copy so an offline reload shows it too. Anything the server may
 * have added on its own — a finding it opened, a clash with another tablet's sign-off, a run that is now complete
 * or resumed, lots used, photos — still takes the full refresh (`landedView` answers null).
 */
import type { RecordAnswer } from '$lib/components/runner/submit';
import { stepState } from '$lib/ledger/step-state';
import { saveRun, type OfflineStore } from './offline-store';
import { photoIdsOf } from './offline-sign';
import type { OpenedRun } from './runner-source';

type View = OpenedRun['view'];
type ViewRecord = View['run']['records'][number];

/** Checkpoint kinds whose sign-off changes nothing on the server beyond the record itself. */
const PLAIN_KINDS = new Set(['confirm', 'choice', 'text', 'measure', 'clearance', 'torque']);

export interface LandedRecord {
	id: string;
	kind: string;
	body: Record<string, unknown>;
	signer: { id: string; role: string; name: string };
	deviceId: string;
	signedAt: number;
	answer: RecordAnswer;
}

/**
 * The view with the record laid in, or null when only the server's own view can tell the new state. Its hash and
 * server time are the server's answer (never the tablet's clock); an answer without them takes the refresh.
 */
export function landedView(view: View, rec: LandedRecord): View | null {
	const { answer } = rec;
	if (answer.status !== 'accepted' || typeof answer.seq !== 'number' || answer.findings?.length) return null;
	if (!answer.hash || !answer.serverTime) return null;
	if (rec.kind !== 'signoff' && rec.kind !== 'attempt') return null;
	if (view.run.state !== 'in_progress' || photoIdsOf(rec.body).length || 'tabletPhotos' in rec.body) return null;
	const stepIndex = rec.body.stepIndex;
	const step = typeof stepIndex === 'number' ? view.model.steps[stepIndex] : undefined;
	if (!step || step.critical || !step.checkpoints.every((c) => PLAIN_KINDS.has(c.kind))) return null;
	const before = stepState(view.run.records);
	// A second sign-off of the step may clash with another tablet's (the server then writes conflictsWith).
	if (
		rec.kind === 'signoff' &&
		(before.signoffOf.has(stepIndex as number) || before.notApplicable.has(stepIndex as number))
	)
		return null;
	const entries = Array.isArray(rec.body.entries)
		? (rec.body.entries as { checkpointId?: string; claimed?: string }[])
		: [];
	const record: ViewRecord = {
		id: rec.id,
		seq: answer.seq,
		kind: rec.kind,
		body: {
			...rec.body,
			signer: { id: rec.signer.id, name: rec.signer.name },
			// The server judged as the tablet did (else it would have opened a finding); its own words come on refresh.
			evaluation: entries.map((e) => ({ checkpointId: e.checkpointId ?? '', status: e.claimed ?? 'pass' }))
		} as ViewRecord['body'],
		prevHash: view.run.headHash,
		hash: answer.hash,
		signerId: rec.signer.id,
		signerRole: rec.signer.role,
		deviceId: rec.deviceId,
		deviceTime: new Date(rec.signedAt).toISOString(),
		serverTime: answer.serverTime,
		engineVersion: '',
		signedOffline: false
	};
	const records = [...view.run.records, record];
	const after = stepState(records);
	const open = view.model.steps.filter((s) => !after.signoffOf.has(s.index) && !after.notApplicable.has(s.index));
	// The run completes with its last step: the server moves it to awaiting review, which only its view tells.
	if (open.length === 0) return null;
	return { ...view, run: { ...view.run, records, recordCount: view.run.recordCount + 1, headHash: answer.hash } };
}

/** Lays the record into the open run and the tablet's copy; null when the runner must refresh from the server. */
export async function landLocally(
	store: OfflineStore,
	opened: OpenedRun,
	rec: LandedRecord
): Promise<OpenedRun | null> {
	const view = landedView(opened.view, rec);
	if (!view) return null;
	const stored = { ...opened.stored, view };
	await saveRun(store, stored);
	return { ...opened, view, stored };
}
