/** `GET /api/runs`: the runs table for machine clients (the offline tablet's "my runs", the CLI). Plain objects. */
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import { RUN_STATES, type IJob, type IProcedure, type IProcedureVersion, type IUser } from '../db/entities';
import * as runRecords from '../repositories/run-records';
import type { Viewer } from './runs.service';

/** Query of the run list; every field optional, pages of at most 200. */
export const runListQuerySchema = z.strictObject({
	state: z.enum(RUN_STATES, { error: `state is one of ${RUN_STATES.join(', ')}.` }).optional(),
	jobId: z.uuid({ error: 'jobId is a job id.' }).optional(),
	assignedTo: z.uuid({ error: 'assignedTo is a person id.' }).optional(),
	limit: z.coerce
		.number({ error: 'limit is a number.' })
		.int('limit is a whole number.')
		.min(1, 'limit is at least 1.')
		.max(200, 'limit is at most 200.')
		.default(50),
	offset: z.coerce
		.number({ error: 'offset is a number.' })
		.int('offset is a whole number.')
		.min(0, 'offset is at least 0.')
		.default(0)
});
export type RunListQuery = z.infer<typeof runListQuerySchema>;

export interface RunListItem {
	id: string;
	state: string;
	jobId: string;
	jobNumber: string;
	title: string;
	versionNumber: number;
	assignedTo: { id: string; name: string };
	recordCount: number;
	createdAt: string;
	updatedAt: string;
}

/** Roles that see every run; everyone else in READ_ROLES (technicians) sees their own only. */
const SEE_ALL = ['lead', 'quality', 'admin'];

/** The runs the viewer may see that match the query, newest first, with the total count. */
export async function listRuns(
	em: EntityManager,
	viewer: Viewer,
	query: RunListQuery
): Promise<{ total: number; limit: number; offset: number; runs: RunListItem[] }> {
	const seesAll = viewer.roles.some((r) => SEE_ALL.includes(r));
	const { rows, total } = await runRecords.list(em, { ...query, ownFor: seesAll ? undefined : viewer.id });
	return {
		total,
		limit: query.limit,
		offset: query.offset,
		runs: rows.map((r) => {
			const v = r.procedureVersion as unknown as IProcedureVersion;
			const u = r.assignedTo as unknown as IUser;
			const job = r.job as unknown as IJob;
			return {
				id: r.id,
				state: r.state,
				jobId: job.id,
				jobNumber: job.jobNumber,
				title: (v.procedure as unknown as IProcedure).title,
				versionNumber: v.number,
				assignedTo: { id: u.id, name: u.name },
				recordCount: r.recordCount,
				createdAt: r.createdAt.toISOString(),
				updatedAt: r.updatedAt.toISOString()
			};
		})
	};
}
