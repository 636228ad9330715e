import { createHash } from 'node:crypto';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { verifyChain } from '../../src/lib/ledger/chain';
import type { IUser } from '../../src/lib/server/db/entities';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { makePerson } from '../factories/people';
import { FAMILY, makeRun, record } from '../factories/runs';
import { usePhotoWorld } from './support/photo-world';

// The services import `$lib/...`, which vitest resolves through the SvelteKit plugin.
const images = await import('../../src/lib/server/services/images.service');
const { entryContext } = await import('../../src/lib/server/services/run-entry-context');

// Invented for tests (not service data). Part numbers use Benchstamp's placeholder patterns (FORMAT.md §5 part):
// KL-4410-##@ is "KL-4410-", two digits, one letter.
const SOURCE = () => `---
title: Photo and part test ${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 6)}
family: ${FAMILY}
purpose: A procedure made by a test.
specs: Invented for tests; not service data.
---

## Fit the sensor

\`\`\`part new-sensor
number: KL-4410-##@
serial: PS########
\`\`\`

\`\`\`photo as-fitted
prompt: Photograph the fitted sensor.
min: 1
\`\`\`

## Check the magnet

\`\`\`confirm magnet-1
prompt: Magnet faces the sensor pocket.
photo: required
\`\`\`
`;

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');
const png = (seed: number) =>
	sharp({ create: { width: 64, height: 48, channels: 3, background: { r: seed, g: 90, b: 140 } } })
		.png()
		.toBuffer();

describe('run photos and part entries on the submit route', () => {
	const world = usePhotoWorld();
	const { submit } = world;
	async function upload(by: IUser, purpose: 'finding' | 'procedure' | 'intake' = 'finding', seed = 10) {
		const r = await images.storeImage(world.orm.em.fork(), by, {
			bytes: new Uint8Array(await png(seed)),
			filename: 'bench.png',
			purpose
		});
		if (!r.ok) throw new Error(r.message);
		return r.value.id;
	}
	const rows = async (runId: string) => (await ledger.listForRun(world.orm.em.fork(), runId)).map(ledger.toStored);

	it('writes the sha256 of each STORED photo into a finding raised on a step with no failed reading', async () => {
		const { tech, runId } = await makeRun(world.orm.em.fork(), { source: SOURCE() });
		const a = await upload(tech, 'finding', 20);
		const b = await upload(tech, 'finding', 30);
		const forgedHash = '0'.repeat(64);
		const sent = record(runId, tech, 'finding', {
			stepIndex: 1,
			text: 'Fine debris on the piston 1 magnet; nothing the checkpoints ask about.',
			photos: [a, b],
			sha256: forgedHash
		});
		const [answer] = await submit(tech, runId, [sent]);
		expect(answer).toMatchObject({ status: 'accepted', seq: 1 });

		const [row] = await rows(runId);
		const body = row.body as { photos: string[]; photoHashes: { id: string; sha256: string }[] };
		expect(body.photos).toEqual([a, b]);
		// Hash of the bytes in the bucket (through the API, re-checked by readImage), not anything the client sent.
		const stored = await Promise.all([a, b].map((id) => images.readImage(world.orm.em.fork(), id)));
		expect(body.photoHashes).toEqual([
			{ id: a, sha256: sha256(stored[0]!.body) },
			{ id: b, sha256: sha256(stored[1]!.body) }
		]);
		expect(body.photoHashes.map((h) => h.sha256)).not.toContain(forgedHash);
		expect(verifyChain([row])).toMatchObject({ ok: true });
	});

	it('refuses a record naming an unknown photo id, someone else’s photo, or a procedure picture', async () => {
		const { tech, lead, runId } = await makeRun(world.orm.em.fork(), { source: SOURCE() });
		const other = await makePerson(world.orm.em.fork(), { roles: ['technician'], name: 'Other Technician' });
		const othersPhoto = await upload(other, 'finding');
		const procedurePicture = await upload(lead, 'procedure');
		const finding = (photos: unknown) =>
			record(runId, tech, 'finding', { stepIndex: 0, text: 'Scoring in the bore.', photos });
		const unknown = crypto.randomUUID();
		const answers = await submit(tech, runId, [
			finding([unknown]),
			finding([othersPhoto]),
			finding(['../../etc/passwd']),
			record(runId, tech, 'finding', {
				stepIndex: 0,
				text: 'x',
				photos: [],
				photoHashes: [{ id: unknown, sha256: 'f'.repeat(64) }]
			})
		]);
		expect(answers.map((a) => a.status)).toEqual(['refused', 'refused', 'refused', 'refused']);
		expect(answers[0].reason).toBe(`Photo ${unknown} is not stored here; take the photo again.`);
		expect(answers[1].reason).toBe(
			`Photo ${othersPhoto} was not taken by Test Technician, so it cannot go in their record.`
		);
		expect(answers[2].reason).toMatch(/^body\.photos: A photo is named by the id the upload answered\./);
		expect(answers[3].reason).toBe('body.photoHashes is written by the server, not sent.');

		// The lead signs with a picture they uploaded for a procedure: wrong purpose.
		const [leadAnswer] = await submit(lead, runId, [
			record(runId, lead, 'finding', { stepIndex: 0, text: 'Scoring.', photos: [procedurePicture] })
		]);
		expect(leadAnswer.reason).toBe(
			`Photo ${procedurePicture} was uploaded for a procedure picture, not as a run photo.`
		);
		expect(await rows(runId)).toEqual([]);
	});

	it('checks checkpoint photos of a sign-off the same way and records their hashes', async () => {
		const { tech, runId } = await makeRun(world.orm.em.fork(), { source: SOURCE() });
		const photo = await upload(tech);
		const signoff = (photos: string[]) =>
			record(runId, tech, 'signoff', {
				stepIndex: 1,
				entries: [{ checkpointId: 'magnet-1', entry: { confirmed: true, photos }, claimed: 'pass' }]
			});
		const [refusedAnswer] = await submit(tech, runId, [signoff([crypto.randomUUID()])]);
		expect(refusedAnswer.status).toBe('refused');
		const [ok] = await submit(tech, runId, [signoff([photo])]);
		expect(ok.status).toBe('accepted');
		const [row] = await rows(runId);
		const body = row.body as { photoHashes: { id: string; sha256: string }[]; evaluation: { status: string }[] };
		const stored = await images.readImage(world.orm.em.fork(), photo);
		expect(body.photoHashes).toEqual([{ id: photo, sha256: stored!.sha256 }]);
		expect(body.evaluation[0].status).toBe('pass');
	});

	it('judges a part entry on the server: a part number off the pattern is a fail whatever the tablet claimed', async () => {
		const { tech, runId } = await makeRun(world.orm.em.fork(), { source: SOURCE() });
		const photo = await upload(tech);
		const attempt = (number: string, claimed: 'pass' | 'fail') =>
			record(runId, tech, 'attempt', {
				stepIndex: 0,
				entries: [
					{ checkpointId: 'new-sensor', entry: { number, serial: 'PS26110451' }, claimed },
					{ checkpointId: 'as-fitted', entry: { photos: [photo] }, claimed: 'pass' }
				]
			});
		// KL-4410-3CC has a letter where the pattern wants a digit (##@ = digit, digit, letter).
		const [answer] = await submit(tech, runId, [attempt('KL-4410-3CC', 'pass')]);
		expect(answer.status).toBe('accepted');
		expect(answer.findings).toHaveLength(1);
		const [row, finding] = await rows(runId);
		const evaluation = (row.body as { evaluation: { checkpointId: string; status: string; reasons: string[] }[] })
			.evaluation;
		expect(evaluation[0]).toMatchObject({ checkpointId: 'new-sensor', status: 'fail', claimed: 'pass' });
		expect(evaluation[0].reasons[0]).toMatch(/Part number "KL-4410-3CC" is not one this step accepts/);
		expect(finding.kind).toBe('finding');

		const [good] = await submit(tech, runId, [attempt('KL-4410-03C', 'pass')]);
		expect(good.status).toBe('accepted');
		expect(good.findings).toBeUndefined();
	});

	it('judges a clearance against the bore signed on an earlier step (from the ledger, not the tablet)', async () => {
		// Invented: bore 22 mm H7 (22.000–22.021) and shaft 22 mm f7 (21.959–21.980, ISO 286-2), clearance 0.020–0.070.
		const src = `---
title: Clearance across steps ${Date.now().toString(36)}
family: ${FAMILY}
purpose: Test.
specs: Invented for tests; not service data.
---

## Bore

\`\`\`measure bore-1
feature: bore
nominal: 22 mm
tolerance: H7
\`\`\`

## Shaft and clearance

\`\`\`measure piston-1
nominal: 22 mm
tolerance: f7
\`\`\`

\`\`\`clearance fit-1
bore: bore-1
shaft: piston-1
limits: 0.020 to 0.070 mm
\`\`\`
`;
		const { tech, runId } = await makeRun(world.orm.em.fork(), { source: src });
		const step2 = (shaft: string) =>
			record(runId, tech, 'signoff', {
				stepIndex: 1,
				entries: [
					{ checkpointId: 'piston-1', entry: { readings: [shaft] } },
					{ checkpointId: 'fit-1', entry: {} }
				]
			});
		const [early] = await submit(tech, runId, [step2('21.970')]);
		expect(early.reason).toMatch(/fit-1 is incomplete \(Record every reading of bore-1 \(bore\) first\.\)/);
		const [bore] = await submit(tech, runId, [
			record(runId, tech, 'signoff', {
				stepIndex: 0,
				entries: [{ checkpointId: 'bore-1', entry: { readings: ['22.010'] } }]
			})
		]);
		expect(bore.status).toBe('accepted');
		const [ok] = await submit(tech, runId, [step2('21.970')]);
		expect(ok.status).toBe('accepted');
		const body = (await rows(runId))[1].body as {
			evaluation: { checkpointId: string; readings: { value: string }[] }[];
		};
		// 22.010 − 21.970 = 0.040 mm both ways (one reading each).
		expect(body.evaluation[1].readings.map((r) => r.value)).toEqual(['0.04', '0.04']);
	});

	it('offers the lots in the parts register that fit a part checkpoint, and the usable torque wrenches', async () => {
		const { version } = await makeRun(world.orm.em.fork(), { source: SOURCE() });
		const em = world.orm.em.fork();
		const parts = await import('../../src/lib/server/repositories/parts');
		const stamp = Date.now().toString().slice(-2);
		const part = parts.createPart(em, {
			partNumber: `KL-4410-${stamp}Z`,
			description: 'Test sensor (invented)',
			category: 'sensor',
			unit: 'ea'
		});
		const who = { id: (await makePerson(em, { roles: ['lead'] })).id, name: 'Test Lead' };
		const lot = (lotNumber: string) =>
			parts.createLot(em, part, who, {
				lotNumber,
				serialised: true,
				quantity: '1',
				receivedOn: '2026-11-20',
				supplier: 'Test'
			});
		lot('PS99000001');
		lot('XX-not-a-serial');
		await em.flush();
		const ctx = await entryContext(world.orm.em.fork(), version.model);
		const offered = ctx.lots['new-sensor'].filter((l) => l.partNumber === part.partNumber).map((l) => l.lotNumber);
		expect(offered).toEqual(['PS99000001']);
	});
});
