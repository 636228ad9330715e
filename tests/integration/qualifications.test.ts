import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addDays, isoDate } from '../../src/lib/registers/dates';
import { AdminLog } from '../../src/lib/server/db/entities';
import { isQualified } from '../../src/lib/server/repositories/qualifications';
import * as training from '../../src/lib/server/services/qualifications.service';
import { makePerson } from '../factories/people';
import { migratedAppOrm } from './support/orm';

describe('qualifications', () => {
	let orm: MikroORM;
	let lead: { id: string; name: string };
	const today = isoDate();
	const at = (iso: string) => new Date(`${iso}T12:00:00Z`);
	beforeAll(async () => {
		orm = await migratedAppOrm();
		lead = await makePerson(orm.em.fork(), { roles: ['lead'] });
	});
	afterAll(() => orm.close(true));

	const record = async (userId: string, family: string, trainedOn: string, expiresOn = '') => {
		const r = await training.recordTraining(orm.em.fork(), lead, {
			userId,
			family,
			trainedBy: 'Lena Marsh',
			trainedOn,
			expiresOn,
			notes: ''
		});
		if (!r.ok) throw new Error(r.message);
		return r.value.id;
	};

	it('answers whether a person may sign for a family on a given day', async () => {
		const tech = await makePerson(orm.em.fork(), { roles: ['technician'] });
		await record(tech.id, 'Valve-body  rebuild', addDays(today, -100), addDays(today, 100));
		const em = orm.em.fork();
		expect(await isQualified(em, tech.id, 'valve-body rebuild')).toBe(true);
		expect(await isQualified(em, tech.id, 'VALVE-BODY REBUILD', at(addDays(today, 100)))).toBe(true);
		expect(await isQualified(em, tech.id, 'valve-body rebuild', at(addDays(today, 101)))).toBe(false);
		expect(await isQualified(em, tech.id, 'valve-body rebuild', at(addDays(today, -101)))).toBe(false);
		expect(await isQualified(em, tech.id, 'transmission control adaptation')).toBe(false);
		const other = await makePerson(orm.em.fork(), { roles: ['technician'] });
		expect(await isQualified(em, other.id, 'valve-body rebuild')).toBe(false);
	});

	it('stops counting a revoked record, and logs both changes', async () => {
		const tech = await makePerson(orm.em.fork(), { roles: ['technician'] });
		const id = await record(tech.id, 'KTX-7 (invented seven-speed dual-clutch transaxle)', today);
		expect(await isQualified(orm.em.fork(), tech.id, 'KTX-7 (invented seven-speed dual-clutch transaxle)')).toBe(true);
		expect(await training.revokeTraining(orm.em.fork(), lead, id)).toMatchObject({ ok: true });
		expect(await isQualified(orm.em.fork(), tech.id, 'KTX-7 (invented seven-speed dual-clutch transaxle)')).toBe(false);
		const log = await orm.em.fork().find(AdminLog, { subjectId: id }, { orderBy: { id: 'asc' } });
		expect(log.map((l) => l.action)).toEqual(['qualification.recorded', 'qualification.revoked']);
	});

	it('refuses a training date in the future beside the field', async () => {
		const tech = await makePerson(orm.em.fork(), { roles: ['technician'] });
		const r = await training.recordTraining(orm.em.fork(), lead, {
			userId: tech.id,
			family: 'valve-body rebuild',
			trainedBy: 'X',
			trainedOn: addDays(today, 3),
			expiresOn: '',
			notes: ''
		});
		expect(r).toMatchObject({ ok: false, field: 'trainedOn' });
	});
});
