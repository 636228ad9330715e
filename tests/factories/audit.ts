import type { EntityManager } from '@mikro-orm/postgresql';
import type { IUser } from '../../src/lib/server/db/entities';
import * as procedures from '../../src/lib/server/repositories/procedures';
import * as qualifications from '../../src/lib/server/repositories/qualifications';
import { openJob } from '../../src/lib/server/services/jobs.service';
import { publishInitial } from '../../src/lib/server/services/procedures.service';
import { startRun } from '../../src/lib/server/services/runs.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { makePerson } from './people';
import { jobInput } from './registers';
import { FAMILY, PIN, record } from './runs';

let counter = 0;
const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

/**
 * Two steps, invented for tests (not service data): a 22 mm H7 bore, 22.000 to 22.021 mm (ISO 286-2: IT7 for
 * 18–30 mm is 21 µm, H puts the lower deviation at 0), measured with a registered gauge; and a filter fitted, its lot
 * recorded.
 */
export function traceProcedureSource() {
	counter += 1;
	return `---
title: Trace test procedure ${counter}-${Date.now().toString(36)}
family: ${FAMILY}
purpose: A procedure made by an audit test.
specs: Invented for tests; not service data.
---

## Measure the bore

\`\`\`step
minutes: 10
\`\`\`

\`\`\`measure bore-1
feature: bore
nominal: 22 mm
tolerance: H7
\`\`\`

## Fit the filter

\`\`\`part filter
number: KL-7710-##@
lot: required
\`\`\`
`;
}

/** A lead, a qualified technician with {@link PIN} and one published version of {@link traceProcedureSource}. */
export async function makeTraceFixture(em: EntityManager) {
	const lead = await makePerson(em, { roles: ['lead'], pin: PIN, name: 'Audit Lead' });
	const tech = await makePerson(em, { roles: ['technician'], pin: PIN, name: `Audit Tech ${counter + 1}` });
	qualifications.create(em, tech, lead, {
		family: FAMILY,
		trainedBy: lead.name,
		trainedOn: '2025-01-05',
		expiresOn: null,
		notes: ''
	});
	const published = await publishInitial(em, traceProcedureSource(), {
		author: viewer(lead),
		approver: viewer(lead),
		changeNote: 'Test version.'
	});
	if (!published.ok) throw new Error(published.message);
	const version = (await procedures.findVersion(em, published.value.id, 1))!;
	return { lead, tech, version, procedureId: published.value.id };
}

export type TraceFixture = Awaited<ReturnType<typeof makeTraceFixture>>;

/**
 * A new job (unique serial unless given) with a run of the fixture's version, both steps signed through the real
 * submit path at `at`: the bore read `reading` with `toolId` named, the filter from `lot`.
 */
export async function signTraceRun(
	em: EntityManager,
	f: TraceFixture,
	opts: { lot: string; toolId?: string; reading?: string; at?: Date; serial?: string; finding?: string }
) {
	const job = await openJob(em, f.lead, jobInput(opts.serial ? { unitSerial: opts.serial } : {}));
	if (!job.ok) throw new Error(job.message);
	const run = await startRun(em, viewer(f.lead), {
		jobId: job.value.id,
		procedureVersionId: f.version.id,
		contentHash: f.version.contentHash,
		assignedToId: f.tech.id
	});
	if (!run.ok) throw new Error(run.message);
	const runId = run.value.id;
	const records = [
		record(runId, f.tech, 'signoff', {
			stepIndex: 0,
			entries: [{ checkpointId: 'bore-1', entry: { readings: [opts.reading ?? '22.010'] }, claimed: 'pass' }],
			tools: opts.toolId ? [opts.toolId] : []
		}),
		...(opts.finding ? [record(runId, f.tech, 'finding', { stepIndex: 0, text: opts.finding })] : []),
		record(runId, f.tech, 'signoff', {
			stepIndex: 1,
			entries: [{ checkpointId: 'filter', entry: { number: 'KL-7710-01A', lot: opts.lot }, claimed: 'pass' }],
			tools: []
		})
	];
	const batch = submitBatchSchema.parse({ records, pins: { [f.tech.id]: PIN } });
	const at = opts.at;
	const r = await submitRecords(em.fork(), viewer(f.tech), runId, batch, at ? { now: () => at } : {});
	if (!r.ok) throw new Error(r.message);
	const refused = r.value.answers.find((a) => a.status !== 'accepted');
	if (refused) throw new Error(`record refused: ${refused.reason}`);
	return { runId, jobId: job.value.id, jobNumber: job.value.jobNumber };
}
