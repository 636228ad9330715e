/**
 * The daily digest to quality (issue 8): every run's chain head, mailed outside the database so an alter-and-rehash
 * is caught later. A `daily_digest` anchor is recorded for each run whose head changed since its last digest anchor
 * (a run whose chain does not verify is reported, not anchored). Run by the app's timer and by `npm run digest`.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { LedgerAnchor, Run } from '../db/entities';
import { sendMail } from '../mail';
import * as adminLog from '../repositories/admin-log';
import { recordAnchor, verifyRun } from './audit.service';
import { appLink, qualityRecipients } from './quality-mail.service';

export interface DigestLine {
	runId: string;
	head: string | null;
	count: number;
	changed: boolean;
	problem: string | null;
}

export interface DigestResult {
	day: string;
	runs: number;
	anchored: number;
	problems: number;
	recipients: number;
	lines: DigestLine[];
}

/** The digest's subject names the UTC day, which is how the timer tells whether today's digest went. */
export const digestSubject = (day: string) => `Benchstamp daily digest ${day}: chain heads`;
export const DIGEST_ACTION = 'quality.digest_sent';

/** Anchors changed heads, mails the digest to every quality lead, and notes it in the admin log. */
export async function runDailyDigest(em: EntityManager, now: Date = new Date()): Promise<DigestResult> {
	const day = now.toISOString().slice(0, 10);
	const list = await em.find(Run, { recordCount: { $gt: 0 } }, { orderBy: { createdAt: 'asc' }, populate: ['job'] });
	const lines: DigestLine[] = [];
	const jobOf = new Map(list.map((r) => [r.id, (r.job as unknown as { jobNumber: string }).jobNumber]));
	for (const run of list) {
		const fork = em.fork({ clear: true });
		const last = await fork.findOne(
			LedgerAnchor,
			{ run: run.id, recordedIn: 'daily_digest' },
			{ orderBy: { recordedAt: 'desc', count: 'desc' } }
		);
		const v = await verifyRun(fork, run.id);
		if (!v || !v.ok) {
			lines.push({ runId: run.id, head: null, count: 0, changed: false, problem: v ? v.message : 'no such run' });
			continue;
		}
		const changed = !last || last.head !== v.head || last.count !== v.count;
		if (changed) {
			const a = await recordAnchor(fork, run.id, 'daily_digest', now);
			if (!a.ok) {
				lines.push({ runId: run.id, head: null, count: 0, changed: false, problem: a.message });
				continue;
			}
		}
		lines.push({ runId: run.id, head: v.head, count: v.count, changed, problem: null });
	}
	const to = await qualityRecipients(em);
	const problems = lines.filter((l) => l.problem);
	const text = [
		`Chain heads of ${lines.length} runs on ${day} (UTC). Keep this mail: verify compares the ledger with these heads.`,
		'',
		...(problems.length
			? ['DOES NOT VERIFY:', ...problems.map((l) => `  ${jobOf.get(l.runId)} run ${l.runId}: ${l.problem}`), '']
			: []),
		...lines
			.filter((l) => !l.problem)
			.map((l) => `${l.changed ? '*' : ' '} ${jobOf.get(l.runId)} run ${l.runId}  ${l.count} records  head ${l.head}`),
		'',
		'* new since the last digest.',
		`Verify every run: ${appLink('/quality')}`
	].join('\n');
	for (const person of to) await sendMail({ to: person.email, subject: digestSubject(day), text });
	adminLog.append(em, null, {
		action: DIGEST_ACTION,
		subjectType: 'ledger',
		subjectId: day,
		detail: { runs: lines.length, anchored: lines.filter((l) => l.changed).length, problems: problems.length }
	});
	await em.flush();
	return {
		day,
		runs: lines.length,
		anchored: lines.filter((l) => l.changed).length,
		problems: problems.length,
		recipients: to.length,
		lines
	};
}

/** Whether today's (UTC) digest was already sent, from the admin log. */
export async function digestSentOn(em: EntityManager, day: string): Promise<boolean> {
	return (await adminLog.forSubject(em, DIGEST_ACTION, 'ledger', day)).length > 0;
}
