/** Helpers for the N/A, handover, correction and run-list tests (R2). Invented procedures, not service data. */
import type { EntityManager, MikroORM } from '@mikro-orm/postgresql';
import type { IUser } from '../../src/lib/server/db/entities';
import * as ledger from '../../src/lib/server/repositories/ledger';
import * as procedures from '../../src/lib/server/repositories/procedures';
import { publishInitial } from '../../src/lib/server/services/procedures.service';
import { getRun, startRun } from '../../src/lib/server/services/runs.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { makePerson } from './people';
import { FAMILY, makeRun, PIN } from './runs';

export const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

let counter = 0;
/**
 * Three steps: a critical 22 mm H7 bore (22.000–22.021 mm by ISO 286-2: IT7 for 18–30 mm is 21 µm, H puts the lower
 * deviation at 0), a magnet confirmation and a filter confirmation. Invented for tests.
 */
export function threeStepSource() {
	counter += 1;
	return `---
title: R2 records test ${counter}-${Date.now().toString(36)}
family: ${FAMILY}
purpose: A procedure made by a test.
specs: Invented for tests; not service data.
---

## Measure the bore

\`\`\`step
critical: yes
\`\`\`

\`\`\`measure bore-1
feature: bore
nominal: 22 mm
tolerance: H7
\`\`\`

## Check the magnet

\`\`\`confirm magnet-1
prompt: Magnet is clean.
\`\`\`

## Fit the filter

\`\`\`confirm filter-1
prompt: Filter is seated.
\`\`\`
`;
}

export const bore = (reading = '22.010') => ({
	stepIndex: 0,
	entries: [{ checkpointId: 'bore-1', entry: { readings: [reading] }, claimed: 'pass' }]
});
export const magnet = {
	stepIndex: 1,
	entries: [{ checkpointId: 'magnet-1', entry: { confirmed: true }, claimed: 'pass' }]
};
export const filter = {
	stepIndex: 2,
	entries: [{ checkpointId: 'filter-1', entry: { confirmed: true }, claimed: 'pass' }]
};

/** makeRun's lead and technician, a second lead and a quality lead, and a run of {@link threeStepSource}. */
export async function threeStepRun(em: EntityManager) {
	const base = await makeRun(em);
	const published = await publishInitial(em, threeStepSource(), {
		author: viewer(base.lead),
		approver: viewer(base.lead),
		changeNote: 'Test version.'
	});
	if (!published.ok) throw new Error(published.message);
	const version = (await procedures.findVersion(em, published.value.id, 1))!;
	const run = await startRun(em, viewer(base.lead), {
		jobId: base.jobId,
		procedureVersionId: version.id,
		contentHash: version.contentHash,
		assignedToId: base.tech.id
	});
	if (!run.ok) throw new Error(run.message);
	const lead2 = await makePerson(em, { roles: ['lead'], pin: PIN, name: 'Second Lead' });
	const quality = await makePerson(em, { roles: ['quality'], pin: PIN, name: 'Test Quality Lead' });
	return { ...base, lead2, quality, runId: run.value.id };
}

/** Submits records as `actor`'s session; every signer named in `signers` types {@link PIN}. */
export async function submitAs(orm: MikroORM, actor: IUser, runId: string, records: unknown[], signers: IUser[]) {
	const pins = Object.fromEntries(signers.map((s) => [s.id, PIN]));
	const r = await submitRecords(orm.em.fork(), viewer(actor), runId, submitBatchSchema.parse({ records, pins }));
	if (!r.ok) throw new Error(r.message);
	return r.value.answers;
}

export async function runState(orm: MikroORM, who: IUser, runId: string) {
	const r = await getRun(orm.em.fork(), viewer(who), runId);
	if (!r.ok) throw new Error(r.message);
	return r.value.state;
}

export const kinds = async (orm: MikroORM, runId: string) =>
	(await ledger.listForRun(orm.em.fork(), runId)).map((r) => r.kind);
