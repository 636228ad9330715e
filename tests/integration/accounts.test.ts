import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AdminLog, OneTimeToken } from '../../src/lib/server/db/entities';
import { createSignInLimits } from '../../src/lib/server/sign-in-limits';
import * as tokens from '../../src/lib/server/repositories/one-time-tokens';
import { verifySecret } from '../../src/lib/server/passwords';
import { newLinkToken } from '../../src/lib/server/tokens';
import { makePerson } from '../factories/people';
import { migratedAppOrm } from './support/orm';

// The services import `$lib/...`, which vitest resolves through the SvelteKit plugin.
const accounts = await import('../../src/lib/server/services/accounts.service');

describe('accounts on PostgreSQL', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	it('verifies the right bench PIN and rejects a wrong or malformed one', async () => {
		const person = await makePerson(orm.em.fork(), { pin: '246813' });
		const em = orm.em.fork();
		expect(await accounts.verifyPin(em, person.id, '246813')).toBe(true);
		expect(await accounts.verifyPin(em, person.id, '246814')).toBe(false);
		expect(await accounts.verifyPin(em, person.id, '24681')).toBe(false);
		expect(await accounts.verifyPin(em, person.id, '246813 ')).toBe(false);
	});

	it('stores PINs and passwords only as argon2id hashes', async () => {
		const person = await makePerson(orm.em.fork(), { pin: '135790', password: 'correct horse' });
		expect(person.pinHash).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/);
		expect(person.pinHash).not.toContain('135790');
		expect(await verifySecret(person.passwordHash, 'correct horse')).toBe(true);
	});

	it('refuses a PIN for a deactivated person', async () => {
		const person = await makePerson(orm.em.fork(), { pin: '975310', active: false });
		expect(await accounts.verifyPin(orm.em.fork(), person.id, '975310')).toBe(false);
	});

	it('lets exactly one of two concurrent uses of a link token succeed', async () => {
		const person = await makePerson(orm.em.fork());
		const em = orm.em.fork();
		const link = newLinkToken();
		const row = tokens.create(em, person, 'invite', link.hash, 60_000);
		await em.flush();
		const results = await Promise.all([tokens.consume(orm.em.fork(), row.id), tokens.consume(orm.em.fork(), row.id)]);
		expect(results.filter(Boolean)).toHaveLength(1);
		const stored = await orm.em.fork().findOneOrFail(OneTimeToken, { id: row.id });
		expect(stored.tokenHash).not.toBe(link.token);
	});

	it('accepts an invitation once: password and PIN set, second use refused', async () => {
		const em = orm.em.fork();
		const person = await makePerson(em);
		const link = newLinkToken();
		tokens.create(em, person, 'invite', link.hash, 60_000);
		await em.flush();
		const first = await accounts.acceptInvite(orm.em.fork(), link.token, {
			password: 'a good password',
			pin: '864200'
		});
		expect(first.ok).toBe(true);
		const second = await accounts.acceptInvite(orm.em.fork(), link.token, { password: 'another one', pin: '111222' });
		expect(second).toMatchObject({ ok: false, message: expect.stringMatching(/already been used or has expired/) });
		expect(await accounts.verifyPin(orm.em.fork(), person.id, '864200')).toBe(true);
	});

	it('refuses an expired link', async () => {
		const em = orm.em.fork();
		const person = await makePerson(em);
		const link = newLinkToken();
		tokens.create(em, person, 'password_reset', link.hash, -1000);
		await em.flush();
		const res = await accounts.completeReset(orm.em.fork(), link.token, { password: 'new password here' });
		expect(res.ok).toBe(false);
	});

	it('bumps the session version and logs a role change, keeping the last admin', async () => {
		const em = orm.em.fork();
		const admin = await makePerson(em, { roles: ['admin'] });
		const person = await makePerson(em, { roles: ['technician'] });
		const actor = { id: admin.id, name: admin.name };
		const res = await accounts.setRoles(orm.em.fork(), actor, person.id, ['technician', 'lead']);
		expect(res.ok && res.value.sessionVersion).toBe(2);
		const log = await orm.em.fork().find(AdminLog, { subjectId: person.id, action: 'user.roles_changed' });
		expect(log[0]?.detail).toEqual({ before: ['technician'], after: ['technician', 'lead'] });
		const deactivated = await accounts.setActive(orm.em.fork(), actor, person.id, false);
		expect(deactivated.ok && deactivated.value.sessionVersion).toBe(3);
		expect(await accounts.setActive(orm.em.fork(), actor, admin.id, false)).toMatchObject({ ok: false });
	});

	it('shares sign-in failure counters between two app processes (PostgreSQL store)', async () => {
		const other = await migratedAppOrm();
		try {
			const a = createSignInLimits(orm);
			const b = createSignInLimits(other);
			const email = `limits-${Date.now()}@shop.example`;
			for (let i = 0; i < 4; i++) await (i % 2 ? a : b).recordFailure(email, '192.0.2.10');
			expect(await a.isBlocked(email, '192.0.2.11')).toBe(false);
			await b.recordFailure(email, '192.0.2.10');
			expect(await a.isBlocked(email, '192.0.2.11')).toBe(true);
			expect(await b.isBlocked(`x${email}`, '192.0.2.12')).toBe(false);
		} finally {
			await other.close(true);
		}
	});

	it('authenticates with the same refusal for a wrong password, an unknown account and a deactivated one', async () => {
		const em = orm.em.fork();
		const good = await makePerson(em, { password: 'right password' });
		const gone = await makePerson(em, { password: 'right password', active: false });
		const limits = createSignInLimits(orm);
		const addr = '198.51.100.7';
		expect(
			(await accounts.authenticate(orm.em.fork(), limits, { email: good.email, password: 'right password' }, addr))?.id
		).toBe(good.id);
		expect(
			await accounts.authenticate(orm.em.fork(), limits, { email: good.email, password: 'wrong' }, addr)
		).toBeNull();
		expect(
			await accounts.authenticate(orm.em.fork(), limits, { email: 'nobody@shop.example', password: 'x' }, addr)
		).toBeNull();
		expect(
			await accounts.authenticate(orm.em.fork(), limits, { email: gone.email, password: 'right password' }, addr)
		).toBeNull();
	});
});
