/**
 * Photos named by a run record (a finding's `photos`, a confirm or photo checkpoint's `entry.photos`). The server
 * checks each one and writes `photoHashes` into the hashed body itself: the sha256 of the STORED object, re-read
 * from the bucket (`readImage` re-checks it against its row), never a hash the tablet sent.
 *
 * A record is refused when it names a picture that does not exist, was uploaded by someone other than its signer,
 * or was uploaded for another purpose than a run photo (`RUN_PHOTO_PURPOSE`).
 *
 * Photos offline (issue 7): a photo taken with the network down is still on the tablet when its record is sent. The
 * record then declares it in `body.tabletPhotos = [{ id, sha256 }]` (uuid v7 id, sha256 of the shrunk bytes); the
 * server writes that declared sha256 into `photoHashes` marked `from: 'tablet'`, and `PUT /api/runs/:id/photos/:photoId`
 * later stores only bytes with exactly that hash (tablet-photos.service.ts). A declaration for a photo that IS stored
 * must match the stored hash.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import type { JsonValue } from '../../ledger/jcs';
import type { IUser } from '../db/entities';
import * as images from '../repositories/images';
import { readImage, type ImagePurpose } from './images.service';

/** Photos taken on the bench during a run (findings and checkpoints alike) are uploaded for this purpose. */
export const RUN_PHOTO_PURPOSE: ImagePurpose = 'finding';
/** The body key only the server writes: `[{ id, sha256 }]` in the order the photos are named. */
export const PHOTO_HASHES_KEY = 'photoHashes';
/** Most photos one record may name. */
export const MAX_PHOTOS_PER_RECORD = 24;
/** The body key a tablet writes for photos it still holds: `[{ id, sha256 }]` (inside the hashed body). */
export const TABLET_PHOTOS_KEY = 'tabletPhotos';

/** A declared photo on the tablet: uuid v7 id (made there) and the lower-case hex sha256 of its bytes. */
export const tabletPhotosSchema = z
	.array(
		z.strictObject({
			id: z
				.string()
				.regex(
					/^[0-9a-f]{8}-[0-9a-f]{4}-7[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/,
					'A tablet photo id is a uuid v7.'
				),
			sha256: z.string().regex(/^[0-9a-f]{64}$/, 'A tablet photo sha256 is 64 lower-case hex digits.')
		})
	)
	.max(MAX_PHOTOS_PER_RECORD, `A record declares at most ${MAX_PHOTOS_PER_RECORD} tablet photos.`);
export type TabletPhoto = z.infer<typeof tabletPhotosSchema>[number];

const idsSchema = z
	.array(z.uuid({ error: 'A photo is named by the id the upload answered.' }))
	.max(MAX_PHOTOS_PER_RECORD, `A record names at most ${MAX_PHOTOS_PER_RECORD} photos.`);

type Named = { ok: true; ids: string[] } | { ok: false; reason: string };

/** The photo ids a record body names, in order, each once. */
export function namedPhotos(kind: string, body: unknown): Named {
	const b = (body ?? {}) as { photos?: unknown; entries?: unknown };
	const lists: { path: string; value: unknown }[] = [];
	if (kind === 'finding' && b.photos !== undefined) lists.push({ path: 'body.photos', value: b.photos });
	if ((kind === 'attempt' || kind === 'signoff') && Array.isArray(b.entries))
		b.entries.forEach((e, i) => {
			const photos = (e as { entry?: { photos?: unknown } } | null)?.entry?.photos;
			if (photos !== undefined) lists.push({ path: `body.entries.${i}.entry.photos`, value: photos });
		});
	const ids: string[] = [];
	for (const { path, value } of lists) {
		const parsed = idsSchema.safeParse(value);
		if (!parsed.success) return { ok: false, reason: `${path}: ${parsed.error.issues[0].message}` };
		for (const id of parsed.data) if (!ids.includes(id)) ids.push(id);
	}
	if (ids.length > MAX_PHOTOS_PER_RECORD)
		return { ok: false, reason: `A record names at most ${MAX_PHOTOS_PER_RECORD} photos.` };
	return { ok: true, ids };
}

/** `photoHashes` entry: from the stored object, or (`from: 'tablet'`) the hash the tablet declared for a photo on its way. */
export type PhotoHash = { id: string; sha256: string; from?: 'tablet' };
export type PhotoCheck = { ok: true; hashes: PhotoHash[] } | { ok: false; reason: string };

type Declared = { ok: true; byId: Map<string, string> } | { ok: false; reason: string };

/** The body's `tabletPhotos`, checked: well formed, each id once, and only ids the record names. */
export function declaredTabletPhotos(body: unknown, named: readonly string[]): Declared {
	const value = (body as Record<string, unknown> | null)?.[TABLET_PHOTOS_KEY];
	const byId = new Map<string, string>();
	if (value === undefined) return { ok: true, byId };
	const parsed = tabletPhotosSchema.safeParse(value);
	if (!parsed.success) {
		const i = parsed.error.issues[0];
		const path = [TABLET_PHOTOS_KEY, ...i.path.map(String)].join('.');
		return { ok: false, reason: `body.${path}: ${i.message}` };
	}
	for (const { id, sha256 } of parsed.data) {
		if (byId.has(id)) return { ok: false, reason: `body.${TABLET_PHOTOS_KEY}: photo ${id} is declared twice.` };
		if (!named.includes(id))
			return {
				ok: false,
				reason: `body.${TABLET_PHOTOS_KEY}: photo ${id} is declared but the record does not name it.`
			};
		byId.set(id, sha256);
	}
	return { ok: true, byId };
}

/** Checks every photo a record names against storage and its signer; answers the stored sha256 of each. */
export async function checkRecordPhotos(
	em: EntityManager,
	kind: string,
	body: unknown,
	signer: Pick<IUser, 'id' | 'name'>
): Promise<PhotoCheck> {
	if (body && typeof body === 'object' && PHOTO_HASHES_KEY in body)
		return { ok: false, reason: `body.${PHOTO_HASHES_KEY} is written by the server, not sent.` };
	const named = namedPhotos(kind, body);
	if (!named.ok) return named;
	const declared = declaredTabletPhotos(body, named.ids);
	if (!declared.ok) return declared;
	const hashes: PhotoHash[] = [];
	for (const id of named.ids) {
		const row = await images.findById(em, id);
		const by = (row?.uploadedBy as unknown as { id: string } | undefined)?.id;
		const onTablet = declared.byId.get(id);
		if (!row && onTablet) {
			hashes.push({ id, sha256: onTablet, from: 'tablet' });
			continue;
		}
		if (!row) return { ok: false, reason: `Photo ${id} is not stored here; take the photo again.` };
		if (by !== signer.id)
			return { ok: false, reason: `Photo ${id} was not taken by ${signer.name}, so it cannot go in their record.` };
		if (row.purpose !== RUN_PHOTO_PURPOSE)
			return { ok: false, reason: `Photo ${id} was uploaded for a ${row.purpose} picture, not as a run photo.` };
		let stored: Awaited<ReturnType<typeof readImage>>;
		try {
			stored = await readImage(em, id);
		} catch {
			stored = undefined;
		}
		if (!stored) return { ok: false, reason: `Photo ${id} cannot be read back from storage; take it again.` };
		if (onTablet && onTablet !== stored.sha256)
			return { ok: false, reason: `Photo ${id} is stored with another sha256 than the record declares for it.` };
		hashes.push({ id, sha256: stored.sha256 });
	}
	return { ok: true, hashes };
}

/**
 * The submit service's hook: for a record about to be appended, checks its photos and adds the server-written
 * hashes to what the server puts in the body; a bad photo turns the record into a refusal.
 */
export async function withRecordPhotos<
	P extends
		| { kind: 'answer' }
		| {
				kind: 'append';
				s: { id: string; kind: string; body: unknown };
				signer: IUser;
				extra: Record<string, JsonValue>;
		  }
>(
	em: EntityManager,
	prepared: P
): Promise<P | { kind: 'answer'; answer: { id: string; status: 'refused'; reason: string } }> {
	if (prepared.kind !== 'append') return prepared;
	const p = prepared as Extract<P, { kind: 'append' }>;
	const check = await checkRecordPhotos(em, p.s.kind, p.s.body, p.signer);
	if (!check.ok) return { kind: 'answer', answer: { id: p.s.id, status: 'refused', reason: check.reason } };
	if (check.hashes.length === 0) return prepared;
	return { ...p, extra: { ...p.extra, [PHOTO_HASHES_KEY]: check.hashes } } as P;
}
