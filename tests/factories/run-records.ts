/** Helpers for the N/A, handover, correction and run-list tests (R2). Invented procedures, not service data. */
import type { EntityManager, MikroORM } from '@mikro-orm/postgresql';
import type { IUser } from '../../src/lib/server/db/entities';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { getRun } from '../../src/lib/server/services/runs.service';
import { makeRunOf, testProcedureOf, testSteps, viewer } from './runs';

export { submitAs, viewer } from './runs';

/**
 * Three steps: a critical 22 mm H7 bore (22.000–22.021 mm by ISO 286-2: IT7 for 18–30 mm is 21 µm, H puts the lower
 * deviation at 0), a magnet confirmation and a filter confirmation. Invented for tests.
 */
export const threeStepSource = () =>
	testProcedureOf('R2 records test', testSteps.bore(true), testSteps.magnet, testSteps.filter);

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
export const threeStepRun = (em: EntityManager) => makeRunOf(em, threeStepSource());

export async function runState(orm: MikroORM, who: IUser, runId: string) {
	const r = await getRun(orm.em.fork(), viewer(who), runId);
	if (!r.ok) throw new Error(r.message);
	return r.value.state;
}

export const kinds = async (orm: MikroORM, runId: string) =>
	(await ledger.listForRun(orm.em.fork(), runId)).map((r) => r.kind);
