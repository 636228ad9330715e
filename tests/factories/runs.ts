import type { EntityManager, MikroORM } from '@mikro-orm/postgresql';
import type { IUser } from '../../src/lib/server/db/entities';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import * as procedures from '../../src/lib/server/repositories/procedures';
import * as qualifications from '../../src/lib/server/repositories/qualifications';
import { openJob } from '../../src/lib/server/services/jobs.service';
import { publishInitial } from '../../src/lib/server/services/procedures.service';
import { startRun } from '../../src/lib/server/services/runs.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { jobInput } from './registers';
import { makePerson } from './people';

export const FAMILY = 'KTX-7 (invented seven-speed dual-clutch transaxle)';
export const PIN = '482913';

/** How the services see a person (the session's view). */
export const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

let counter = 0;

/** A procedure invented for tests: front matter with a title made unique per call, then `body` (its steps). */
export function testProcedure(title: string, body: string, purpose = 'A procedure made by a test.') {
	counter += 1;
	return `---
title: ${title} ${counter}-${Date.now().toString(36)}
family: ${FAMILY}
purpose: ${purpose}
specs: Invented for tests; not service data.
---
${body}`;
}

const fenced = (info: string, lines: string) => `\`\`\`${info}\n${lines}\n\`\`\``;

/**
 * Steps of the procedures tests make, invented (not service data). The bore is 22 mm H7: 22.000 to 22.021 mm by
 * ISO 286-2 (IT7 for 18–30 mm is 21 µm, H puts the lower deviation at 0).
 */
export const testSteps = {
	bore: (critical = false) =>
		[
			'## Measure the bore',
			...(critical ? [fenced('step', 'critical: yes')] : []),
			fenced('measure bore-1', 'feature: bore\nnominal: 22 mm\ntolerance: H7')
		].join('\n\n'),
	magnet: `## Check the magnet\n\n${fenced('confirm magnet-1', 'prompt: Magnet is clean.')}`,
	filter: `## Fit the filter\n\n${fenced('confirm filter-1', 'prompt: Filter is seated.')}`
};

/** A procedure invented for tests: `steps` (sections) after the front matter of {@link testProcedure}. */
export const testProcedureOf = (title: string, ...steps: string[]) => testProcedure(title, `\n${steps.join('\n\n')}\n`);

/** Two steps: the bore ({@link testSteps}) and a magnet confirmation. */
export const runProcedureSource = () => testProcedureOf('Run test procedure', testSteps.bore(), testSteps.magnet);

/** Records that `lead` trained `who` on the {@link FAMILY}. */
export async function qualify(em: EntityManager, who: IUser, lead: IUser, trainedOn = '2026-01-05') {
	qualifications.create(em, who, lead, { family: FAMILY, trainedBy: lead.name, trainedOn, expiresOn: null, notes: '' });
	await em.flush();
}

/** `lead` writes and approves `source`: its published version 1. */
export async function publishVersion(em: EntityManager, lead: IUser, source: string) {
	const published = await publishInitial(em, source, {
		author: viewer(lead),
		approver: viewer(lead),
		changeNote: 'Test version.'
	});
	if (!published.ok) throw new Error(published.message);
	return (await procedures.findVersion(em, published.value.id, 1))!;
}

/** `lead` starts a run of `version` on the job, assigned to `tech`; its id. */
export async function startRunOn(
	em: EntityManager,
	lead: IUser,
	tech: IUser,
	jobId: string,
	version: { id: string; contentHash: string }
) {
	const run = await startRun(em, viewer(lead), {
		jobId,
		procedureVersionId: version.id,
		contentHash: version.contentHash,
		assignedToId: tech.id
	});
	if (!run.ok) throw new Error(run.message);
	return run.value.id;
}

/** A lead, a qualified technician with {@link PIN}, a job, a published version and a run on it assigned to the technician. */
export async function makeRun(em: EntityManager, opts: { qualified?: boolean; source?: string } = {}) {
	const lead = await makePerson(em, { roles: ['lead'], pin: PIN, name: 'Test Lead' });
	const tech = await makePerson(em, { roles: ['technician'], pin: PIN, name: 'Test Technician' });
	if (opts.qualified ?? true) await qualify(em, tech, lead);
	const version = await publishVersion(em, lead, opts.source ?? runProcedureSource());
	const job = await openJob(em, lead, jobInput());
	if (!job.ok) throw new Error(job.message);
	const runId = await startRunOn(em, lead, tech, job.value.id, version);
	return { lead, tech, version, jobId: job.value.id, runId };
}

/**
 * makeRun's people and job, and a second run on that job of `source` (also assigned to makeRun's technician), with
 * a second lead and a quality lead; `runId` is the second run.
 */
export async function makeRunOf(em: EntityManager, source: string) {
	const base = await makeRun(em);
	const version = await publishVersion(em, base.lead, source);
	const runId = await startRunOn(em, base.lead, base.tech, base.jobId, version);
	const lead2 = await makePerson(em, { roles: ['lead'], pin: PIN, name: 'Second Lead' });
	const quality = await makePerson(em, { roles: ['quality'], pin: PIN, name: 'Test Quality Lead' });
	return { ...base, version, lead2, quality, runId };
}

/** Submits records through the submit path as `actor`'s session, with the PINs typed as given. */
export async function submitWithPins(
	orm: MikroORM,
	actor: IUser,
	runId: string,
	records: unknown[],
	pins: Record<string, string>
) {
	const r = await submitRecords(orm.em.fork(), viewer(actor), runId, submitBatchSchema.parse({ records, pins }));
	if (!r.ok) throw new Error(r.message);
	return r.value.answers;
}

/** Submits records as `actor`'s session; every signer named in `signers` (the actor unless given) types {@link PIN}. */
export const submitAs = (orm: MikroORM, actor: IUser, runId: string, records: unknown[], signers: IUser[] = [actor]) =>
	submitWithPins(orm, actor, runId, records, Object.fromEntries(signers.map((s) => [s.id, PIN])));

/** A submitted record signed by `signer`. */
export function record(runId: string, signer: IUser, kind: string, body: unknown, over: Record<string, unknown> = {}) {
	return { id: uuidv7(), runId, kind, body, signer: { id: signer.id, role: signer.roles[0] }, ...over };
}

/** A bore reading attempt: what the tablet showed is `claimed`. */
export const boreAttempt = (reading: string, claimed: 'pass' | 'fail' = 'pass') => ({
	stepIndex: 0,
	entries: [{ checkpointId: 'bore-1', entry: { readings: [reading] }, claimed }]
});

/** {@link makeRun}, then a bore attempt inside H7 and a finding on step 1, both accepted. */
export async function makeRunWithFinding(orm: MikroORM) {
	const made = await makeRun(orm.em.fork());
	const answers = await submitAs(orm, made.tech, made.runId, [
		record(made.runId, made.tech, 'attempt', boreAttempt('22.010')),
		record(made.runId, made.tech, 'finding', { stepIndex: 0, text: 'Scoring in bore 1.' })
	]);
	if (answers.some((a) => a.status !== 'accepted')) throw new Error(`refused: ${JSON.stringify(answers)}`);
	return made;
}
