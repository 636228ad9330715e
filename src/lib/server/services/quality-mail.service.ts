/**
 * Mail to the quality leads: "a run awaits review", sent after the record that completed the run has committed.
 * Sending is fire-and-forget: a failure is logged and never fails or delays the record. Scripts that submit records
 * (the demo seed) wait for it with `mailSettled()` from mail.ts before closing their ORM.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { IJob, IProcedure, IProcedureVersion, IUser } from '../db/entities';
import { env } from '../env';
import { mailConfigured, sendInBackground, sendMail } from '../mail';
import * as runs from '../repositories/runs';
import * as users from '../repositories/users';

/** Active people holding the quality role, who get review and digest mail. */
export async function qualityRecipients(em: EntityManager): Promise<IUser[]> {
	return (await users.listAll(em)).filter((u) => u.active && u.roles.includes('quality'));
}

/** A link into the app: absolute when ORIGIN is set, else the path alone. */
export const appLink = (path: string) => `${env().ORIGIN ?? ''}${path}`;

/** Mails every quality lead that the run awaits review. Resolves when done; never rejects. */
export async function sendAwaitingReview(em: EntityManager, runId: string): Promise<number> {
	// No transport means no app process (the seed scripts, tests without a fake server): there is no one to tell.
	if (!mailConfigured()) return 0;
	try {
		const run = await runs.findById(em, runId);
		if (!run) return 0;
		await em.populate(run, ['procedureVersion.procedure']);
		const job = run.job as unknown as IJob;
		const version = run.procedureVersion as unknown as IProcedureVersion;
		const procedure = (version.procedure as unknown as IProcedure).title;
		const to = await qualityRecipients(em);
		for (const person of to)
			await sendMail({
				to: person.email,
				subject: `Run awaiting review: ${job.jobNumber} · ${procedure}`,
				text: [
					`Hello ${person.name},`,
					'',
					`Every step of ${procedure} (version ${version.number}) on job ${job.jobNumber} (${job.unitModel}) is signed.`,
					`The run now awaits your review: ${appLink(`/quality/runs/${run.id}`)}`,
					'',
					'Benchstamp'
				].join('\n')
			});
		return to.length;
	} catch (e) {
		console.warn(`awaiting-review mail for run ${runId} not sent: ${e instanceof Error ? e.message : String(e)}`);
		return 0;
	}
}

/**
 * {@link sendAwaitingReview} without waiting: the submit path calls this after its transaction committed. Tracked,
 * so `mailSettled()` waits for it.
 */
export function notifyAwaitingReview(em: EntityManager, runId: string): void {
	sendInBackground(sendAwaitingReview(em, runId));
}
