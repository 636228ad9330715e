import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { isoDate } from '../../src/lib/registers/dates';
import * as parts from '../../src/lib/server/repositories/parts';
import * as partService from '../../src/lib/server/services/parts.service';
import { makePerson } from '../factories/people';
import { migratedAppOrm } from './support/orm';

describe('parts and lots', () => {
	let orm: MikroORM;
	let lead: { id: string; name: string };
	beforeAll(async () => {
		orm = await migratedAppOrm();
		lead = await makePerson(orm.em.fork(), { roles: ['lead'] });
	});
	afterAll(() => orm.close(true));

	it('receives lots and finds them by part number for a checkpoint', async () => {
		const pn = `KL-TST-${Date.now().toString(36).toUpperCase()}`;
		const part = await partService.createPart(orm.em.fork(), lead, {
			partNumber: pn.toLowerCase(),
			description: 'Test fluid (invented)',
			category: 'fluid',
			unit: 'L'
		});
		if (!part.ok) throw new Error(part.message);
		expect(
			await partService.createPart(orm.em.fork(), lead, {
				partNumber: pn,
				description: 'dup',
				category: 'fluid',
				unit: 'L'
			})
		).toMatchObject({ ok: false, field: 'partNumber' });
		const lot = {
			lotNumber: 'L-2026-001',
			serialised: false,
			quantity: '20.5',
			receivedOn: isoDate(),
			supplier: 'Invented Supply'
		};
		expect(await partService.receiveLot(orm.em.fork(), lead, part.value.id, lot)).toMatchObject({ ok: true });
		expect(await partService.receiveLot(orm.em.fork(), lead, part.value.id, lot)).toMatchObject({
			ok: false,
			field: 'lotNumber'
		});
		const lots = await parts.lotsForPartNumber(orm.em.fork(), pn);
		expect(lots).toEqual([
			expect.objectContaining({ partNumber: pn, lotNumber: 'L-2026-001', quantity: '20.5', unit: 'L' })
		]);
		expect(await parts.findLot(orm.em.fork(), pn.toLowerCase(), 'L-2026-001')).toMatchObject({
			lotNumber: 'L-2026-001'
		});
		expect(await parts.findLot(orm.em.fork(), pn, 'nope')).toBeNull();
		expect(await parts.lotsForPartNumber(orm.em.fork(), 'NO-SUCH-PART')).toEqual([]);
	});
});
