/**
 * The customer's rebuild record (issue 8): what was done to their unit, the parts fitted with lot and serial, the
 * findings with photos and the usual cautions — on a public page behind an expiring link that a quality lead mails
 * to the job's customer. Only the link token's sha256 is stored; the customer's address is read from the job when
 * the mail goes and is never written to the ledger (its note says "record sent", the link id and expiry only).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import type { RoleName } from '../../accounts/schema';
import type { JsonValue } from '../../ledger/jcs';
import type { Procedure } from '../../procedure/model';
import {
	CustomerRecordLink,
	type IJob,
	type ILedgerRecord,
	type IProcedure,
	type IProcedureVersion
} from '../db/entities';
import { sendMail } from '../mail';
import * as adminLog from '../repositories/admin-log';
import * as ledger from '../repositories/ledger';
import * as runs from '../repositories/runs';
import { hashLinkToken, newLinkToken } from '../tokens';
import { appendServerRecord } from './submit.service';

/** Who may send a customer record. */
export const CUSTOMER_RECORD_ROLES: RoleName[] = ['quality'];
export const DEFAULT_LINK_DAYS = 30;

/** The send form: how many days the link stays open. */
export const customerRecordSchema = z.object({
	days: z
		.number({ error: 'Give the number of days the link stays open.' })
		.int('Whole days only.')
		.min(1, 'At least 1 day.')
		.max(90, 'At most 90 days.')
		.default(DEFAULT_LINK_DAYS)
});

/** Shown on every customer record: the work can hurt someone or spoil the unit if these are skipped. */
export const CUSTOMER_CAUTIONS = [
	'Warning: transmission fluid from a unit that has just run can scald. Let the unit cool before any check.',
	'Caution: after a pressure sensor is replaced or the hydraulics are modified, the control unit may need to be recalibrated or adapted by a qualified person before the unit shifts correctly.',
	"Follow the manufacturer's service information for fitting, fluid and checks; this record does not replace it."
];

export type SendResult =
	{ ok: true; value: { linkId: string; expiresAt: string } } | { ok: false; status: 404 | 409 | 502; message: string };

/**
 * Makes a link valid `days` days, notes it (without personal data) in the admin log and the run's chain, and once
 * that has committed mails it to the job's customer. `origin` is the app's address the customer will open.
 */
export async function sendCustomerRecord(
	em: EntityManager,
	actor: { id: string; name: string },
	runId: string,
	opts: { days: number; origin: string; now?: Date }
): Promise<SendResult> {
	const now = opts.now ?? new Date();
	const { token, hash } = newLinkToken();
	const expiresAt = new Date(now.getTime() + opts.days * 86_400_000);
	const made = await em.transactional(async (tx): Promise<SendResult | { ok: true; job: IJob; linkId: string }> => {
		const run = await runs.lockForAppend(tx, runId);
		if (!run) return { ok: false, status: 404, message: 'No such run.' };
		await tx.populate(run, ['job']);
		const job = run.job as unknown as IJob;
		if (!job.customerEmail)
			return {
				ok: false,
				status: 409,
				message: `Job ${job.jobNumber} has no customer e-mail address: add one on the job first.`
			};
		if (!run.recordCount) return { ok: false, status: 409, message: 'Nothing is recorded on this run yet.' };
		const link = tx.create(CustomerRecordLink, {
			id: crypto.randomUUID(),
			run,
			tokenHash: hash,
			expiresAt,
			createdById: actor.id
		});
		const note: JsonValue = {
			format: 'customer_record',
			note: 'Rebuild record sent to the customer.',
			linkId: link.id,
			expiresAt: expiresAt.toISOString(),
			by: { id: actor.id, name: actor.name },
			serverTime: now.toISOString()
		};
		appendServerRecord(tx, run, 'export', note, now);
		adminLog.append(tx, actor, {
			action: 'customer_record.sent',
			subjectType: 'run',
			subjectId: runId,
			detail: { linkId: link.id, expiresAt: expiresAt.toISOString() }
		});
		await tx.flush();
		return { ok: true, job, linkId: link.id };
	});
	if (!made.ok) return made;
	if (!('job' in made)) return made;
	const { job } = made;
	try {
		await sendMail({
			to: job.customerEmail,
			subject: `Your rebuild record · ${job.jobNumber} · Kestrel Lane Transmission Works`,
			text: [
				`Hello ${job.customerName},`,
				'',
				`The rebuild record of your ${job.unitModel} (serial ${job.unitSerial}, job ${job.jobNumber}) is ready:`,
				`${opts.origin}/record/${token}`,
				'',
				`The link works until ${expiresAt.toISOString().slice(0, 10)}. It shows the work done, the parts fitted and what we found.`,
				'',
				CUSTOMER_CAUTIONS.join('\n'),
				'',
				'Kestrel Lane Transmission Works'
			].join('\n')
		});
	} catch (e) {
		return {
			ok: false,
			status: 502,
			message: `The link was made but the mail could not be sent (${e instanceof Error ? e.message : String(e)}). Try again later.`
		};
	}
	return { ok: true, value: { linkId: made.linkId, expiresAt: expiresAt.toISOString() } };
}

export interface CustomerRecord {
	jobNumber: string;
	unit: string;
	receivedOn: string;
	procedure: string;
	state: string;
	work: { step: string; on: string }[];
	parts: { number: string; serial: string | null; lot: string | null; quantity: number | null }[];
	fluids: { lot: string | null; amount: string | null }[];
	findings: { text: string; on: string; disposition: string | null; photos: string[] }[];
	cautions: string[];
	expiresAt: string;
}

export type RecordLookup = { status: 'ok'; record: CustomerRecord } | { status: 'expired' } | { status: 'unknown' };

type Body = Record<string, unknown>;
const bodyOf = (r: ILedgerRecord): Body =>
	r.body && typeof r.body === 'object' && !Array.isArray(r.body) ? (r.body as Body) : {};
const str = (v: unknown): string | null => (typeof v === 'string' && v.trim() ? v : null);
const day = (d: Date) => d.toISOString().slice(0, 10);

/** The link's run when the token is known and not expired. */
async function openLink(em: EntityManager, token: string, now: Date) {
	if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) return { status: 'unknown' as const };
	const link = await em.findOne(CustomerRecordLink, { tokenHash: hashLinkToken(token) }, { populate: ['run'] });
	if (!link) return { status: 'unknown' as const };
	if (link.expiresAt.getTime() <= now.getTime()) return { status: 'expired' as const };
	return { status: 'ok' as const, link };
}

function entriesOf(b: Body): { checkpointId: string; entry: Body }[] {
	if (!Array.isArray(b.entries)) return [];
	return (b.entries as Body[]).map((e) => ({
		checkpointId: str(e?.checkpointId) ?? '',
		entry: (e?.entry ?? {}) as Body
	}));
}

/** The customer's view of the run behind `token`, or why there is none. */
export async function customerRecordByToken(
	em: EntityManager,
	token: string,
	now: Date = new Date()
): Promise<RecordLookup> {
	const opened = await openLink(em, token, now);
	if (opened.status !== 'ok') return opened;
	const runId = opened.link.run.id;
	const run = (await runs.findById(em, runId))!;
	await em.populate(run, ['procedureVersion.procedure']);
	const job = run.job as unknown as IJob;
	const version = run.procedureVersion as unknown as IProcedureVersion;
	const model = version.model as unknown as Procedure;
	const kindOf = new Map(model.steps.flatMap((s) => s.checkpoints.map((c) => [c.id, c.kind] as const)));
	const rows = await ledger.listForRun(em, runId);
	const decided = new Map<string, string>();
	for (const r of rows.filter((x) => x.kind === 'disposition')) {
		const b = bodyOf(r);
		const id = str(b.findingId);
		if (id) decided.set(id, (str(b.decision) ?? str(b.disposition) ?? 'decided').replaceAll('_', ' '));
	}
	const record: CustomerRecord = {
		jobNumber: job.jobNumber,
		unit: `${job.unitModel} · serial ${job.unitSerial}`,
		receivedOn: String(job.receivedOn).slice(0, 10),
		procedure: (version.procedure as unknown as IProcedure).title,
		state: run.state.replaceAll('_', ' '),
		work: [],
		parts: [],
		fluids: [],
		findings: [],
		cautions: CUSTOMER_CAUTIONS,
		expiresAt: opened.link.expiresAt.toISOString()
	};
	for (const r of rows) {
		const b = bodyOf(r);
		if (r.kind === 'signoff') {
			const step = model.steps.find((s) => s.index === b.stepIndex);
			record.work.push({ step: step ? step.title : 'A step', on: day(r.serverTime) });
			for (const { checkpointId, entry } of entriesOf(b)) {
				const kind = kindOf.get(checkpointId);
				if (kind === 'part')
					record.parts.push({
						number: str(entry.number) ?? '—',
						serial: str(entry.serial),
						lot: str(entry.lot),
						quantity: typeof entry.quantity === 'number' ? entry.quantity : null
					});
				if (kind === 'fluid')
					record.fluids.push({
						lot: str(entry.lot),
						amount: str(entry.amount) ? `${str(entry.amount)} ${str(entry.unit) ?? ''}`.trim() : null
					});
			}
		}
		if (r.kind === 'finding')
			record.findings.push({
				text: str(b.text) ?? '',
				on: day(r.serverTime),
				disposition: decided.get(r.id) ?? null,
				photos: Array.isArray(b.photos) ? b.photos.filter((p): p is string => typeof p === 'string') : []
			});
	}
	return { status: 'ok', record };
}

/** Whether `imageId` is a photo of a finding on the run behind `token` (and the link is open). */
export async function customerMayViewPhoto(
	em: EntityManager,
	token: string,
	imageId: string,
	now: Date = new Date()
): Promise<boolean> {
	const opened = await openLink(em, token, now);
	if (opened.status !== 'ok') return false;
	const rows = await ledger.listForRun(em, opened.link.run.id);
	return rows.some((r) => {
		const photos = bodyOf(r).photos;
		return r.kind === 'finding' && Array.isArray(photos) && photos.includes(imageId);
	});
}
