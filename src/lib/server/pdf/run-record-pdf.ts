/**
 * The run record as a PDF (pdfkit, fonts embedded, no network): every record in chain order with its signer and
 * role, device vs server time, the signed-offline flag, tools and their calibration state at signing, each entry's
 * readings against the limits; then findings with their dispositions, verifications, superseded records — and the
 * chain head (hash + record count) the PDF was made from, on the first and the last page.
 */
import PDFDocument from 'pdfkit';
import type { RunRecordRow, RunRecordView } from '../services/audit.service';
import { pdfFonts } from './fonts';

export interface PdfFinding {
	seq: number;
	text: string;
	raisedBy: string;
	/** "rework — justification" or null while open. */
	disposition: string | null;
}

export interface RunRecordPdfInput {
	view: RunRecordView;
	head: string;
	count: number;
	released: boolean;
	generatedAt: Date;
	generatedBy: string;
	findings: PdfFinding[];
	verifications: { step: string; verifier: string; seq: number }[];
	superseded: { seq: number; bySeq: number; why: string }[];
}

const MARGIN = 48;
const utc = (iso: string | null) => (iso ? `${iso.slice(0, 19).replace('T', ' ')} UTC` : '—');

/** Renders the PDF and resolves with its bytes. */
export function renderRunRecordPdf(input: RunRecordPdfInput): Promise<Buffer> {
	const { view } = input;
	const fonts = pdfFonts();
	const doc = new PDFDocument({
		size: 'A4',
		margin: MARGIN,
		bufferPages: true,
		info: {
			Title: `Run record ${view.jobNumber}`,
			Author: 'Benchstamp',
			Subject: `${view.procedure} v${view.version}`,
			CreationDate: input.generatedAt
		}
	});
	doc.registerFont('body', fonts.regular);
	doc.registerFont('bold', fonts.bold);
	const chunks: Buffer[] = [];
	doc.on('data', (c: Buffer) => chunks.push(c));
	const done = new Promise<Buffer>((resolve, reject) => {
		doc.on('end', () => resolve(Buffer.concat(chunks)));
		doc.on('error', reject);
	});

	const heading = (text: string, size = 13) => {
		doc.moveDown(0.6).font('bold').fontSize(size).text(text).font('body').fontSize(9.5);
	};
	const line = (text: string, opts: PDFKit.Mixins.TextOptions = {}) => doc.font('body').fontSize(9.5).text(text, opts);
	const chainHead = () => {
		doc.font('bold').fontSize(10).text(`Chain head after ${input.count} records`);
		doc.font('Courier').fontSize(9).text(input.head);
		doc.font('body').fontSize(9.5);
	};

	doc.font('bold').fontSize(18).text(`Run record · ${view.jobNumber}`);
	line(`${view.procedure} · version ${view.version}`);
	line(`${view.unit} · technician ${view.technician}`);
	line(
		`State: ${view.state.replace('_', ' ')}${input.released ? ' (released)' : ''} · generated ${utc(input.generatedAt.toISOString())} by ${input.generatedBy}`
	);
	doc.moveDown(0.5);
	chainHead();

	heading(`Records (${view.records.length})`);
	for (const row of view.records) recordBlock(doc, row);

	heading(`Findings (${input.findings.length})`);
	if (!input.findings.length) line('No findings were recorded.');
	for (const f of input.findings)
		line(`#${f.seq} ${f.text} — raised by ${f.raisedBy}. Disposition: ${f.disposition ?? 'open (not yet decided)'}`);

	heading('Verifications');
	if (!input.verifications.length) line('No critical step was verified on this run.');
	for (const v of input.verifications) line(`${v.step}: verified by ${v.verifier} (record #${v.seq})`);

	heading('Superseded records');
	if (!input.superseded.length) line('No record was superseded.');
	for (const s of input.superseded)
		line(`Record #${s.seq} superseded by record #${s.bySeq}${s.why ? `: ${s.why}` : ''}`);

	doc.moveDown(1);
	chainHead();
	line(
		'Anyone can check this record: a quality lead runs “Verify chain” in Benchstamp, which recomputes every record’s hash and compares the head with the one printed here.'
	);

	const range = doc.bufferedPageRange();
	for (let i = range.start; i < range.start + range.count; i++) {
		doc.switchToPage(i);
		doc
			.font('body')
			.fontSize(8)
			.text(
				`${view.jobNumber} · page ${i + 1} of ${range.count} · head ${input.head.slice(0, 16)}… (${input.count} records)`,
				MARGIN,
				doc.page.height - MARGIN + 12,
				{ lineBreak: false }
			);
	}
	doc.end();
	return done;
}

function recordBlock(doc: PDFKit.PDFDocument, row: RunRecordRow): void {
	if (doc.y > doc.page.height - 140) doc.addPage();
	doc.moveDown(0.4);
	doc
		.font('bold')
		.fontSize(10)
		.text(`#${row.seq} ${row.kind}${row.step ? ` · ${row.step}` : ''}`);
	doc.font('body').fontSize(9.5);
	doc.text(`Signed by ${row.signer} (${row.role})${row.signedOffline ? ' · signed offline' : ''}`);
	doc.text(`Device time ${utc(row.deviceTime)} · server time ${utc(row.serverTime)}`);
	if (row.text) doc.text(row.text);
	for (const e of row.entries) {
		doc.text(
			`${e.checkpointId}: ${e.status}${e.claimed && e.claimed !== e.status ? ` (tablet showed ${e.claimed})` : ''}`
		);
		if (e.entered.length) doc.text(`As entered: ${e.entered.join(' · ')}`, { indent: 12 });
		for (const r of e.readings)
			doc.text(
				`${r.label || 'reading'}: ${r.value} · limits ${r.limits} · ${r.status}${r.reason ? ` — ${r.reason}` : ''}`,
				{
					indent: 12
				}
			);
		for (const reason of e.reasons) doc.text(reason, { indent: 12 });
	}
	for (const t of row.tools)
		doc.text(
			`Tool ${t.assetTag} (${t.kind}) · calibrated ${t.lastCalibratedOn ?? 'never'} · ${t.usable ? `usable, due ${t.dueOn ?? '—'}` : `not usable${t.reason ? `: ${t.reason}` : ''}`}`,
			{ indent: 12 }
		);
	doc.font('Courier').fontSize(7.5).text(`hash ${row.hash}`).font('body').fontSize(9.5);
}
