import type { EntityManager } from '@mikro-orm/postgresql';
import { openJob } from '../../src/lib/server/services/jobs.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { makePerson } from './people';
import { jobInput } from './registers';
import { PIN, publishVersion, qualify, record, startRunOn, testProcedure, viewer } from './runs';

let counter = 0;

/**
 * Two steps, invented for tests (not service data): a 22 mm H7 bore, 22.000 to 22.021 mm (ISO 286-2: IT7 for
 * 18–30 mm is 21 µm, H puts the lower deviation at 0), measured with a registered gauge; and a filter fitted, its lot
 * recorded.
 */
export function traceProcedureSource() {
	counter += 1;
	return testProcedure(
		'Trace test procedure',
		`
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
`,
		'A procedure made by an audit test.'
	);
}

/** A lead, a qualified technician with {@link PIN} and one published version of {@link traceProcedureSource}. */
export async function makeTraceFixture(em: EntityManager) {
	const lead = await makePerson(em, { roles: ['lead'], pin: PIN, name: 'Audit Lead' });
	const tech = await makePerson(em, { roles: ['technician'], pin: PIN, name: `Audit Tech ${counter + 1}` });
	await qualify(em, tech, lead, '2025-01-05');
	const version = await publishVersion(em, lead, traceProcedureSource());
	return { lead, tech, version, procedureId: version.procedure.id };
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
	const runId = await startRunOn(em, f.lead, f.tech, job.value.id, f.version);
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
