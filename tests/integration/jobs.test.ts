import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../../scripts/lib/postgres';
import { addDays, isoDate } from '../../src/lib/registers/dates';
import { jobSchema } from '../../src/lib/registers/schema';
import { AdminLog } from '../../src/lib/server/db/entities';
import * as jobs from '../../src/lib/server/repositories/jobs';
import * as jobService from '../../src/lib/server/services/jobs.service';
import { makePerson } from '../factories/people';
import { jobInput } from '../factories/registers';
import { testDbUrls } from './db-urls';
import { migratedAppOrm } from './support/orm';

describe('work orders', () => {
	let orm: MikroORM;
	let lead: { id: string; name: string; roles: ['lead'] };
	let quality: { id: string; name: string; roles: ['quality'] };
	beforeAll(async () => {
		orm = await migratedAppOrm();
		const em = orm.em.fork();
		lead = { ...(await makePerson(em, { roles: ['lead'] })), roles: ['lead'] };
		quality = { ...(await makePerson(em, { roles: ['quality'] })), roles: ['quality'] };
	});
	afterAll(() => orm.close(true));

	async function open(over: Parameters<typeof jobInput>[0] = {}) {
		const r = await jobService.openJob(orm.em.fork(), lead, jobInput(over));
		if (!r.ok) throw new Error(r.message);
		return r.value;
	}

	it('numbers jobs shop-style from a sequence, unique under concurrent intakes', async () => {
		const made = await Promise.all(Array.from({ length: 8 }, () => open()));
		const numbers = made.map((m) => m.jobNumber);
		const yy = String(new Date().getUTCFullYear() % 100).padStart(2, '0');
		for (const n of numbers) expect(n).toMatch(new RegExp(`^KL-${yy}-\\d{4,}$`));
		expect(new Set(numbers).size).toBe(8);
	});

	it('refuses a batch of intake photos with one non-photo before storing any of them', async () => {
		const sharp = (await import('sharp')).default;
		const png = new Uint8Array(
			await sharp({ create: { width: 8, height: 8, channels: 3, background: '#808080' } })
				.png()
				.toBuffer()
		);
		const svg = new TextEncoder().encode('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>');
		const count = async () =>
			Number(
				(
					await withClient(testDbUrls().ownerUrl, (c) =>
						c.query<{ n: string }>('select count(*) as n from stored_image')
					)
				).rows[0].n
			);
		const before = await count();
		const res = await jobService.openJob(orm.em.fork(), lead, jobInput(), [
			{ bytes: png, filename: 'front.png' },
			{ bytes: svg, filename: 'drawing.svg' }
		]);
		expect(res).toMatchObject({ ok: false, field: 'photos', message: expect.stringContaining('drawing.svg') });
		expect(await count()).toBe(before);
	});

	it('links a comeback to the earlier job on the same serial, however the serial is typed', async () => {
		const first = await open({ unitSerial: 'KTX7-COME-0001', receivedOn: addDays(isoDate(), -90) });
		const again = await open({ unitSerial: 'ktx7 come 0001', receivedOn: isoDate() });
		const other = await open({ unitSerial: 'KTX7-OTHER-0001' });
		const detail = await jobService.jobDetail(orm.em.fork(), again.id);
		expect(detail?.job.previousJob).toEqual({ id: first.id, jobNumber: first.jobNumber });
		expect(detail?.unitJobs.map((j) => j.id)).toEqual([first.id]);
		const firstDetail = await jobService.jobDetail(orm.em.fork(), first.id);
		expect(firstDetail?.job.previousJob).toBeNull();
		expect(firstDetail?.unitJobs.map((j) => j.id)).toEqual([again.id]);
		expect((await jobService.jobDetail(orm.em.fork(), other.id))?.job.previousJob).toBeNull();
		const comebacks = await jobs.list(orm.em.fork(), {
			q: 'COME-0001',
			state: '',
			comebacks: '1',
			limit: 50,
			offset: 0
		});
		expect(comebacks.rows.map((j) => j.id)).toEqual([again.id]);
	});

	it('allows only the defined state moves, records who and why, and lets only quality release', async () => {
		const job = await open();
		const em = () => orm.em.fork();
		expect(await jobService.changeState(em(), lead, job.id, { to: 'released', reason: 'skip ahead' })).toMatchObject({
			ok: false,
			field: 'to'
		});
		for (const to of ['in_work', 'awaiting_parts', 'in_work', 'awaiting_review'] as const)
			expect(await jobService.changeState(em(), lead, job.id, { to, reason: `to ${to}` })).toMatchObject({ ok: true });
		expect(await jobService.changeState(em(), lead, job.id, { to: 'released', reason: 'done' })).toMatchObject({
			ok: false,
			message: expect.stringMatching(/quality/)
		});
		expect(await jobService.changeState(em(), quality, job.id, { to: 'released', reason: 'audited' })).toMatchObject({
			ok: true
		});
		expect(await jobService.changeState(em(), quality, job.id, { to: 'in_work', reason: 'reopen' })).toMatchObject({
			ok: false
		});
		const detail = await jobService.jobDetail(em(), job.id);
		expect(detail?.job.state).toBe('released');
		expect(detail?.history.map((h) => [h.from, h.to])).toEqual([
			[null, 'received'],
			['received', 'in_work'],
			['in_work', 'awaiting_parts'],
			['awaiting_parts', 'in_work'],
			['in_work', 'awaiting_review'],
			['awaiting_review', 'released']
		]);
		expect(detail?.history.at(-1)).toMatchObject({ reason: 'audited', actorName: quality.name });
		const log = await em().find(
			AdminLog,
			{ subjectId: job.id, action: 'job.state_changed' },
			{ orderBy: { id: 'asc' } }
		);
		expect(log).toHaveLength(5);
		expect(log.at(-1)?.detail).toMatchObject({ from: 'awaiting_review', to: 'released', reason: 'audited' });
	});

	it('lets only one of two simultaneous moves from the same state through', async () => {
		const job = await open();
		const results = await Promise.all([
			jobService.changeState(orm.em.fork(), lead, job.id, { to: 'in_work', reason: 'a' }),
			jobService.changeState(orm.em.fork(), lead, job.id, { to: 'on_hold', reason: 'b' })
		]);
		expect(results.filter((r) => r.ok)).toHaveLength(1);
		expect((await jobs.listStateChanges(orm.em.fork(), job.id)).length).toBe(2);
	});

	it('keeps the state history append-only: the app role cannot alter it, nor the owner', async () => {
		const job = await open();
		await withClient(testDbUrls().appUrl, async (c) => {
			await expect(
				c.query(`update job_state_change set reason = 'forged' where job_id = $1`, [job.id])
			).rejects.toThrow(/permission denied/);
			await expect(c.query(`delete from job_state_change where job_id = $1`, [job.id])).rejects.toThrow(
				/permission denied/
			);
			await expect(c.query(`update admin_log set action = 'forged' where subject_id = $1`, [job.id])).rejects.toThrow(
				/permission denied/
			);
		});
		await withClient(testDbUrls().ownerUrl, async (c) => {
			await expect(c.query(`delete from job_state_change where job_id = $1`, [job.id])).rejects.toThrow(/append-only/);
			const rows = await c.query('select to_state from job_state_change where job_id = $1', [job.id]);
			expect(rows.rows).toEqual([{ to_state: 'received' }]);
		});
	});

	it('refuses an e-mail that is not one, beside the field', () => {
		const r = jobSchema.safeParse({ ...jobInput(), customerEmail: 'not-an-email' });
		expect(r.success).toBe(false);
		expect(r.error!.issues.map((i) => i.path.join('.'))).toEqual(['customerEmail']);
		expect(jobSchema.safeParse({ ...jobInput(), customerEmail: '' }).success).toBe(true);
	});
});
