/**
 * Exports of the run record (issue 8): the PDF — whose chain head is anchored and whose sha256 is appended to the
 * run's own chain as an `export` record — and the CSV of its readings. Routes check the role (`EXPORT_ROLES`).
 */
import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import Papa from 'papaparse';
import type { RoleName } from '../../accounts/schema';
import type { JsonValue } from '../../ledger/jcs';
import type { ILedgerRecord } from '../db/entities';
import * as ledger from '../repositories/ledger';
import * as runs from '../repositories/runs';
import { renderRunRecordPdf, type PdfFinding, type RunRecordPdfInput } from '../pdf/run-record-pdf';
import { recordAnchor, runRecord, type RunRecordView } from './audit.service';
import { appendServerRecord } from './submit.service';

/**
 * Who may export a run record: quality leads (and only they read the run record page). Leads supervise the bench
 * and see runs there, but an export anchors the chain and is the document a customer or a warranty claim gets.
 */
export const EXPORT_ROLES: RoleName[] = ['quality'];

export type ExportResult<T> = { ok: true; value: T } | { ok: false; status: 404 | 409; message: string };

export interface PdfExport {
	bytes: Buffer;
	sha256: string;
	filename: string;
	/** The `export` ledger record holding the sha256. */
	recordId: string;
	head: string;
	count: number;
}

type Body = Record<string, unknown>;
const bodyOf = (r: ILedgerRecord): Body =>
	r.body && typeof r.body === 'object' && !Array.isArray(r.body) ? (r.body as Body) : {};
const str = (v: unknown): string | null => (typeof v === 'string' && v.trim() ? v : null);
const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

/** Findings with their dispositions, verifications and supersessions, read from the raw records. */
function summaries(view: RunRecordView, rows: ILedgerRecord[]) {
	const seqOf = new Map(rows.map((r) => [r.id, r.seq]));
	const bySeq = new Map(view.records.map((r) => [r.seq, r]));
	const decided = new Map<string, string>();
	const superseded: RunRecordPdfInput['superseded'] = [];
	for (const r of rows) {
		const b = bodyOf(r);
		if (r.kind === 'disposition') {
			const findingId = str(b.findingId);
			const what = str(b.decision) ?? str(b.disposition) ?? 'decided';
			const why = str(b.justification) ?? str(b.text);
			const signer = bySeq.get(r.seq)?.signer ?? 'unknown';
			if (findingId)
				decided.set(findingId, `${what.replaceAll('_', ' ')}${why ? ` — ${why}` : ''} (${signer}, #${r.seq})`);
		}
		if (r.kind === 'supersession') {
			const old = str(b.supersedes) ?? str(b.recordId) ?? str(b.supersededId);
			const oldSeq = old ? seqOf.get(old) : undefined;
			if (oldSeq) superseded.push({ seq: oldSeq, bySeq: r.seq, why: str(b.reason) ?? str(b.text) ?? '' });
		}
	}
	const findings: PdfFinding[] = rows
		.filter((r) => r.kind === 'finding')
		.map((r) => {
			const b = bodyOf(r);
			return {
				seq: r.seq,
				text: str(b.text) ?? '',
				raisedBy:
					b.raisedBy === 'server' ? 'the server (evaluation overruled)' : (bySeq.get(r.seq)?.signer ?? 'unknown'),
				disposition: decided.get(r.id) ?? null
			};
		});
	const verifications = view.records
		.filter((r) => r.kind === 'verification')
		.map((r) => ({ step: r.step ?? 'A step', verifier: `${r.signer} (${r.role})`, seq: r.seq }));
	return { findings, verifications, superseded };
}

/**
 * Renders the run record as a PDF under the run's row lock, so nothing can be appended between the head it prints
 * and the records it shows: the head is anchored (`release_pdf` once the run is released, else `manual`) and an
 * `export` record with the PDF's sha256 is appended after it, all in one transaction.
 */
export async function exportRunPdf(
	em: EntityManager,
	actor: { id: string; name: string },
	runId: string,
	now: Date = new Date()
): Promise<ExportResult<PdfExport>> {
	return em.transactional(async (tx): Promise<ExportResult<PdfExport>> => {
		const run = await runs.lockForAppend(tx, runId);
		if (!run) return { ok: false, status: 404, message: 'No such run.' };
		const released = (run.state as string) === 'released';
		const anchor = await recordAnchor(tx, runId, released ? 'release_pdf' : 'manual', now);
		if (!anchor.ok) return anchor;
		const view = (await runRecord(tx, runId))!;
		const rows = await ledger.listForRun(tx, runId);
		const bytes = await renderRunRecordPdf({
			view,
			head: anchor.value.head,
			count: anchor.value.count,
			released,
			generatedAt: now,
			generatedBy: actor.name,
			...summaries(view, rows)
		});
		const digest = sha256(bytes);
		const body: JsonValue = {
			format: 'pdf',
			sha256: digest,
			bytes: bytes.byteLength,
			head: anchor.value.head,
			count: anchor.value.count,
			by: { id: actor.id, name: actor.name },
			serverTime: now.toISOString()
		};
		const stored = appendServerRecord(tx, run, 'export', body, now);
		await tx.flush();
		return {
			ok: true,
			value: {
				bytes,
				sha256: digest,
				filename: `run-record-${view.jobNumber}-${anchor.value.count}.pdf`,
				recordId: stored.id,
				head: anchor.value.head,
				count: anchor.value.count
			}
		};
	});
}

/** The CSV columns, one line per judged reading (a record without readings gets one line). */
const CSV_FIELDS = [
	'seq',
	'kind',
	'step',
	'signer',
	'role',
	'device_time',
	'server_time',
	'signed_offline',
	'checkpoint',
	'checkpoint_status',
	'as_entered',
	'reading',
	'value',
	'limits',
	'reading_status',
	'reason',
	'text',
	'record_hash'
] as const;

/**
 * The run record's readings as CSV. papaparse's `escapeFormulae` prefixes a value starting with `=`, `+`, `-`, `@`,
 * tab or carriage return with `'`, so a spreadsheet shows it as text instead of running it (CSV injection).
 */
export async function exportRunCsv(
	em: EntityManager,
	runId: string
): Promise<ExportResult<{ csv: string; filename: string }>> {
	const view = await runRecord(em, runId);
	if (!view) return { ok: false, status: 404, message: 'No such run.' };
	const lines: Record<(typeof CSV_FIELDS)[number], string | number>[] = [];
	for (const r of view.records) {
		const base = {
			seq: r.seq,
			kind: r.kind,
			step: r.step ?? '',
			signer: r.signer,
			role: r.role,
			device_time: r.deviceTime ?? '',
			server_time: r.serverTime,
			signed_offline: r.signedOffline ? 'yes' : 'no',
			text: r.text ?? '',
			record_hash: r.hash
		};
		const empty = { checkpoint: '', checkpoint_status: '', as_entered: '', reading: '', value: '', limits: '' };
		const blank = { ...empty, reading_status: '', reason: '' };
		if (!r.entries.length) lines.push({ ...base, ...blank });
		for (const e of r.entries) {
			const entry = { checkpoint: e.checkpointId, checkpoint_status: e.status, as_entered: e.entered.join(' ') };
			if (!e.readings.length) lines.push({ ...base, ...blank, ...entry, reason: e.reasons.join(' ') });
			for (const x of e.readings)
				lines.push({
					...base,
					...entry,
					reading: x.label,
					value: x.value,
					limits: x.limits,
					reading_status: x.status,
					reason: x.reason ?? ''
				});
		}
	}
	const csv = Papa.unparse(lines, { columns: [...CSV_FIELDS], escapeFormulae: true, newline: '\r\n' });
	return { ok: true, value: { csv, filename: `run-record-${view.jobNumber}.csv` } };
}
