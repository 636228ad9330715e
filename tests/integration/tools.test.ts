import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../../scripts/lib/postgres';
import { addDays, isoDate } from '../../src/lib/registers/dates';
import { calibrationSchema } from '../../src/lib/registers/schema';
import { AdminLog } from '../../src/lib/server/db/entities';
import * as tools from '../../src/lib/server/repositories/tools';
import * as toolService from '../../src/lib/server/services/tools.service';
import { makePerson } from '../factories/people';
import { makeCalibratedTool, toolInput } from '../factories/registers';
import { testDbUrls } from './db-urls';
import { migratedAppOrm } from './support/orm';

describe('tool register and calibration history', () => {
	let orm: MikroORM;
	let lead: { id: string; name: string };
	const today = isoDate();
	beforeAll(async () => {
		orm = await migratedAppOrm();
		lead = await makePerson(orm.em.fork(), { roles: ['lead'] });
	});
	afterAll(() => orm.close(true));

	it('refuses a duplicate asset tag beside the field, whatever its case', async () => {
		const input = toolInput();
		expect(await toolService.registerTool(orm.em.fork(), lead, input)).toMatchObject({ ok: true });
		const again = await toolService.registerTool(orm.em.fork(), lead, {
			...input,
			assetTag: input.assetTag.toLowerCase()
		});
		expect(again).toMatchObject({ ok: false, field: 'assetTag' });
	});

	it("corrects a tool's details, logging what changed, and refuses another tool's tag", async () => {
		const first = toolInput();
		const second = toolInput();
		const a = await toolService.registerTool(orm.em.fork(), lead, first);
		expect(await toolService.registerTool(orm.em.fork(), lead, second)).toMatchObject({ ok: true });
		if (!a.ok) throw new Error('setup failed');
		const fixed = { ...first, rangeMax: String(Number(first.rangeMax) + 5), description: 'Corrected description' };
		expect(await toolService.updateTool(orm.em.fork(), lead, a.value.id, fixed)).toEqual({
			ok: true,
			value: undefined
		});
		const stored = await tools.findById(orm.em.fork(), a.value.id);
		expect(String(stored?.rangeMax)).toBe(fixed.rangeMax);
		const log = await orm.em.fork().find(AdminLog, { subjectId: a.value.id, action: 'tool.updated' });
		expect(log[0]?.detail).toMatchObject({ after: { description: 'Corrected description' } });
		const clash = await toolService.updateTool(orm.em.fork(), lead, a.value.id, {
			...fixed,
			assetTag: second.assetTag
		});
		expect(clash).toMatchObject({ ok: false, field: 'assetTag' });
	});

	it('refuses a calibration dated in the future and a next due date before the calibration date', async () => {
		const em = orm.em.fork();
		const reg = await toolService.registerTool(em, lead, toolInput());
		if (!reg.ok) throw new Error(reg.message);
		const base = { kind: 'calibration', certificateNo: 'C-1', asFound: 'in', asLeft: 'in', notes: '' } as const;
		const future = await toolService.recordCalibration(em, lead, reg.value.id, {
			...base,
			performedOn: addDays(today, 1),
			nextDueOn: addDays(today, 365)
		});
		expect(future).toMatchObject({ ok: false, field: 'performedOn' });
		const backwards = await toolService.recordCalibration(em, lead, reg.value.id, {
			...base,
			performedOn: today,
			nextDueOn: addDays(today, -1)
		});
		expect(backwards).toMatchObject({ ok: false, field: 'nextDueOn' });
		// The shared schema says the same in the browser.
		const parsed = calibrationSchema.safeParse({
			...base,
			performedOn: addDays(today, 2),
			nextDueOn: addDays(today, 1)
		});
		expect(parsed.success).toBe(false);
		const paths = parsed.error!.issues.map((i) => i.path.join('.'));
		expect(paths).toEqual(expect.arrayContaining(['performedOn', 'nextDueOn']));
		expect(await tools.listCalibrations(em, reg.value.id)).toEqual([]);
	});

	it('the usable-tool query leaves out past-due tools and tools that failed their as-found check', async () => {
		const em = orm.em.fork();
		const good = await makeCalibratedTool(em, { over: { kind: 'bore_gauge', unit: 'mm' } });
		const pastDue = await makeCalibratedTool(em, {
			daysAgo: 400,
			dueInDays: -1,
			over: { kind: 'bore_gauge', unit: 'mm' }
		});
		const failed = await makeCalibratedTool(em, { over: { kind: 'bore_gauge', unit: 'mm' } });
		const failedThenRecal = await makeCalibratedTool(em, { daysAgo: 60, over: { kind: 'bore_gauge', unit: 'mm' } });
		const never = tools.create(em, toolInput({ kind: 'bore_gauge', unit: 'mm' }));
		await em.flush();
		const check = {
			kind: 'check',
			certificateNo: '',
			asFound: 'out',
			asLeft: '',
			nextDueOn: '',
			notes: 'dropped'
		} as const;
		expect(await toolService.recordCalibration(em, lead, failed.id, { ...check, performedOn: today })).toMatchObject({
			ok: true
		});
		await toolService.recordCalibration(em, lead, failedThenRecal.id, { ...check, performedOn: addDays(today, -10) });
		await toolService.recordCalibration(em, lead, failedThenRecal.id, {
			kind: 'calibration',
			performedOn: addDays(today, -5),
			certificateNo: 'LAB-99',
			asFound: 'out',
			asLeft: 'in',
			nextDueOn: addDays(today, 360),
			notes: 'adjusted'
		});

		const usable = (await tools.findUsable(orm.em.fork(), { kind: 'bore_gauge' })).map((t) => t.id);
		expect(usable).toContain(good.id);
		expect(usable).toContain(failedThenRecal.id);
		expect(usable).not.toContain(pastDue.id);
		expect(usable).not.toContain(failed.id);
		expect(usable).not.toContain(never.id);

		const s = await tools.findSummary(orm.em.fork(), failed.id);
		expect(s?.status).toMatchObject({ usable: false, reason: 'out_of_tolerance' });
		expect((await tools.findSummary(orm.em.fork(), pastDue.id))?.status).toMatchObject({ reason: 'past_due' });
		// Asked about a day before the failed check, the same tool was usable.
		const before = await tools.findUsable(orm.em.fork(), { kind: 'bore_gauge', at: new Date(Date.now() - 86_400_000) });
		expect(before.map((t) => t.id)).toContain(failed.id);
		// Only other kinds when a kind is asked for.
		expect((await tools.findUsable(orm.em.fork(), { kind: 'thermometer' })).map((t) => t.id)).not.toContain(good.id);
		// The due-soon table names the past-due one.
		expect((await tools.listDueSoon(orm.em.fork())).map((t) => t.id)).toContain(pastDue.id);
	});

	it('writes register changes to the admin log', async () => {
		const em = orm.em.fork();
		const input = toolInput();
		const reg = await toolService.registerTool(em, lead, input);
		if (!reg.ok) throw new Error(reg.message);
		await toolService.recordCalibration(em, lead, reg.value.id, {
			kind: 'calibration',
			performedOn: today,
			certificateNo: 'C-7',
			asFound: 'in',
			asLeft: 'in',
			nextDueOn: addDays(today, 180),
			notes: ''
		});
		const log = await orm.em.fork().find(AdminLog, { subjectId: reg.value.id }, { orderBy: { id: 'asc' } });
		expect(log.map((l) => l.action)).toEqual(['tool.registered', 'tool.calibration_recorded']);
		expect(log[0].actorId).toBe(lead.id);
		expect(log[1].detail).toMatchObject({ certificateNo: 'C-7', asFound: 'in' });
	});

	it('keeps calibration records append-only for the app role and even the owner', async () => {
		const tool = await makeCalibratedTool(orm.em.fork());
		const [cal] = await tools.listCalibrations(orm.em.fork(), tool.id);
		await withClient(testDbUrls().appUrl, async (c) => {
			await expect(c.query(`update calibration set as_found = 'in' where id = $1`, [cal.id])).rejects.toThrow(
				/permission denied/
			);
			await expect(c.query(`delete from calibration where id = $1`, [cal.id])).rejects.toThrow(/permission denied/);
		});
		await withClient(testDbUrls().ownerUrl, async (c) => {
			await expect(c.query(`update calibration set as_found = 'out' where id = $1`, [cal.id])).rejects.toThrow(
				/append-only/
			);
		});
	});
});
