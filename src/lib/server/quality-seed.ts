// Run by scripts (outside Vite): relative imports only.
import type { EntityManager } from '@mikro-orm/postgresql';
import { Job, Procedure, User, type IUser } from './db/entities';
import { uuidv7 } from '../ledger/uuid-v7';
import * as procedures from './repositories/procedures';
import * as runs from './repositories/runs';
import { publishInitial } from './services/procedures.service';
import { submitBatchSchema } from './services/runs.schema';
import { submitRecords } from './services/submit.service';

/** Invented for the demo (not service data): 22 mm H7 = 22.000–22.021 mm (ISO 286-2, IT7 18–30 mm = 21 µm). */
export const QUALITY_DEMO_TITLE = 'Shift-piston bore 1 re-check after a shift complaint';
const SOURCE = `---
title: ${QUALITY_DEMO_TITLE}
family: KTX-7 (invented seven-speed dual-clutch transaxle)
purpose: Re-measure shift-piston bore 1, set its piston and prove the valve body holds pressure, after a shift complaint.
specs: Invented for the Benchstamp demo (Kestrel Lane Transmission Works, an invented shop); not service data. Always work to the manufacturer's service information.
---

> Warning: Stored hydraulic pressure. Depressurise the accumulator as the manufacturer's service information
> describes before opening any line, and wear eye protection.

## Measure shift-piston bore 1

\`\`\`step
critical: yes
qualification: valve-body rebuild
\`\`\`

\`\`\`measure bore-1
prompt: Shift-piston bore 1 diameter
feature: bore
nominal: 22 mm
tolerance: H7
readings: 2
zero-check: yes
resolution: 0.001 mm
\`\`\`

## Set piston 1

\`\`\`confirm magnet-1
prompt: Piston 1 is fitted with its magnet facing the position sensor pocket.
\`\`\`

## Hold the test pressure

\`\`\`step
qualification: transmission control adaptation
\`\`\`

> Caution: A replaced sensor or reworked hydraulics may need the control unit adapted by a qualified person.

\`\`\`test seal-test
prompt: Hold the test pressure for two minutes with no drop.
\`\`\`
`;

const PINS: Record<string, string> = { 'tech@example.com': '111111', 'lead@example.com': '222222' };
const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

/**
 * One demo run awaiting review with an open finding on an out-of-tolerance bore reading (22.034 mm against the
 * 22.021 mm upper limit), on the job that is awaiting review, so a new quality lead finds it on /quality. Written
 * through the real submit path (PINs, evaluation, chain). Idempotent: skipped when its procedure exists.
 */
export async function seedQualityDemo(em: EntityManager): Promise<{ created: number }> {
	if (await em.count(Procedure, { title: QUALITY_DEMO_TITLE })) return { created: 0 };
	const byEmail = new Map((await em.find(User, {})).map((u) => [u.email, u] as const));
	const [tech, lead, quality] = ['tech@example.com', 'lead@example.com', 'quality@example.com'].map((e) =>
		byEmail.get(e)
	);
	const job = await em.findOne(Job, { complaint: 'Fluid leak at the pan; slipping in fourth.' });
	if (!tech || !lead || !quality || !job) return { created: 0 };
	const published = await publishInitial(em, SOURCE, {
		author: viewer(lead),
		approver: viewer(quality),
		changeNote: 'Demo procedure for the quality lead (invented).'
	});
	if (!published.ok) throw new Error(`quality demo procedure: ${published.message}`);
	const version = (await procedures.findVersion(em, published.value.id, 1))!;
	// The job was seeded as already awaiting review (where startRun refuses), so the run row is written directly.
	const runId = runs.create(em, {
		jobId: job.id,
		procedureVersionId: version.id,
		contentHash: version.contentHash,
		assignedToId: tech.id,
		startedById: lead.id
	}).id;
	await em.flush();
	const rec = (signer: IUser, kind: string, body: unknown) => ({
		id: uuidv7(),
		runId,
		kind,
		body,
		signer: { id: signer.id, role: signer.roles[0] },
		deviceId: 'demo-bench-tablet'
	});
	const signoff = rec(tech, 'signoff', {
		stepIndex: 0,
		entries: [{ checkpointId: 'bore-1', entry: { zeroed: true, readings: ['22.034', '22.019'] }, claimed: 'fail' }]
	});
	const records = [
		rec(tech, 'finding', {
			stepIndex: 0,
			checkpointId: 'bore-1',
			text: 'Bore 1 reads 22.034 mm at the first position, above the 22.021 mm limit; scoring along the piston stroke.'
		}),
		signoff,
		rec(lead, 'verification', { stepIndex: 0, signoffId: signoff.id }),
		rec(tech, 'signoff', {
			stepIndex: 1,
			entries: [{ checkpointId: 'magnet-1', entry: { confirmed: true }, claimed: 'pass' }]
		}),
		rec(tech, 'signoff', {
			stepIndex: 2,
			entries: [{ checkpointId: 'seal-test', entry: { result: 'pass' }, claimed: 'pass' }]
		})
	];
	const batch = submitBatchSchema.parse({
		records,
		pins: { [tech.id]: PINS[tech.email], [lead.id]: PINS[lead.email] }
	});
	const sent = await submitRecords(em.fork({ clear: true }), viewer(lead), runId, batch);
	const bad = sent.ok ? sent.value.answers.find((a) => a.status === 'refused') : undefined;
	if (!sent.ok || bad) throw new Error(`quality demo records: ${sent.ok ? bad?.reason : sent.message}`);
	return { created: 1 };
}
