/**
 * Enrolled tablets: enrolment (the server issues the id, the tablet keeps a non-extractable private key and sends
 * the public half), listing and revocation, each written to the admin log. Signature checks on submitted records
 * are in device-signatures.ts.
 */
import { createHash, webcrypto } from 'node:crypto';
import { UniqueConstraintViolationException } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { RoleName } from '$lib/accounts/schema';
import { DEVICE_KEY_ALGORITHM } from '../../signing/device-payload';
import type { IDevice } from '../db/entities';
import * as adminLog from '../repositories/admin-log';
import * as devices from '../repositories/devices';
import type { PublicJwk } from '../../devices/schema';

/** Who enrols and revokes tablets: leads (the people who set up the bench). */
export const DEVICE_MANAGE_ROLES: RoleName[] = ['lead'];
/** Who may list them: leads, quality leads (auditing) and admins. */
export const DEVICE_LIST_ROLES: RoleName[] = ['lead', 'quality', 'admin'];

export type Result<T> =
	{ ok: true; value: T } | { ok: false; status: 400 | 403 | 404 | 409; message: string; field?: string };
/** The person acting, with their roles: the service checks them as well as the route. */
export interface Actor extends adminLog.Actor {
	roles: readonly RoleName[];
}
const mayManage = (a: Actor) => a.roles.some((r) => DEVICE_MANAGE_ROLES.includes(r));
const notAllowed = { ok: false, status: 403, message: 'Only a lead enrols or revokes tablets.' } as const;

/** A tablet as pages and JSON see it. */
export interface DeviceView {
	id: string;
	label: string;
	keyThumbprint: string;
	enrolledAt: string;
	enrolledBy: string;
	revoked: null | { at: string; by: string; reason: string };
}

export function toView(d: IDevice): DeviceView {
	return {
		id: d.id,
		label: d.label,
		keyThumbprint: d.keyThumbprint,
		enrolledAt: d.enrolledAt.toISOString(),
		enrolledBy: d.enrolledByName,
		revoked: d.revokedAt
			? { at: d.revokedAt.toISOString(), by: d.revokedByName ?? '', reason: d.revokeReason ?? '' }
			: null
	};
}

/** sha256 (hex) of the key's SubjectPublicKeyInfo DER; imports the key, so a point off the curve is refused here. */
export async function keyThumbprint(jwk: PublicJwk): Promise<string | null> {
	try {
		const key = await webcrypto.subtle.importKey('jwk', jwk, DEVICE_KEY_ALGORITHM, true, ['verify']);
		const spki = new Uint8Array(await webcrypto.subtle.exportKey('spki', key));
		return createHash('sha256').update(spki).digest('hex');
	} catch {
		return null;
	}
}

export async function list(em: EntityManager): Promise<DeviceView[]> {
	return (await devices.listAll(em)).map(toView);
}

/** Enrols a tablet with the public key it made; one key is enrolled once. */
export async function enrol(
	em: EntityManager,
	actor: Actor,
	input: { label: string; publicKey: PublicJwk }
): Promise<Result<DeviceView>> {
	if (!mayManage(actor)) return notAllowed;
	const thumbprint = await keyThumbprint(input.publicKey);
	if (!thumbprint)
		return {
			ok: false,
			status: 400,
			message: 'The tablet sent a key that is not a P-256 public key.',
			field: 'publicKey'
		};
	if (await devices.findByThumbprint(em, thumbprint))
		return { ok: false, status: 409, message: 'This key is already enrolled: reload the page to see this tablet.' };
	const device = devices.create(em, {
		label: input.label,
		publicKey: input.publicKey,
		keyThumbprint: thumbprint,
		by: { id: actor.id, name: actor.name }
	});
	adminLog.append(
		em,
		{ id: actor.id, name: actor.name },
		{
			action: 'device.enrolled',
			subjectType: 'device',
			subjectId: device.id,
			detail: { label: device.label, keyThumbprint: thumbprint }
		}
	);
	try {
		await em.flush();
	} catch (e) {
		if (e instanceof UniqueConstraintViolationException)
			return { ok: false, status: 409, message: 'This key is already enrolled: reload the page to see this tablet.' };
		throw e;
	}
	return { ok: true, value: toView(device) };
}

/** Revokes a tablet for good: from now on its records are refused and held for the quality lead. */
export async function revoke(
	em: EntityManager,
	actor: Actor,
	input: { deviceId: string; reason: string }
): Promise<Result<DeviceView>> {
	if (!mayManage(actor)) return notAllowed;
	return em.transactional(async (tx) => {
		const device = await devices.findById(tx, input.deviceId);
		if (!device) return { ok: false, status: 404, message: 'No such tablet is enrolled.' };
		if (!(await devices.revoke(tx, device.id, { id: actor.id, name: actor.name }, input.reason)))
			return { ok: false, status: 409, message: `${device.label} was already revoked.` };
		adminLog.append(
			tx,
			{ id: actor.id, name: actor.name },
			{
				action: 'device.revoked',
				subjectType: 'device',
				subjectId: device.id,
				detail: { label: device.label, reason: input.reason }
			}
		);
		await tx.flush();
		await tx.refresh(device);
		return { ok: true, value: toView(device) };
	});
}
