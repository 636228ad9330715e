import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { JOB_STATES, type JobState } from '../../../registers/job-states';
import { Job } from './job.entity';

/** Append-only history of a job's states: the app role may only INSERT and SELECT (hand-written migration). */
export const JobStateChange = defineEntity({
	name: 'JobStateChange',
	tableName: 'job_state_change',
	properties: {
		id: p.bigint('string').primary().autoincrement(),
		job: () => p.manyToOne(Job).deleteRule('no action').index(),
		fromState: p
			.enum([...JOB_STATES])
			.$type<JobState>()
			.nullable(),
		toState: p.enum([...JOB_STATES]).$type<JobState>(),
		reason: p.text(),
		actorId: p.uuid().nullable(),
		actorName: p.string().length(120).nullable(),
		at: p.datetime().defaultRaw('now()')
	}
});
export type IJobStateChange = InferEntity<typeof JobStateChange>;
