import type { EntityManager } from '@mikro-orm/postgresql';
import type { RoleName } from '../../accounts/schema';
import { Job, type IJob, type IJobPhoto, type IJobStateChange } from '../db/entities';
import { isoDate } from '../../registers/dates';
import { JOB_STATE_LABELS, RELEASE_ROLES, canMove, type JobState } from '../../registers/job-states';
import { parseFaultCodes, type JobInput, type StateChangeInput } from '../../registers/schema';
import * as adminLog from '../repositories/admin-log';
import * as jobs from '../repositories/jobs';
import type { Actor, Result } from './accounts.service';
import { EMPTY, HEIC_REFUSED, NOT_A_PHOTO, SVG_REFUSED, TOO_LARGE, sniffFormat } from '../images';
import { MAX_IMAGE_BYTES, imageUrl, storeImage } from './images.service';

export const MAX_PHOTOS_PER_UPLOAD = 8;

export interface PhotoUpload {
	bytes: Uint8Array;
	filename: string;
}

export interface JobSummary {
	id: string;
	jobNumber: string;
	customerName: string;
	unitModel: string;
	unitSerial: string;
	faultCodes: string[];
	receivedOn: string;
	state: JobState;
	/** Set when this job is a comeback: the earlier job on the same unit. */
	previousJob: { id: string; jobNumber: string } | null;
}

export interface JobDetail extends JobSummary {
	customerEmail: string;
	customerPhone: string;
	mileage: number | null;
	complaint: string;
	intakeNotes: string;
	createdByName: string | null;
	createdAt: Date;
}

export const toSummary = (j: IJob): JobSummary => {
	const prev = j.previousJob as unknown as IJob | null | undefined;
	return {
		id: j.id,
		jobNumber: j.jobNumber,
		customerName: j.customerName,
		unitModel: j.unitModel,
		unitSerial: j.unitSerial,
		faultCodes: j.faultCodes,
		receivedOn: j.receivedOn,
		state: j.state,
		previousJob: prev ? { id: prev.id, jobNumber: prev.jobNumber } : null
	};
};

export const toDetail = (j: IJob): JobDetail => ({
	...toSummary(j),
	customerEmail: j.customerEmail,
	customerPhone: j.customerPhone,
	mileage: j.mileage ?? null,
	complaint: j.complaint,
	intakeNotes: j.intakeNotes,
	createdByName: j.createdByName ?? null,
	createdAt: j.createdAt
});

export const toStateChange = (c: IJobStateChange) => ({
	id: c.id,
	from: c.fromState ?? null,
	to: c.toState,
	reason: c.reason,
	actorName: c.actorName ?? null,
	at: c.at
});

export const toPhoto = (p: IJobPhoto) => ({
	imageId: p.imageId,
	url: imageUrl(p.imageId),
	addedByName: p.addedByName ?? null,
	addedAt: p.addedAt
});

const refuse = (message: string, field?: string): Result<never> => ({ ok: false, message, field });

function checkUploads(photos: readonly PhotoUpload[]): Result<never> | undefined {
	if (photos.length > MAX_PHOTOS_PER_UPLOAD)
		return refuse(`Add at most ${MAX_PHOTOS_PER_UPLOAD} photos at a time.`, 'photos');
	const big = photos.find((p) => p.bytes.byteLength > MAX_IMAGE_BYTES);
	if (big) return refuse(`${big.filename}: larger than ${MAX_IMAGE_BYTES / 1024 / 1024} MB.`, 'photos');
}

/**
 * Stores each photo through the image pipeline (checked by content, metadata stripped); stops at the first refusal.
 * The cheap checks (empty, size, what the bytes are) run on every photo first, so one wrong file in a batch does
 * not leave the photos before it stored but unlinked.
 */
async function storePhotos(em: EntityManager, actor: Actor, photos: readonly PhotoUpload[]): Promise<Result<string[]>> {
	for (const photo of photos) {
		const format = sniffFormat(photo.bytes);
		if (
			photo.bytes.length === 0 ||
			photo.bytes.length > MAX_IMAGE_BYTES ||
			!['jpeg', 'png', 'webp', 'avif'].includes(format)
		) {
			const why =
				photo.bytes.length > MAX_IMAGE_BYTES
					? TOO_LARGE
					: format === 'svg'
						? SVG_REFUSED
						: format === 'heic'
							? HEIC_REFUSED
							: photo.bytes.length === 0
								? EMPTY
								: NOT_A_PHOTO;
			return refuse(`${photo.filename}: ${why}`, 'photos');
		}
	}
	const ids: string[] = [];
	for (const photo of photos) {
		const stored = await storeImage(em, actor, { bytes: photo.bytes, filename: photo.filename, purpose: 'intake' });
		if (!stored.ok) return refuse(`${photo.filename}: ${stored.message}`, 'photos');
		ids.push(stored.value.id);
	}
	return { ok: true, value: ids };
}

/**
 * Opens a work order at intake: a new job number from the sequence, the first state (received) recorded, and a
 * link to the latest earlier job on the same serial, so a comeback shows as one unit's history.
 */
export async function openJob(
	em: EntityManager,
	actor: Actor,
	input: JobInput,
	photos: readonly PhotoUpload[] = [],
	now: Date = new Date()
): Promise<Result<{ id: string; jobNumber: string }>> {
	if (input.receivedOn > isoDate(now)) return refuse('The date received cannot be in the future.', 'receivedOn');
	const bad = checkUploads(photos);
	if (bad) return bad;
	const stored = await storePhotos(em, actor, photos);
	if (!stored.ok) return stored;

	const previous = await jobs.findLatestForSerial(em, input.unitSerial, input.receivedOn);
	const job = jobs.create(em, {
		jobNumber: await jobs.nextJobNumber(em, now),
		customerName: input.customerName,
		customerEmail: input.customerEmail,
		customerPhone: input.customerPhone,
		unitModel: input.unitModel,
		unitSerial: input.unitSerial.trim(),
		mileage: input.mileage ? Number(input.mileage) : null,
		complaint: input.complaint,
		faultCodes: parseFaultCodes(input.faultCodes),
		receivedOn: input.receivedOn,
		intakeNotes: input.intakeNotes,
		state: 'received',
		previousJob: previous,
		createdById: actor.id,
		createdByName: actor.name
	});
	jobs.recordStateChange(em, job, actor, { from: null, to: 'received', reason: 'Received at intake.' });
	for (const imageId of stored.value) jobs.addPhoto(em, job, imageId, actor);
	adminLog.append(em, actor, {
		action: 'job.opened',
		subjectType: 'job',
		subjectId: job.id,
		detail: {
			jobNumber: job.jobNumber,
			unitSerial: job.unitSerial,
			comebackOf: previous?.jobNumber ?? null,
			photos: stored.value
		}
	});
	await em.flush();
	return { ok: true, value: { id: job.id, jobNumber: job.jobNumber } };
}

/**
 * Moves a job to another state if the move is allowed (JOB_TRANSITIONS) and the person may make it (only quality
 * or admin release). The UPDATE is conditional on the state the person saw, so two people moving the same job at
 * once cannot both succeed; the change and its reason are appended to the job's history and the admin log.
 */
export async function changeState(
	em: EntityManager,
	actor: Actor & { roles: readonly RoleName[] },
	jobId: string,
	input: StateChangeInput
): Promise<Result<{ from: JobState; to: JobState }>> {
	const job = await jobs.findById(em, jobId);
	if (!job) return refuse('No such job.');
	const from = job.state;
	const to = input.to;
	if (!canMove(from, to))
		return refuse(
			`A job that is ${JOB_STATE_LABELS[from].toLowerCase()} cannot move to ${JOB_STATE_LABELS[to].toLowerCase()}.`,
			'to'
		);
	if (to === 'released' && !RELEASE_ROLES.some((r) => actor.roles.includes(r)))
		return refuse('Only a quality lead releases a unit.', 'to');
	return em.transactional(async (tx) => {
		const n = await tx.nativeUpdate(Job, { id: job.id, state: from }, { state: to, updatedAt: new Date() });
		if (n !== 1) return refuse('Someone else changed this job’s state meanwhile. Reload and try again.', 'to');
		const ref = tx.getReference(Job, job.id);
		jobs.recordStateChange(tx, ref, actor, { from, to, reason: input.reason });
		adminLog.append(tx, actor, {
			action: 'job.state_changed',
			subjectType: 'job',
			subjectId: job.id,
			detail: { jobNumber: job.jobNumber, from, to, reason: input.reason }
		});
		return { ok: true as const, value: { from, to } };
	});
}

/** Adds photos to an open job. */
export async function addPhotos(
	em: EntityManager,
	actor: Actor,
	jobId: string,
	photos: readonly PhotoUpload[]
): Promise<Result<{ added: number }>> {
	const job = await jobs.findById(em, jobId);
	if (!job) return refuse('No such job.');
	if (photos.length === 0) return refuse('Choose at least one photo.', 'photos');
	const bad = checkUploads(photos);
	if (bad) return bad;
	const stored = await storePhotos(em, actor, photos);
	if (!stored.ok) return stored;
	for (const imageId of stored.value) jobs.addPhoto(em, job, imageId, actor);
	adminLog.append(em, actor, {
		action: 'job.photos_added',
		subjectType: 'job',
		subjectId: job.id,
		detail: { jobNumber: job.jobNumber, photos: stored.value }
	});
	await em.flush();
	return { ok: true, value: { added: stored.value.length } };
}

/** The job, its history, photos and the other jobs on the same unit (earlier ones first). */
export async function jobDetail(em: EntityManager, id: string) {
	const job = await jobs.findById(em, id);
	if (!job) return undefined;
	await em.populate(job, ['previousJob']);
	const changes = await jobs.listStateChanges(em, job.id);
	const photos = await jobs.listPhotos(em, job.id);
	const unit = await jobs.listForSerial(em, job.unitSerial);
	return {
		job: toDetail(job),
		history: changes.map(toStateChange),
		photos: photos.map(toPhoto),
		unitJobs: unit.filter((j) => j.id !== job.id).map((j) => ({ ...toSummary(j), previousJob: null }))
	};
}
