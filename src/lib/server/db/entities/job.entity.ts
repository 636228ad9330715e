import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { JOB_STATES, type JobState } from '../../../registers/job-states';

/**
 * A work order for one unit. `jobNumber` comes from the `job_number_seq` sequence (see jobs repository);
 * `serialKey` is the unit serial upper-cased without spaces or dashes, the key comebacks are found by;
 * `previousJob` is the latest earlier job on the same serial when this one was opened.
 */
export const Job = defineEntity({
	name: 'Job',
	tableName: 'job',
	properties: {
		id: p.uuid().primary(),
		jobNumber: p.string().length(20).unique(),
		customerName: p.string().length(120),
		customerEmail: p.string().length(320).default(''),
		customerPhone: p.string().length(40).default(''),
		unitModel: p.string().length(120),
		unitSerial: p.string().length(60),
		serialKey: p.string().length(60).index(),
		mileage: p.integer().nullable(),
		complaint: p.text(),
		faultCodes: p.array().$type<string[]>(),
		receivedOn: p.date(),
		intakeNotes: p.text().default(''),
		state: p.enum([...JOB_STATES]).$type<JobState>(),
		previousJob: () => p.manyToOne(Job).nullable().deleteRule('set null'),
		createdById: p.uuid().nullable(),
		createdByName: p.string().length(120).nullable(),
		createdAt: p.datetime().onCreate(() => new Date()),
		updatedAt: p
			.datetime()
			.onCreate(() => new Date())
			.onUpdate(() => new Date())
	}
});
export type IJob = InferEntity<typeof Job>;
