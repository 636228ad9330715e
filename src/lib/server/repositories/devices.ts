import type { EntityManager } from '@mikro-orm/postgresql';
import { uuidv7 } from '../../ledger/uuid-v7';
import { Device, type IDevice } from '../db/entities';

/** One enrolled tablet by id, or null (ids that are not uuids are never enrolled ones). */
export function findById(em: EntityManager, id: string): Promise<IDevice | null> {
	if (!/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id)) return Promise.resolve(null);
	return em.findOne(Device, { id: id.toLowerCase() });
}

export function findByThumbprint(em: EntityManager, keyThumbprint: string): Promise<IDevice | null> {
	return em.findOne(Device, { keyThumbprint });
}

/** Every enrolled tablet, active ones first, newest first. */
export async function listAll(em: EntityManager): Promise<IDevice[]> {
	const all = await em.find(Device, {}, { orderBy: { enrolledAt: 'desc' } });
	return [...all.filter((d) => !d.revokedAt), ...all.filter((d) => d.revokedAt)];
}

/** Queues a new enrolment; the server chooses the id. */
export function create(
	em: EntityManager,
	input: { label: string; publicKey: Record<string, unknown>; keyThumbprint: string; by: { id: string; name: string } }
): IDevice {
	return em.create(Device, {
		id: uuidv7(),
		label: input.label,
		publicKey: input.publicKey,
		keyThumbprint: input.keyThumbprint,
		enrolledById: input.by.id,
		enrolledByName: input.by.name
	});
}

/** Marks a tablet revoked, once: a conditional UPDATE so two revocations at once leave the first one standing. */
export async function revoke(
	em: EntityManager,
	id: string,
	by: { id: string; name: string },
	reason: string
): Promise<boolean> {
	const n = await em.nativeUpdate(
		Device,
		{ id, revokedAt: null },
		{ revokedAt: new Date(), revokedById: by.id, revokedByName: by.name, revokeReason: reason }
	);
	return n === 1;
}
