import type { EntityManager } from '@mikro-orm/postgresql';
import { Part, PartLot, type IPart, type IPartLot } from '../db/entities';
import type { LotInput, PartInput } from '../../registers/schema';
import type { PartCategory } from '../../registers/parts';

export interface PartSummary {
	id: string;
	partNumber: string;
	description: string;
	category: PartCategory;
	unit: string;
}

export interface LotSummary {
	id: string;
	partId: string;
	partNumber: string;
	lotNumber: string;
	serialised: boolean;
	quantity: string;
	unit: string;
	receivedOn: string;
	supplier: string;
}

export const toPartSummary = (p: IPart): PartSummary => ({
	id: p.id,
	partNumber: p.partNumber,
	description: p.description,
	category: p.category,
	unit: p.unit
});

export const toLotSummary = (l: IPartLot): LotSummary => {
	const part = l.part as unknown as IPart;
	return {
		id: l.id,
		partId: part.id,
		partNumber: part.partNumber,
		lotNumber: l.lotNumber,
		serialised: l.serialised,
		quantity: l.quantity,
		unit: part.unit,
		receivedOn: l.receivedOn,
		supplier: l.supplier
	};
};

const normalPartNumber = (pn: string) => pn.trim().toUpperCase();

export function findById(em: EntityManager, id: string): Promise<IPart | null> {
	return em.findOne(Part, { id });
}

export function findByPartNumber(em: EntityManager, partNumber: string): Promise<IPart | null> {
	return em.findOne(Part, { partNumber: normalPartNumber(partNumber) });
}

export function listParts(em: EntityManager, opts: { q?: string; category?: PartCategory } = {}): Promise<IPart[]> {
	const q = opts.q?.trim();
	return em.find(
		Part,
		{
			...(opts.category ? { category: opts.category } : {}),
			...(q ? { $or: [{ partNumber: { $ilike: `%${q}%` } }, { description: { $ilike: `%${q}%` } }] } : {})
		},
		{ orderBy: { partNumber: 'asc' } }
	);
}

export function listLots(em: EntityManager, partId: string): Promise<IPartLot[]> {
	return em.find(PartLot, { part: partId }, { populate: ['part'], orderBy: { receivedOn: 'desc', lotNumber: 'asc' } });
}

/**
 * Lots (or serials) received for a part number, newest first: what a part or fluid checkpoint offers to pick.
 * An unknown part number gives an empty list.
 */
export async function lotsForPartNumber(em: EntityManager, partNumber: string): Promise<LotSummary[]> {
	const part = await findByPartNumber(em, partNumber);
	return part ? (await listLots(em, part.id)).map(toLotSummary) : [];
}

/** One lot by part number and lot/serial number, e.g. to confirm what a technician picked or typed. */
export async function findLot(em: EntityManager, partNumber: string, lotNumber: string): Promise<LotSummary | null> {
	const lot = await em.findOne(
		PartLot,
		{ part: { partNumber: normalPartNumber(partNumber) }, lotNumber: lotNumber.trim() },
		{ populate: ['part'] }
	);
	return lot ? toLotSummary(lot) : null;
}

export async function findLotById(em: EntityManager, id: string): Promise<LotSummary | null> {
	const lot = await em.findOne(PartLot, { id }, { populate: ['part'] });
	return lot ? toLotSummary(lot) : null;
}

export function createPart(em: EntityManager, input: PartInput): IPart {
	return em.create(Part, { id: crypto.randomUUID(), ...input, partNumber: normalPartNumber(input.partNumber) });
}

export function createLot(
	em: EntityManager,
	part: IPart,
	actor: { id: string; name: string },
	input: LotInput
): IPartLot {
	return em.create(PartLot, {
		id: crypto.randomUUID(),
		part,
		...input,
		recordedById: actor.id,
		recordedByName: actor.name
	});
}
