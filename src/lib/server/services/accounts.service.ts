import type { EntityManager } from '@mikro-orm/postgresql';
import type { RoleName } from '$lib/accounts/schema';
import type { IUser, TokenPurpose } from '../db/entities';
import * as adminLog from '../repositories/admin-log';
import * as tokens from '../repositories/one-time-tokens';
import * as users from '../repositories/users';
import { sendMail } from '../mail';
import { hashSecret, verifySecret } from '../passwords';
import type { SignInLimits } from '../sign-in-limits';
import { hashLinkToken, newLinkToken } from '../tokens';

export type Actor = adminLog.Actor;
export type Result<T = void> = { ok: true; value: T } | { ok: false; field?: string; message: string };

const INVITE_TTL_MS = 72 * 3600_000;
const RESET_TTL_MS = 24 * 3600_000;

const ok = <T>(value: T): Result<T> => ({ ok: true, value });
const refuse = (message: string, field?: string): Result<never> => ({ ok: false, message, field });

/**
 * Checks e-mail and password under the shared limits. A wrong password, an unknown account, a locked one and a
 * deactivated one all fail the same way, so the answer reveals nothing about which accounts exist.
 */
export async function authenticate(
	em: EntityManager,
	limits: SignInLimits,
	credentials: { email: string; password: string },
	address: string
): Promise<IUser | null> {
	if (await limits.isBlocked(credentials.email, address)) return null;
	const user = await users.findByEmail(em, credentials.email);
	const good = await verifySecret(user?.passwordHash, credentials.password);
	if (!user || !good || !user.active) {
		await limits.recordFailure(credentials.email, address);
		return null;
	}
	await limits.recordSuccess(credentials.email);
	return user;
}

export async function invite(
	em: EntityManager,
	actor: Actor,
	input: { email: string; name: string; roles: RoleName[] },
	baseUrl: string
): Promise<Result<IUser>> {
	if (await users.findByEmail(em, input.email))
		return refuse('Someone with this e-mail address already has an account.', 'email');
	const user = users.create(em, input);
	const link = newLinkToken();
	tokens.create(em, user, 'invite', link.hash, INVITE_TTL_MS);
	adminLog.append(em, actor, {
		action: 'user.invited',
		subjectType: 'user',
		subjectId: user.id,
		detail: { email: user.email, roles: input.roles }
	});
	await em.flush();
	await sendMail({
		to: user.email,
		subject: 'You are invited to Benchstamp',
		text: [
			`Hello ${user.name},`,
			'',
			`${actor.name} invited you to Benchstamp. Open this link to choose your password and your bench PIN:`,
			`${baseUrl}/welcome/${link.token}`,
			'',
			'The link works once and expires in 72 hours.'
		].join('\n')
	});
	return ok(user);
}

/** What a link token is for, without consuming it; undefined when unknown, used or expired. */
export async function peekToken(em: EntityManager, token: string, purpose: TokenPurpose): Promise<IUser | undefined> {
	const row = await tokens.findByHash(em, hashLinkToken(token));
	if (!row || row.purpose !== purpose || row.usedAt || row.expiresAt < new Date()) return undefined;
	return row.user as unknown as IUser;
}

const LINK_GONE = 'This link has already been used or has expired. Ask your administrator for a new one.';

async function consumeToken(em: EntityManager, token: string, purpose: TokenPurpose): Promise<IUser | undefined> {
	const row = await tokens.findByHash(em, hashLinkToken(token));
	if (!row || row.purpose !== purpose) return undefined;
	if (!(await tokens.consume(em, row.id))) return undefined;
	return row.user as unknown as IUser;
}

export async function acceptInvite(
	em: EntityManager,
	token: string,
	input: { password: string; pin: string }
): Promise<Result<IUser>> {
	const user = await consumeToken(em, token, 'invite');
	if (!user) return refuse(LINK_GONE);
	user.passwordHash = await hashSecret(input.password);
	user.pinHash = await hashSecret(input.pin);
	user.pinChangedAt = new Date();
	adminLog.append(
		em,
		{ id: user.id, name: user.name },
		{ action: 'user.invite_accepted', subjectType: 'user', subjectId: user.id }
	);
	await em.flush();
	return ok(user);
}

export async function startReset(
	em: EntityManager,
	actor: Actor,
	userId: string,
	kind: 'password' | 'pin',
	baseUrl: string
): Promise<Result> {
	const user = await users.findById(em, userId);
	if (!user) return refuse('No such person.');
	const purpose: TokenPurpose = kind === 'password' ? 'password_reset' : 'pin_reset';
	await tokens.voidOpen(em, user.id, purpose);
	const link = newLinkToken();
	tokens.create(em, user, purpose, link.hash, RESET_TTL_MS);
	adminLog.append(em, actor, { action: `user.${purpose}_started`, subjectType: 'user', subjectId: user.id });
	await em.flush();
	const what = kind === 'password' ? 'password' : 'bench PIN';
	await sendMail({
		to: user.email,
		subject: `Choose a new Benchstamp ${what}`,
		text: [
			`Hello ${user.name},`,
			'',
			`${actor.name} started a reset of your ${what}. Open this link to choose a new one:`,
			`${baseUrl}/reset/${link.token}`,
			'',
			'The link works once and expires in 24 hours. If you did not expect this, tell your administrator.'
		].join('\n')
	});
	return ok(undefined);
}

export async function completeReset(
	em: EntityManager,
	token: string,
	secret: { password?: string; pin?: string }
): Promise<Result<IUser>> {
	const purpose: TokenPurpose = secret.password !== undefined ? 'password_reset' : 'pin_reset';
	const user = await consumeToken(em, token, purpose);
	if (!user) return refuse(LINK_GONE);
	if (secret.password !== undefined) {
		user.passwordHash = await hashSecret(secret.password);
		user.sessionVersion += 1;
	} else if (secret.pin !== undefined) {
		user.pinHash = await hashSecret(secret.pin);
		user.pinChangedAt = new Date();
	}
	adminLog.append(
		em,
		{ id: user.id, name: user.name },
		{ action: `user.${purpose}_completed`, subjectType: 'user', subjectId: user.id }
	);
	await em.flush();
	return ok(user);
}

async function countOtherActiveAdmins(em: EntityManager, exceptId: string): Promise<number> {
	const all = await users.listAll(em);
	return all.filter((u) => u.id !== exceptId && u.active && u.roles.includes('admin')).length;
}

export async function setRoles(
	em: EntityManager,
	actor: Actor,
	userId: string,
	roles: RoleName[]
): Promise<Result<IUser>> {
	const user = await users.findById(em, userId);
	if (!user) return refuse('No such person.');
	if (user.roles.includes('admin') && !roles.includes('admin') && (await countOtherActiveAdmins(em, user.id)) === 0) {
		return refuse('This is the last active administrator; give someone else the admin role first.', 'roles');
	}
	const before = [...user.roles];
	user.roles = [...new Set(roles)];
	user.sessionVersion += 1;
	adminLog.append(em, actor, {
		action: 'user.roles_changed',
		subjectType: 'user',
		subjectId: user.id,
		detail: { before, after: user.roles }
	});
	await em.flush();
	return ok(user);
}

export async function setActive(
	em: EntityManager,
	actor: Actor,
	userId: string,
	active: boolean
): Promise<Result<IUser>> {
	const user = await users.findById(em, userId);
	if (!user) return refuse('No such person.');
	if (!active && user.id === actor.id) return refuse('You cannot deactivate your own account.');
	if (!active && user.roles.includes('admin') && (await countOtherActiveAdmins(em, user.id)) === 0) {
		return refuse('This is the last active administrator; it cannot be deactivated.');
	}
	if (user.active === active) return ok(user);
	user.active = active;
	user.sessionVersion += 1;
	adminLog.append(em, actor, {
		action: active ? 'user.reactivated' : 'user.deactivated',
		subjectType: 'user',
		subjectId: user.id
	});
	await em.flush();
	return ok(user);
}

/** Whether `pin` is this active person's bench PIN. The PIN itself is never stored or logged. */
export async function verifyPin(em: EntityManager, userId: string, pin: string): Promise<boolean> {
	const user = await users.findById(em, userId);
	if (!user || !user.active || !/^\d{6,8}$/.test(pin)) return false;
	return verifySecret(user.pinHash, pin);
}

export async function changeOwnPin(
	em: EntityManager,
	userId: string,
	currentPassword: string,
	newPin: string
): Promise<Result> {
	const user = await users.findById(em, userId);
	if (!user || !(await verifySecret(user.passwordHash, currentPassword)))
		return refuse('That is not your current password.', 'currentPassword');
	user.pinHash = await hashSecret(newPin);
	user.pinChangedAt = new Date();
	adminLog.append(
		em,
		{ id: user.id, name: user.name },
		{ action: 'user.pin_changed', subjectType: 'user', subjectId: user.id }
	);
	await em.flush();
	return ok(undefined);
}
