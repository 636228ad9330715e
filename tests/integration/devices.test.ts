import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../../scripts/lib/postgres';
import type { IUser } from '../../src/lib/server/db/entities';
import * as adminLog from '../../src/lib/server/repositories/admin-log';
import * as held from '../../src/lib/server/repositories/held-records';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { enrol, list, revoke } from '../../src/lib/server/services/devices.service';
import { publicJwkSchema } from '../../src/lib/devices/schema';
import { makeKeys, makeTablet, signWith } from '../factories/devices';
import { makePerson } from '../factories/people';
import { boreAttempt, makeRun, record, submitAs } from '../factories/runs';
import { testDbUrls } from './db-urls';
import { migratedAppOrm } from './support/orm';

describe('enrolled tablets and device signatures', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	const submit = (actor: IUser, runId: string, records: unknown[]) => submitAs(orm, actor, runId, records);
	const bodyOf = async (id: string) => (await ledger.findById(orm.em.fork(), id))?.body as Record<string, unknown>;

	it('stores a record signed by an enrolled tablet, stamped verified with the key thumbprint', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const sent = await tablet.sign({ ...record(runId, tech, 'signoff', boreAttempt('22.010')), signedAt: Date.now() });
		const [answer] = await submit(tech, runId, [sent]);
		expect(answer).toMatchObject({ id: sent.id, status: 'accepted', seq: 1 });
		expect((await bodyOf(sent.id)).deviceSignature).toEqual({
			status: 'verified',
			deviceId: tablet.device.id,
			keyThumbprint: tablet.device.keyThumbprint
		});
		expect(await held.countForRun(orm.em.fork(), runId)).toBe(0);
	});

	it('refuses and holds a record whose body was changed after signing', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const signed = await tablet.sign(record(runId, tech, 'signoff', boreAttempt('22.050')));
		const tampered = { ...signed, body: boreAttempt('22.010') };
		const [answer] = await submit(tech, runId, [tampered]);
		expect(answer.status).toBe('refused');
		expect(answer.reason).toMatch(/device signature does not match this record.*held for the quality lead/);
		expect(await ledger.findById(orm.em.fork(), signed.id)).toBeNull();
		const [h] = await held.list(orm.em.fork(), { runId });
		expect(h.held).toMatchObject({ recordId: signed.id, reason: 'bad_signature', deviceId: tablet.device.id });
		// Held exactly as sent: the tampered reading, not the signed one.
		expect((h.held.submission as { body: unknown }).body).toEqual(boreAttempt('22.010'));
	});

	it('refuses and holds a record signed with another key than the enrolled one', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const r = { ...record(runId, tech, 'signoff', boreAttempt('22.010')), deviceId: tablet.device.id };
		const forged = { ...r, signature: { deviceId: tablet.device.id, value: await signWith(await makeKeys(), r) } };
		const [answer] = await submit(tech, runId, [forged]);
		expect(answer).toMatchObject({ status: 'refused' });
		expect(await held.countForRun(orm.em.fork(), runId)).toBe(1);
	});

	it('refuses and holds an enrolled tablet’s record without a signature, and a signature from an unknown tablet', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const unsigned = { ...record(runId, tech, 'attempt', boreAttempt('22.010')), deviceId: tablet.device.id };
		const stranger = { ...record(runId, tech, 'attempt', boreAttempt('22.010')), deviceId: crypto.randomUUID() };
		const strangerSigned = {
			...stranger,
			signature: { deviceId: stranger.deviceId, value: await signWith(await makeKeys(), stranger) }
		};
		const answers = await submit(tech, runId, [unsigned, strangerSigned]);
		expect(answers.map((a) => a.status)).toEqual(['refused', 'refused']);
		expect(answers[0].reason).toMatch(/must carry its device signature/);
		const rows = await held.list(orm.em.fork(), { runId });
		expect(rows.map((r) => r.held.reason).sort()).toEqual(['bad_signature', 'unknown_device']);
	});

	it('accepts an unsigned record from a browser that is no enrolled tablet when sent online, stamped unsigned; refuses one marked offline', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const online = { ...record(runId, tech, 'attempt', boreAttempt('22.010')), deviceId: 'tablet-browser-1' };
		const offline = {
			...record(runId, tech, 'attempt', boreAttempt('22.010')),
			deviceId: 'tablet-browser-1',
			signedOffline: true
		};
		const [a, b] = await submit(tech, runId, [online, offline]);
		expect(a.status).toBe('accepted');
		expect((await bodyOf(online.id)).deviceSignature).toEqual({ status: 'unsigned', deviceId: 'tablet-browser-1' });
		expect(b.status).toBe('refused');
		expect(b.reason).toMatch(/signed offline must carry/);
	});

	it('a client cannot claim a verified stamp itself: the server overwrites deviceSignature', async () => {
		const { tech, runId } = await makeRun(orm.em.fork());
		const body = { ...boreAttempt('22.010'), deviceSignature: { status: 'verified', deviceId: 'x' } };
		const [a] = await submit(tech, runId, [record(runId, tech, 'attempt', body)]);
		expect(a.status).toBe('accepted');
		expect((await bodyOf(a.id)).deviceSignature).toMatchObject({ status: 'unsigned' });
	});

	it('refuses and holds a revoked tablet’s records even when correctly signed; a resend holds nothing twice', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead, 'Bench 5 tablet');
		const before = await tablet.sign(record(runId, tech, 'attempt', boreAttempt('22.010')));
		expect((await submit(tech, runId, [before]))[0].status).toBe('accepted');

		const revoked = await revoke(orm.em.fork(), lead, { deviceId: tablet.device.id, reason: 'Lost on the shop floor' });
		expect(revoked).toMatchObject({
			ok: true,
			value: { revoked: { by: lead.name, reason: 'Lost on the shop floor' } }
		});
		const log = await adminLog.forSubject(orm.em.fork(), 'device.revoked', 'device', tablet.device.id);
		expect(log).toHaveLength(1);

		const after = await tablet.sign(record(runId, tech, 'signoff', boreAttempt('22.010')));
		const [a] = await submit(tech, runId, [after]);
		expect(a.status).toBe('refused');
		expect(a.reason).toMatch(/Tablet “Bench 5 tablet” was revoked on \d{4}-\d{2}-\d{2}/);
		await submit(tech, runId, [after]);
		const rows = await held.list(orm.em.fork(), { runId });
		expect(rows).toHaveLength(1);
		expect(rows[0].held).toMatchObject({ recordId: after.id, reason: 'device_revoked', signerId: tech.id });
		// The record accepted before the revocation is still a duplicate on resend, not held.
		expect((await submit(tech, runId, [before]))[0].status).toBe('duplicate');
		expect(await held.countForRun(orm.em.fork(), runId)).toBe(1);
		expect(await revoke(orm.em.fork(), lead, { deviceId: tablet.device.id, reason: 'again' })).toMatchObject({
			ok: false,
			status: 409
		});
	});

	it('lets only a lead enrol or revoke; lists tablets for anyone the route allows', async () => {
		const { lead } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const jwk = await crypto.subtle.exportKey('jwk', (await makeKeys()).publicKey);
		const publicKey = publicJwkSchema.parse(jwk);
		for (const roles of [['technician'], ['quality'], ['admin']] as const) {
			const someone = await makePerson(orm.em.fork(), { roles: [...roles] });
			expect(await enrol(orm.em.fork(), someone, { label: 'Nope', publicKey })).toMatchObject({
				ok: false,
				status: 403
			});
			expect(await revoke(orm.em.fork(), someone, { deviceId: tablet.device.id, reason: 'nope' })).toMatchObject({
				ok: false,
				status: 403
			});
		}
		const enrolled = await enrol(orm.em.fork(), lead, { label: 'Bench 6 tablet', publicKey });
		expect(enrolled.ok).toBe(true);
		expect(await enrol(orm.em.fork(), lead, { label: 'Same key', publicKey })).toMatchObject({
			ok: false,
			status: 409
		});
		const all = await list(orm.em.fork());
		expect(all.map((d) => d.id)).toEqual(expect.arrayContaining([tablet.device.id]));
		expect(all.findIndex((d) => d.revoked)).not.toBe(0);
	});

	it('refuses a private key and a point off the curve at enrolment', async () => {
		const { lead } = await makeRun(orm.em.fork());
		const pair = await crypto.subtle.generateKey({ name: 'ECDSA', namedCurve: 'P-256' }, true, ['sign']);
		const priv = await crypto.subtle.exportKey('jwk', pair.privateKey);
		expect(publicJwkSchema.safeParse(priv).error?.issues[0].message).toMatch(/private key never leaves the tablet/);
		const offCurve = { kty: 'EC' as const, crv: 'P-256' as const, x: 'A'.repeat(43), y: 'A'.repeat(43) };
		expect(await enrol(orm.em.fork(), lead, { label: 'Bad', publicKey: offCurve })).toMatchObject({
			ok: false,
			status: 400
		});
	});
});

describe('held records queue', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	it('holds idempotently, counts open ones per run, records one resolution with an admin-log entry', async () => {
		const { runId, tech } = await makeRun(orm.em.fork());
		const q = await makePerson(orm.em.fork(), { roles: ['quality'], name: 'Test Quality Lead' });
		const submission = { id: 'rec-1', runId, kind: 'signoff', body: { stepIndex: 0 } };
		const input = { recordId: 'rec-1', runId, submission, reason: 'after_release' as const, message: 'Run released.' };
		const first = await held.hold(orm.em.fork(), tech, input);
		const again = await held.hold(orm.em.fork(), tech, {
			...input,
			submission: { body: { stepIndex: 0 }, kind: 'signoff', runId, id: 'rec-1' }
		});
		expect(first.held).toBe(true);
		expect(again).toEqual({ held: false, id: first.id });
		const other = await held.hold(orm.em.fork(), null, {
			...input,
			recordId: 'rec-2',
			submission: { ...submission, id: 'rec-2' }
		});
		expect(await held.countForRun(orm.em.fork(), runId)).toBe(2);
		expect(await adminLog.forSubject(orm.em.fork(), 'record.held', 'held_record', first.id)).toHaveLength(1);

		const em = orm.em.fork();
		held.resolve(em, q, (await held.findById(em, first.id))!, 'dismissed', 'Duplicate of a record already stored.');
		await em.flush();
		expect(await held.countForRun(orm.em.fork(), runId)).toBe(1);
		expect(await held.countForRun(orm.em.fork(), runId, { includeResolved: true })).toBe(2);
		const open = await held.list(orm.em.fork(), { open: true, runId });
		expect(open.map((o) => o.held.id)).toEqual([other.id]);

		const em2 = orm.em.fork();
		held.resolve(em2, q, (await held.findById(em2, first.id))!, 'dealt_with', 'Second decision.');
		await expect(em2.flush()).rejects.toThrow(/unique/);
	});

	it('is append-only: the app role cannot change or delete a held record, the owner neither', async () => {
		const { runId } = await makeRun(orm.em.fork());
		const h = await held.hold(orm.em.fork(), null, {
			recordId: 'rec-x',
			runId,
			submission: { id: 'rec-x' },
			reason: 'other',
			message: 'Test.'
		});
		await withClient(testDbUrls().appUrl, async (c) => {
			await expect(c.query(`update held_record set message = 'x' where id = $1`, [h.id])).rejects.toThrow(
				/permission denied/
			);
			await expect(c.query(`delete from held_record where id = $1`, [h.id])).rejects.toThrow(/permission denied/);
			await expect(c.query(`delete from held_record_resolution`)).rejects.toThrow(/permission denied/);
		});
		await withClient(testDbUrls().ownerUrl, async (c) => {
			await expect(c.query(`update held_record set message = 'x' where id = $1`, [h.id])).rejects.toThrow(
				/append-only/
			);
			await expect(c.query(`truncate held_record_resolution`)).rejects.toThrow(/append-only/);
		});
	});
});
