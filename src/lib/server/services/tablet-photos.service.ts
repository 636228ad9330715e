/**
 * Photos offline (issue 7): a photo taken on a tablet with the network down goes up AFTER its record, through
 * `PUT /api/runs/:id/photos/:photoId`. It is stored only when an accepted record of that run declared it in
 * `body.tabletPhotos` with the sha256 of exactly these bytes, so nothing can be swapped in after signing. The bytes
 * are stored verbatim (the tablet's re-encode already dropped the metadata, and a second re-encode would change the
 * hash the record signed); content, size, pixels and the absence of EXIF/XMP/IPTC are checked first.
 */
import { createHash, randomBytes } from 'node:crypto';
import { UniqueConstraintViolationException } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import sharp, { type Metadata } from 'sharp';
import { isUuidV7 } from '../../ledger/uuid-v7';
import * as adminLog from '../repositories/admin-log';
import * as images from '../repositories/images';
import * as runs from '../repositories/runs';
import * as tabletPhotos from '../repositories/tablet-photos';
import {
	DAMAGED,
	EMPTY,
	HEIC_REFUSED,
	MAX_EDGE_PX,
	MAX_IMAGE_BYTES,
	MAX_INPUT_PIXELS,
	NOT_A_PHOTO,
	SVG_REFUSED,
	TOO_LARGE,
	TOO_MANY_PIXELS,
	sniffFormat
} from '../images';
import { objectStore } from '../storage';
import { RUN_PHOTO_PURPOSE } from './run-photos';
import { maySee, SUBMIT_ROLES, type Viewer } from './runs.service';

/** Who may send a tablet's photo: whoever may send that run's records (a technician only on their own runs). */
export const TABLET_PHOTO_ROLES = SUBMIT_ROLES;

export const METADATA_REFUSED =
	'This photo carries EXIF, XMP or IPTC metadata (camera, time, perhaps GPS). Photos from the tablet are re-encoded without it, so this is not the copy the record declared.';

export type TabletPhotoResult =
	| { ok: true; value: { status: 'stored'; id: string; already: boolean } }
	| { ok: false; status: 400 | 403 | 404 | 409 | 413 | 415; message: string };

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');
const refuse = (status: Refusal['status'], message: string): Refusal => ({
	ok: false,
	status,
	message
});
const TYPES = { jpeg: ['image/jpeg', 'jpg'], png: ['image/png', 'png'], webp: ['image/webp', 'webp'] } as const;

type Refusal = Extract<TabletPhotoResult, { ok: false }>;
type Checked = { ok: true; format: keyof typeof TYPES; width: number; height: number } | Refusal;

/** Content checks on the raw bytes: signature, decoder agreement, pixel limits, a full decode, no metadata. */
export async function checkTabletBytes(bytes: Uint8Array): Promise<Checked> {
	if (bytes.byteLength === 0) return refuse(400, EMPTY);
	if (bytes.byteLength > MAX_IMAGE_BYTES) return refuse(413, TOO_LARGE);
	const format = sniffFormat(bytes);
	if (format === 'svg') return refuse(415, SVG_REFUSED);
	if (format === 'heic') return refuse(415, HEIC_REFUSED);
	if (format !== 'jpeg' && format !== 'png' && format !== 'webp') return refuse(415, NOT_A_PHOTO);
	const open = () => sharp(bytes, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'error', pages: 1 });
	let meta: Metadata;
	try {
		meta = await open().metadata();
	} catch (e) {
		return e instanceof Error && /pixel limit/i.test(e.message) ? refuse(413, TOO_MANY_PIXELS) : refuse(400, DAMAGED);
	}
	if (meta.format !== format) return refuse(415, NOT_A_PHOTO);
	const width = meta.width ?? 0;
	const height = meta.height ?? 0;
	if (Math.max(width, height) > MAX_EDGE_PX)
		return refuse(
			413,
			`This photo is ${width}×${height} px; a photo from the tablet is at most ${MAX_EDGE_PX} px on its long edge.`
		);
	if (meta.exif || meta.xmp || meta.iptc) return refuse(415, METADATA_REFUSED);
	try {
		await open().timeout({ seconds: 20 }).stats(); // decodes every pixel: a truncated file is refused here
	} catch {
		return refuse(400, DAMAGED);
	}
	return { ok: true, format, width, height };
}

/**
 * Stores one photo a record of `runId` declared. Idempotent: the same bytes again answer `stored` (`already`).
 * Refusals touch neither bucket nor database; the object is removed again if the row cannot be written.
 */
export async function storeTabletPhoto(
	em: EntityManager,
	actor: Viewer,
	input: { runId: string; photoId: string; bytes: Uint8Array }
): Promise<TabletPhotoResult> {
	if (!actor.roles.some((r) => TABLET_PHOTO_ROLES.includes(r)))
		return refuse(403, 'Sending a run photo is for the people who sign runs.');
	const run = await runs.findById(em, input.runId);
	if (!run || !(await maySee(em, actor, run))) return refuse(404, 'No such run.');
	if (!isUuidV7(input.photoId)) return refuse(404, 'A photo from the tablet is named by its uuid v7.');
	const declared = await tabletPhotos.declarationsOf(em, run.id, input.photoId);
	if (declared.length === 0)
		return refuse(
			404,
			`No record of this run declares photo ${input.photoId}: send its record first (a photo goes up after the record that names it).`
		);
	const checked = await checkTabletBytes(input.bytes);
	if (!checked.ok) return checked;
	const hash = sha256(input.bytes);
	const match = declared.find((d) => d.sha256 === hash);
	if (!match)
		return refuse(
			409,
			`These bytes are not the photo record #${declared[0].seq} declared: their sha256 ${hash} differs from the signed ${declared[0].sha256}.`
		);

	const existing = await images.findById(em, input.photoId);
	if (existing) return sameOrConflict(existing.sha256, hash, input.photoId);
	if (!match.signerId) return refuse(409, `Record #${match.seq} has no signer to own photo ${input.photoId}.`);

	const [contentType, ext] = TYPES[checked.format];
	const storageKey = `images/${randomBytes(16).toString('hex')}.${ext}`;
	const store = objectStore();
	await store.put(storageKey, input.bytes, contentType);
	const fork = em.fork({ clear: true });
	try {
		images.create(fork, {
			id: input.photoId,
			storageKey,
			contentType,
			byteSize: input.bytes.byteLength,
			width: checked.width,
			height: checked.height,
			sha256: hash,
			purpose: RUN_PHOTO_PURPOSE,
			originalName: 'photo from the tablet',
			uploadedById: match.signerId
		});
		adminLog.append(fork, actor, {
			action: 'image.uploaded',
			subjectType: 'image',
			subjectId: input.photoId,
			detail: {
				purpose: RUN_PHOTO_PURPOSE,
				bytes: input.bytes.byteLength,
				width: checked.width,
				height: checked.height,
				from: 'tablet',
				runId: run.id,
				recordId: match.recordId
			}
		});
		await fork.flush();
	} catch (e) {
		await store.delete(storageKey).catch(() => {});
		if (!(e instanceof UniqueConstraintViolationException)) throw e;
		// Two sends at once: the other one stored it first.
		const row = await images.findById(em.fork({ clear: true }), input.photoId);
		if (!row) throw e;
		return sameOrConflict(row.sha256, hash, input.photoId);
	}
	return { ok: true, value: { status: 'stored', id: input.photoId, already: false } };
}

function sameOrConflict(stored: string, hash: string, id: string): TabletPhotoResult {
	if (stored === hash) return { ok: true, value: { status: 'stored', id, already: true } };
	return refuse(409, `Photo ${id} is already stored with other bytes; it is not replaced.`);
}

/** What the quality run record shows for a declared photo that has not arrived. */
export interface PhotoOnItsWay {
	photoId: string;
	recordSeq: number;
	kind: string;
	signer: string | null;
}

/** Declared photos of these runs not stored yet, each once (the first record that declared it). */
export async function photosOnTheirWay(em: EntityManager, runIds: readonly string[]): Promise<PhotoOnItsWay[]> {
	const seen = new Set<string>();
	const out: PhotoOnItsWay[] = [];
	for (const p of await tabletPhotos.pendingForRuns(em, runIds)) {
		if (seen.has(p.photoId)) continue;
		seen.add(p.photoId);
		out.push({ photoId: p.photoId, recordSeq: p.seq, kind: p.kind, signer: p.signerName });
	}
	return out;
}
