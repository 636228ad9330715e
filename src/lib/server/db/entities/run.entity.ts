import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Job } from './job.entity';
import { ProcedureVersion } from './procedure-version.entity';
import { User } from './user.entity';

/**
 * Where a run stands. `paused` is a run left at the end of a shift; `awaiting_review` once every step is signed;
 * `released` once a quality lead signed its release (read-only from then on).
 */
export const RUN_STATES = ['in_progress', 'paused', 'awaiting_review', 'released'] as const;
export type RunState = (typeof RUN_STATES)[number];

/**
 * One working of a published procedure version on a job, assigned to a technician. `contentHash` pins the exact
 * text. `headHash`/`recordCount` mirror the last record of the run's chain in `ledger_record`; they change only
 * under this row's lock (SELECT … FOR UPDATE), which is what serialises appends so the chain never forks.
 */
export const Run = defineEntity({
	name: 'Run',
	tableName: 'run',
	properties: {
		id: p.uuid().primary(),
		job: () => p.manyToOne(Job).index(),
		procedureVersion: () => p.manyToOne(ProcedureVersion).index(),
		contentHash: p.string().length(64),
		assignedTo: () => p.manyToOne(User).index(),
		startedBy: () => p.manyToOne(User),
		state: p.enum([...RUN_STATES]).$type<RunState>(),
		headHash: p.string().length(64).nullable(),
		recordCount: p.integer().default(0),
		/** Set on a rework run: the run whose finding was dispositioned as rework (issue 8). */
		reworkOf: () => p.manyToOne(Run).nullable().index(),
		/** A rework run's 0-based step indexes: only these must be signed (and verified where critical). */
		reworkSteps: p.json<number[]>().nullable(),
		/** The finding (ledger record id) whose rework disposition opened this run. */
		reworkFindingId: p.uuid().nullable(),
		createdAt: p.datetime().onCreate(() => new Date()),
		updatedAt: p
			.datetime()
			.onCreate(() => new Date())
			.onUpdate(() => new Date())
	}
});
export type IRun = InferEntity<typeof Run>;
