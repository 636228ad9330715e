import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IUser } from '../../src/lib/server/db/entities';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { makeCalibratedTool } from '../factories/registers';
import { makeRun, record, submitAs, testProcedure } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

// The unqualified signer, the past-due tool and the sixth wrong PIN are refused in runs.test.ts; the doer verifying
// their own critical step in runs-verification.test.ts. This file adds the torque wrench's suitability.

/** One torque step, invented for tests (not service data): two screws to 8 N·m ±10 % (7.2 to 8.8 N·m). */
const torqueSource = (tool: 'any' | 'preset' = 'any') =>
	testProcedure(
		'Torque test procedure',
		`
## Tighten the cover

\`\`\`torque cover-screws
target: 8 N·m
tolerance: ±10 %
fasteners: 2
tool: ${tool}
\`\`\`
`
	);

const torqueSignoff = (tools: string[], passes: unknown[], setTo?: string[]) => ({
	stepIndex: 0,
	tools,
	entries: [{ checkpointId: 'cover-screws', entry: { passes }, claimed: 'pass' as const, ...(setTo && { setTo }) }]
});

describe('submit route refusals: torque wrench suitability', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	const submit = (actor: IUser, runId: string, records: unknown[]) => submitAs(orm, actor, runId, records);
	const readings = [{ '1': { value: '8.1' }, '2': { value: '7.9' } }];

	it('refuses a wrench whose maximum is more than five times the target, and accepts a suitable one', async () => {
		const { tech, runId } = await makeRun(orm.em.fork(), { source: torqueSource() });
		// 1–50 N·m as registered, but ISO 6789-1 uses a torque tool from 20 % of its maximum: 10–50 N·m, and 8 N·m is
		// below that (50 > 5 × 8). The register's own lower end does not widen the usable range.
		const big = await makeCalibratedTool(orm.em.fork(), {
			over: { kind: 'torque_indicating', rangeMin: '1', rangeMax: '50', unit: 'N·m', accuracyPct: '2' }
		});
		const [refused] = await submit(tech, runId, [record(runId, tech, 'signoff', torqueSignoff([big.id], readings))]);
		expect(refused.status).toBe('refused');
		expect(refused.reason).toBe(
			`Tool ${big.assetTag} cannot tighten cover-screws: The target 8 N·m is below the tool's usable range of 10–50 N·m.`
		);
		// Refused at an attempt too: a reading taken with an unsuitable wrench is not evidence.
		const [attempt] = await submit(tech, runId, [record(runId, tech, 'attempt', torqueSignoff([big.id], readings))]);
		expect(attempt.reason).toMatch(/below the tool's usable range/);
		expect(await ledger.listForRun(orm.em.fork(), runId)).toHaveLength(0);

		// 2–12 N·m: usable from 2.4 N·m (20 % of 12), so 8 N·m and its limits 7.2–8.8 N·m fit; ±2 % of 8 N·m is
		// ±0.16 N·m, within a quarter of the ±0.8 N·m tolerance.
		const fits = await makeCalibratedTool(orm.em.fork(), {
			over: { kind: 'torque_indicating', rangeMin: '2', rangeMax: '12', unit: 'N·m', accuracyPct: '2' }
		});
		const [ok] = await submit(tech, runId, [record(runId, tech, 'signoff', torqueSignoff([fits.id], readings))]);
		expect(ok.status).toBe('accepted');
		const [row] = (await ledger.listForRun(orm.em.fork(), runId)).map(ledger.toStored);
		const body = row.body as { evaluation: { status: string; warnings: string[] }[] };
		expect(body.evaluation[0]).toMatchObject({ status: 'pass', warnings: [] });
	});

	it('refuses a wrench too coarse for the tolerance, and judges a preset wrench by the setting sent', async () => {
		const { tech, runId } = await makeRun(orm.em.fork(), { source: torqueSource('preset') });
		// ±12 % of 8 N·m is ±0.96 N·m, wider than the ±0.8 N·m tolerance.
		const coarse = await makeCalibratedTool(orm.em.fork(), {
			over: { kind: 'torque_click', rangeMin: '2', rangeMax: '12', unit: 'N·m', accuracyPct: '12' }
		});
		const reached = [{ '1': { reached: true }, '2': { reached: true } }];
		const [refused] = await submit(tech, runId, [
			record(runId, tech, 'signoff', torqueSignoff([coarse.id], reached, ['8']))
		]);
		expect(refused.reason).toMatch(/accuracy of ±12 % \(±0\.96 N·m at 8 N·m\) is wider than the tolerance/);

		const click = await makeCalibratedTool(orm.em.fork(), {
			over: { kind: 'torque_click', rangeMin: '2', rangeMax: '12', unit: 'N·m', accuracyPct: '2' }
		});
		// Without the setting the preset entry is incomplete, so it cannot be signed.
		const [unset] = await submit(tech, runId, [record(runId, tech, 'signoff', torqueSignoff([click.id], reached))]);
		expect(unset.reason).toMatch(/cover-screws is incomplete \(/);
		const [ok] = await submit(tech, runId, [record(runId, tech, 'signoff', torqueSignoff([click.id], reached, ['8']))]);
		expect(ok.status).toBe('accepted');
	});
});
