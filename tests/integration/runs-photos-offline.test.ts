import { createHash } from 'node:crypto';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import type { IUser } from '../../src/lib/server/db/entities';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { makePerson } from '../factories/people';
import { makeRun, PIN, record, viewer } from '../factories/runs';
import { usePhotoWorld } from './support/photo-world';

// The services import `$lib/...`, which vitest resolves through the SvelteKit plugin.
const images = await import('../../src/lib/server/services/images.service');
const { storeTabletPhoto, photosOnTheirWay, METADATA_REFUSED } =
	await import('../../src/lib/server/services/tablet-photos.service');
const { releaseState } = await import('../../src/lib/server/services/release.service');
const { SVG_REFUSED } = await import('../../src/lib/server/images');

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');
/** What the tablet stores: a canvas re-encode, JPEG with no metadata (made here with sharp, which writes none). */
const tabletJpeg = async (seed: number) =>
	new Uint8Array(
		await sharp({ create: { width: 160 + seed, height: 120, channels: 3, background: { r: seed, g: 80, b: 120 } } })
			.jpeg()
			.toBuffer()
	);

describe('photos taken with the network down: declared in the record, uploaded after it', () => {
	const world = usePhotoWorld();
	const { submit } = world;
	const finding = (runId: string, tech: IUser, photos: string[], tabletPhotos?: unknown) =>
		record(runId, tech, 'finding', {
			...(tabletPhotos === undefined ? {} : { tabletPhotos }),
			stepIndex: 0,
			text: 'Scoring in the bore of piston 2 (invented test case).',
			photos
		});
	const put = (actor: IUser, runId: string, photoId: string, bytes: Uint8Array) =>
		storeTabletPhoto(world.orm.em.fork(), viewer(actor), { runId, photoId, bytes });

	/** A run with a finding that names one photo still on the tablet; its id, bytes and declared sha256. */
	async function runWithKeptPhoto() {
		const made = await makeRun(world.orm.em.fork());
		const bytes = await tabletJpeg(40);
		const photoId = uuidv7();
		const [answer] = await submit(made.tech, made.runId, [
			finding(made.runId, made.tech, [photoId], [{ id: photoId, sha256: sha256(bytes) }])
		]);
		return { ...made, bytes, photoId, answer };
	}

	it('accepts the record, stores the declared sha256 marked from the tablet, then stores exactly those bytes', async () => {
		const { tech, runId, bytes, photoId, answer } = await runWithKeptPhoto();
		expect(answer).toMatchObject({ status: 'accepted', seq: 1 });
		const [row] = await ledger.listForRun(world.orm.em.fork(), runId);
		expect((row.body as { photoHashes: unknown }).photoHashes).toEqual([
			{ id: photoId, sha256: sha256(bytes), from: 'tablet' }
		]);
		expect(await photosOnTheirWay(world.orm.em.fork(), [runId])).toEqual([
			{ photoId, recordSeq: 1, kind: 'finding', signer: 'Test Technician' }
		]);

		const stored = await put(tech, runId, photoId, bytes);
		expect(stored).toEqual({ ok: true, value: { status: 'stored', id: photoId, already: false } });
		// Read back through the bucket (readImage re-hashes it): the stored sha256 is the one the record signed.
		const back = await images.readImage(world.orm.em.fork(), photoId);
		expect(back?.sha256).toBe(sha256(bytes));
		expect(sha256(back!.body)).toBe(sha256(bytes));
		expect(await photosOnTheirWay(world.orm.em.fork(), [runId])).toEqual([]);
		// Idempotent: the same photo again is answered stored, nothing new is written.
		expect(await put(tech, runId, photoId, bytes)).toMatchObject({ ok: true, value: { already: true } });
		// Once stored, a later record naming it must declare the stored hash if it declares one at all.
		const [mismatch] = await submit(tech, runId, [
			finding(runId, tech, [photoId], [{ id: photoId, sha256: 'a'.repeat(64) }])
		]);
		expect(mismatch.reason).toBe(`Photo ${photoId} is stored with another sha256 than the record declares for it.`);
		const [plain] = await submit(tech, runId, [finding(runId, tech, [photoId])]);
		expect(plain.status).toBe('accepted');
	});

	it('refuses wrong bytes, another run, an undeclared photo, an SVG and a photo carrying EXIF — each with its reason', async () => {
		const { tech, runId, bytes, photoId } = await runWithKeptPhoto();
		const other = await makeRun(world.orm.em.fork());
		const objectsBefore = (await world.s3.keys()).length;

		const wrong = await put(tech, runId, photoId, await tabletJpeg(41));
		expect(wrong).toMatchObject({ ok: false, status: 409 });
		expect(!wrong.ok && wrong.message).toMatch(
			/^These bytes are not the photo record #1 declared: their sha256 [0-9a-f]{64} differs/
		);

		// Declared in `runId`, sent to the other run (whose technician may send to it): nothing declares it there.
		const elsewhere = await put(other.tech, other.runId, photoId, bytes);
		expect(elsewhere).toMatchObject({ ok: false, status: 404 });
		expect(!elsewhere.ok && elsewhere.message).toMatch(/^No record of this run declares photo/);

		const undeclared = await put(tech, runId, uuidv7(), bytes);
		expect(undeclared).toMatchObject({ ok: false, status: 404 });

		// The other run's technician cannot send photos to a run that is not theirs.
		expect(await put(other.tech, runId, photoId, bytes)).toMatchObject({
			ok: false,
			status: 404,
			message: 'No such run.'
		});

		// An SVG and an EXIF-tagged JPEG, each declared with its own exact sha256 so only the content check can refuse.
		const svg = new TextEncoder().encode('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>');
		const exif = new Uint8Array(
			await sharp(await tabletJpeg(42))
				.withExif({ IFD0: { Make: 'Invented Camera Co', Model: 'Bench 1' } })
				.jpeg()
				.toBuffer()
		);
		expect((await sharp(exif).metadata()).exif).toBeDefined();
		const svgId = uuidv7();
		const exifId = uuidv7();
		const [declared] = await submit(tech, runId, [
			finding(
				runId,
				tech,
				[svgId, exifId],
				[
					{ id: svgId, sha256: sha256(svg) },
					{ id: exifId, sha256: sha256(exif) }
				]
			)
		]);
		expect(declared.status).toBe('accepted');
		expect(await put(tech, runId, svgId, svg)).toEqual({ ok: false, status: 415, message: SVG_REFUSED });
		expect(await put(tech, runId, exifId, exif)).toEqual({ ok: false, status: 415, message: METADATA_REFUSED });
		expect(await images.describeImage(world.orm.em.fork(), svgId)).toBeUndefined();
		expect(await images.describeImage(world.orm.em.fork(), exifId)).toBeUndefined();
		// Nothing refused reached the bucket (counted on the fake's disk, not through the API).
		expect(await world.s3.keys()).toHaveLength(objectsBefore);
	});

	it('keeps every existing refusal and checks the declaration itself', async () => {
		const { tech, runId } = await makeRun(world.orm.em.fork());
		const someone = await makePerson(world.orm.em.fork(), { roles: ['technician'], name: 'Other Technician' });
		const theirs = await images.storeImage(world.orm.em.fork(), someone, {
			bytes: await tabletJpeg(50),
			filename: 'x.jpg',
			purpose: 'finding'
		});
		if (!theirs.ok) throw new Error(theirs.message);
		const id = uuidv7();
		const answers = await submit(tech, runId, [
			finding(runId, tech, [id]), // not stored, not declared
			finding(runId, tech, [theirs.value.id]), // someone else's photo
			finding(runId, tech, [id], [{ id: uuidv7(), sha256: 'c'.repeat(64) }]), // declares a photo it does not name
			finding(runId, tech, [id], [{ id, sha256: 'NOT-HEX' }]),
			finding(runId, tech, [crypto.randomUUID()], [{ id: crypto.randomUUID(), sha256: 'd'.repeat(64) }]) // v4 id
		]);
		expect(answers.map((a) => a.status)).toEqual(['refused', 'refused', 'refused', 'refused', 'refused']);
		expect(answers[0].reason).toBe(`Photo ${id} is not stored here; take the photo again.`);
		expect(answers[1].reason).toBe(
			`Photo ${theirs.value.id} was not taken by Test Technician, so it cannot go in their record.`
		);
		expect(answers[2].reason).toMatch(/^body\.tabletPhotos: photo .* is declared but the record does not name it\.$/);
		expect(answers[3].reason).toBe('body.tabletPhotos.0.sha256: A tablet photo sha256 is 64 lower-case hex digits.');
		expect(answers[4].reason).toBe('body.tabletPhotos.0.id: A tablet photo id is a uuid v7.');
		expect(await ledger.listForRun(world.orm.em.fork(), runId)).toEqual([]);
	});

	it('refuses release while a declared photo is still on the tablet, and drops the reason once it arrives', async () => {
		const { tech, runId, bytes, photoId } = await runWithKeptPhoto();
		const quality = await makePerson(world.orm.em.fork(), { roles: ['quality'], pin: PIN, name: 'Test Quality Lead' });
		const reason = '1 photo is still on the tablet that took it: release once it has been synced.';
		expect((await releaseState(world.orm.em.fork(), viewer(quality), runId))?.reasons).toContain(reason);
		await put(tech, runId, photoId, bytes);
		expect((await releaseState(world.orm.em.fork(), viewer(quality), runId))?.reasons).not.toContain(reason);
	});
});
