import type { EntityManager } from '@mikro-orm/postgresql';
import type { IUser } from '../../src/lib/server/db/entities';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import * as procedures from '../../src/lib/server/repositories/procedures';
import * as qualifications from '../../src/lib/server/repositories/qualifications';
import { openJob } from '../../src/lib/server/services/jobs.service';
import { publishInitial } from '../../src/lib/server/services/procedures.service';
import { startRun } from '../../src/lib/server/services/runs.service';
import { jobInput } from './registers';
import { makePerson } from './people';

export const FAMILY = 'KTX-7 (invented seven-speed dual-clutch transaxle)';
export const PIN = '482913';

let counter = 0;

/**
 * Two steps, invented for tests (not service data): a 22 mm H7 bore — 22.000 to 22.021 mm by ISO 286-2 (IT7 for
 * 18–30 mm is 21 µm, H puts the lower deviation at 0) — and a magnet confirmation.
 */
export function runProcedureSource() {
	counter += 1;
	return `---
title: Run test procedure ${counter}-${Date.now().toString(36)}
family: ${FAMILY}
purpose: A procedure made by a test.
specs: Invented for tests; not service data.
---

## Measure the bore

\`\`\`measure bore-1
feature: bore
nominal: 22 mm
tolerance: H7
\`\`\`

## Check the magnet

\`\`\`confirm magnet-1
prompt: Magnet is clean.
\`\`\`
`;
}

const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

/** A lead, a qualified technician with {@link PIN}, a job, a published version and a run on it assigned to the technician. */
export async function makeRun(em: EntityManager, opts: { qualified?: boolean; source?: string } = {}) {
	const lead = await makePerson(em, { roles: ['lead'], pin: PIN, name: 'Test Lead' });
	const tech = await makePerson(em, { roles: ['technician'], pin: PIN, name: 'Test Technician' });
	if (opts.qualified ?? true) {
		qualifications.create(em, tech, lead, {
			family: FAMILY,
			trainedBy: lead.name,
			trainedOn: '2026-01-05',
			expiresOn: null,
			notes: ''
		});
	}
	const published = await publishInitial(em, opts.source ?? runProcedureSource(), {
		author: viewer(lead),
		approver: viewer(lead),
		changeNote: 'Test version.'
	});
	if (!published.ok) throw new Error(published.message);
	const version = (await procedures.findVersion(em, published.value.id, 1))!;
	const job = await openJob(em, lead, jobInput());
	if (!job.ok) throw new Error(job.message);
	const run = await startRun(em, viewer(lead), {
		jobId: job.value.id,
		procedureVersionId: version.id,
		contentHash: version.contentHash,
		assignedToId: tech.id
	});
	if (!run.ok) throw new Error(run.message);
	return { lead, tech, version, jobId: job.value.id, runId: run.value.id };
}

/** A submitted record signed by `signer`. */
export function record(runId: string, signer: IUser, kind: string, body: unknown, over: Record<string, unknown> = {}) {
	return { id: uuidv7(), runId, kind, body, signer: { id: signer.id, role: signer.roles[0] }, ...over };
}

/** A bore reading attempt: what the tablet showed is `claimed`. */
export const boreAttempt = (reading: string, claimed: 'pass' | 'fail' = 'pass') => ({
	stepIndex: 0,
	entries: [{ checkpointId: 'bore-1', entry: { readings: [reading] }, claimed }]
});
