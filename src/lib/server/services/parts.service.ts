import { UniqueConstraintViolationException } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { isoDate } from '../../registers/dates';
import type { LotInput, PartInput } from '../../registers/schema';
import * as adminLog from '../repositories/admin-log';
import * as parts from '../repositories/parts';
import type { Actor, Result } from './accounts.service';

export { findLot, lotsForPartNumber } from '../repositories/parts';

const refuse = (message: string, field?: string): Result<never> => ({ ok: false, message, field });
const DUPLICATE_PART = 'This part number is already in the register.';
const DUPLICATE_LOT = 'This lot or serial number is already recorded for this part.';

export async function createPart(em: EntityManager, actor: Actor, input: PartInput): Promise<Result<{ id: string }>> {
	if (await parts.findByPartNumber(em, input.partNumber)) return refuse(DUPLICATE_PART, 'partNumber');
	const part = parts.createPart(em, input);
	adminLog.append(em, actor, { action: 'part.created', subjectType: 'part', subjectId: part.id, detail: { ...input } });
	try {
		await em.flush();
	} catch (e) {
		if (e instanceof UniqueConstraintViolationException) return refuse(DUPLICATE_PART, 'partNumber');
		throw e;
	}
	return { ok: true, value: { id: part.id } };
}

export async function receiveLot(
	em: EntityManager,
	actor: Actor,
	partId: string,
	input: LotInput,
	now: Date = new Date()
): Promise<Result<{ id: string }>> {
	const part = await parts.findById(em, partId);
	if (!part) return refuse('No such part.');
	if (input.receivedOn > isoDate(now)) return refuse('The date received cannot be in the future.', 'receivedOn');
	if (input.serialised && Number(input.quantity) !== 1)
		return refuse('A serial number is one piece: the quantity is 1.', 'quantity');
	if (await parts.findLot(em, part.partNumber, input.lotNumber)) return refuse(DUPLICATE_LOT, 'lotNumber');
	const lot = parts.createLot(em, part, actor, input);
	adminLog.append(em, actor, {
		action: 'part.lot_received',
		subjectType: 'part',
		subjectId: part.id,
		detail: { partNumber: part.partNumber, lotId: lot.id, ...input }
	});
	try {
		await em.flush();
	} catch (e) {
		if (e instanceof UniqueConstraintViolationException) return refuse(DUPLICATE_LOT, 'lotNumber');
		throw e;
	}
	return { ok: true, value: { id: lot.id } };
}
