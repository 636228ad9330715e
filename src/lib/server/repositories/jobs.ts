import type { EntityManager } from '@mikro-orm/postgresql';
import { Job, JobPhoto, JobStateChange, type IJob, type IJobPhoto, type IJobStateChange } from '../db/entities';
import type { JobState } from '../../registers/job-states';
import type { JobsQuery } from '../../registers/schema';

/** Shop prefix of job numbers (Kestrel Lane): `KL-<two-digit year>-<four or more digits>`. */
export const JOB_PREFIX = 'KL';

/** The key a unit is recognised by: its serial upper-cased, with spaces, dashes, dots and slashes removed. */
export const serialKey = (serial: string) => serial.toUpperCase().replace(/[\s./-]+/g, '');

/**
 * The next job number, from the `job_number_seq` sequence: `nextval` is atomic, so concurrent intakes never share a
 * number (a rolled-back intake leaves a gap, as paper job books do). The count runs on across years.
 */
export async function nextJobNumber(em: EntityManager, at: Date = new Date()): Promise<string> {
	const [row] = await em.getConnection().execute<{ n: string }[]>(`select nextval('job_number_seq')::text as n`);
	const yy = String(at.getUTCFullYear() % 100).padStart(2, '0');
	return `${JOB_PREFIX}-${yy}-${row.n.padStart(4, '0')}`;
}

export function findById(em: EntityManager, id: string): Promise<IJob | null> {
	return em.findOne(Job, { id });
}

export function findByNumber(em: EntityManager, jobNumber: string): Promise<IJob | null> {
	return em.findOne(Job, { jobNumber: jobNumber.trim().toUpperCase() });
}

/** Every job on the unit with this serial, oldest first (the unit's history; a comeback shows here). */
export function listForSerial(em: EntityManager, serial: string): Promise<IJob[]> {
	return em.find(Job, { serialKey: serialKey(serial) }, { orderBy: { receivedOn: 'asc', createdAt: 'asc' } });
}

/** The latest job on this serial received on or before `receivedOn`: the one a new job is a comeback of. */
export function findLatestForSerial(em: EntityManager, serial: string, receivedOn: string): Promise<IJob | null> {
	return em.findOne(
		Job,
		{ serialKey: serialKey(serial), receivedOn: { $lte: receivedOn } },
		{ orderBy: { receivedOn: 'desc', createdAt: 'desc' } }
	);
}

const OPEN: JobState[] = ['received', 'in_work', 'on_hold', 'awaiting_parts', 'awaiting_review'];

/** The jobs table: newest first, with search over number, customer, model, serial and fault codes. */
export async function list(em: EntityManager, query: JobsQuery): Promise<{ rows: IJob[]; total: number }> {
	const q = query.q.trim();
	const like = `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
	const where = {
		...(query.state === 'open' ? { state: { $in: OPEN } } : query.state ? { state: query.state } : {}),
		...(query.comebacks === '1' ? { previousJob: { $ne: null } } : {}),
		...(q
			? {
					$or: [
						{ jobNumber: { $ilike: like } },
						{ customerName: { $ilike: like } },
						{ unitModel: { $ilike: like } },
						{ unitSerial: { $ilike: like } },
						...(serialKey(q) ? [{ serialKey: { $like: `%${serialKey(q).replace(/[\\%_]/g, '')}%` } }] : []),
						{ faultCodes: { $contains: [q.toUpperCase()] } }
					]
				}
			: {})
	};
	const [rows, total] = await em.findAndCount(Job, where, {
		orderBy: { receivedOn: 'desc', createdAt: 'desc' },
		limit: query.limit,
		offset: query.offset,
		populate: ['previousJob']
	});
	return { rows, total };
}

export function create(
	em: EntityManager,
	data: Omit<IJob, 'id' | 'createdAt' | 'updatedAt' | 'serialKey' | 'previousJob'> & { previousJob: IJob | null }
): IJob {
	return em.create(Job, { id: crypto.randomUUID(), ...data, serialKey: serialKey(data.unitSerial) });
}

export function recordStateChange(
	em: EntityManager,
	job: IJob,
	actor: { id: string; name: string },
	change: { from: JobState | null; to: JobState; reason: string }
): IJobStateChange {
	return em.create(JobStateChange, {
		job,
		fromState: change.from,
		toState: change.to,
		reason: change.reason,
		actorId: actor.id,
		actorName: actor.name,
		at: new Date()
	});
}

export function listStateChanges(em: EntityManager, jobId: string): Promise<IJobStateChange[]> {
	return em.find(JobStateChange, { job: jobId }, { orderBy: { id: 'asc' } });
}

export function addPhoto(
	em: EntityManager,
	job: IJob,
	imageId: string,
	actor: { id: string; name: string }
): IJobPhoto {
	return em.create(JobPhoto, { job, imageId, addedById: actor.id, addedByName: actor.name });
}

export function listPhotos(em: EntityManager, jobId: string): Promise<IJobPhoto[]> {
	return em.find(JobPhoto, { job: jobId }, { orderBy: { addedAt: 'asc' } });
}
