import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AdminLog, ProcedureDraft, ProcedureVersion, type IUser } from '../../src/lib/server/db/entities';
import { contentHash, MAX_DOCUMENT_BYTES } from '../../src/lib/procedure';
import { makePerson } from '../factories/people';
import { procedureSource } from '../factories/procedures';
import { migratedAppOrm, ownerOrm } from './support/orm';

const svc = await import('../../src/lib/server/services/procedures.service');

const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

describe('procedures on PostgreSQL', () => {
	let orm: MikroORM;
	let author: IUser;
	let lead2: IUser;
	let quality: IUser;
	let tech: IUser;
	beforeAll(async () => {
		orm = await migratedAppOrm();
		author = await makePerson(orm.em.fork(), { roles: ['lead'] });
		lead2 = await makePerson(orm.em.fork(), { roles: ['lead'] });
		quality = await makePerson(orm.em.fork(), { roles: ['quality'] });
		tech = await makePerson(orm.em.fork(), { roles: ['technician'] });
	});
	afterAll(() => orm.close(true));

	async function submitted(source = procedureSource()) {
		const created = await svc.create(orm.em.fork(), viewer(author), source);
		if (!created.ok) throw new Error(created.message);
		const s = await svc.submit(orm.em.fork(), viewer(author), created.value.id);
		expect(s.ok).toBe(true);
		return created.value.id;
	}

	async function published(source = procedureSource()) {
		const id = await submitted(source);
		const a = await svc.approve(orm.em.fork(), viewer(lead2), id, { changeNote: 'First issue.' });
		if (!a.ok) throw new Error(a.message);
		return { id, number: a.value.number };
	}

	it('publishes a submitted draft as v1, approved by a second person, hash = contentHash(stored source)', async () => {
		// Typed on Windows, with trailing blank lines: stored normalised, hashed the same.
		const { id, number } = await published(procedureSource().replace(/\n/g, '\r\n') + '\r\n\r\n');
		expect(number).toBe(1);
		const em = orm.em.fork();
		const v = await em.findOneOrFail(ProcedureVersion, { procedure: id, number: 1 });
		expect(v.contentHash).toBe(contentHash(v.source));
		// Stored normalised, so the database's own sha256 of the text agrees too.
		const [row] = await em
			.getConnection()
			.execute(`select encode(sha256(convert_to(source, 'UTF8')), 'hex') as h from procedure_version where id = ?`, [
				v.id
			]);
		expect(row.h).toBe(v.contentHash);
		expect(v.model.hash).toBe(v.contentHash);
		expect(v.engineVersion).toMatch(/^benchstamp-engine\//);
		expect(await em.count(ProcedureDraft, { procedure: id })).toBe(0);
		const log = await em.find(AdminLog, { subjectId: id }, { orderBy: { id: 'asc' } });
		expect(log.map((l) => l.action)).toEqual(['procedure.created', 'procedure.submitted', 'procedure.approved']);
	});

	it('refuses approval by the author, by anyone who edited the draft, and by a technician', async () => {
		const id = await submitted();
		expect(await svc.approve(orm.em.fork(), viewer(author), id, { changeNote: 'Mine.' })).toMatchObject({
			ok: false,
			status: 403
		});
		expect(await svc.approve(orm.em.fork(), viewer(tech), id, { changeNote: 'Tech.' })).toMatchObject({
			ok: false,
			status: 403
		});
		const d = await svc.get(orm.em.fork(), viewer(lead2), id);
		if (!d.ok) throw new Error();
		await svc.saveDraft(orm.em.fork(), viewer(lead2), id, { source: d.value.draft!.source + '\nMore text.\n' });
		await svc.submit(orm.em.fork(), viewer(author), id);
		expect(await svc.approve(orm.em.fork(), viewer(lead2), id, { changeNote: 'Edited it.' })).toMatchObject({
			ok: false,
			status: 403
		});
		expect(await svc.approve(orm.em.fork(), viewer(quality), id, { changeNote: 'Reviewed.' })).toMatchObject({
			ok: true
		});
	});

	it('refuses to submit or approve a draft with errors, and requires a change note', async () => {
		const created = await svc.create(orm.em.fork(), viewer(author), procedureSource({ tolerance: 'H77' }));
		if (!created.ok) throw new Error();
		const s = await svc.submit(orm.em.fork(), viewer(author), created.value.id);
		expect(s).toMatchObject({ ok: false, status: 400 });
		if (!s.ok) expect(s.problems?.[0]).toMatchObject({ line: 19, message: expect.stringMatching(/H77/) });
		const id = await submitted();
		expect(await svc.approve(orm.em.fork(), viewer(lead2), id, { changeNote: '  ' })).toMatchObject({
			ok: false,
			field: 'changeNote'
		});
	});

	it('two concurrent approvals of one draft yield exactly one new version', async () => {
		const id = await submitted();
		const results = await Promise.all([
			svc.approve(orm.em.fork(), viewer(lead2), id, { changeNote: 'Approval A.' }),
			svc.approve(orm.em.fork(), viewer(quality), id, { changeNote: 'Approval B.' })
		]);
		expect(results.filter((r) => r.ok)).toHaveLength(1);
		expect(results.find((r) => !r.ok)).toMatchObject({ status: 409 });
		expect(await orm.em.fork().count(ProcedureVersion, { procedure: id })).toBe(1);
	});

	it('numbers versions and diffs them line by line', async () => {
		const { id } = await published();
		const open = await svc.openDraft(orm.em.fork(), viewer(author), id);
		if (!open.ok) throw new Error(open.message);
		await svc.saveDraft(orm.em.fork(), viewer(author), id, { source: open.value.source.replace('8 N·m', '9 N·m') });
		await svc.submit(orm.em.fork(), viewer(author), id);
		const a = await svc.approve(orm.em.fork(), viewer(quality), id, { changeNote: 'Cover screws to 9 N·m.' });
		expect(a).toMatchObject({ ok: true, value: { number: 2 } });
		const d = await svc.diff(orm.em.fork(), viewer(tech), id, 1, 2);
		if (!d.ok) throw new Error();
		expect(d.value).toMatchObject({ added: 1, removed: 1 });
		expect(d.value.lines.filter((l) => l.kind !== 'same').map((l) => [l.kind, l.text])).toEqual([
			['removed', 'target: 8 N·m'],
			['added', 'target: 9 N·m']
		]);
	});

	it('retires a version once; the database refuses any other change to a published version, even by the owner', async () => {
		const { id } = await published();
		expect(await svc.retire(orm.em.fork(), viewer(lead2), id, 1, 'Superseded')).toMatchObject({ ok: true });
		expect(await svc.retire(orm.em.fork(), viewer(lead2), id, 1)).toMatchObject({ ok: false, status: 409 });
		const owner = await ownerOrm();
		try {
			const conn = owner.em.getConnection();
			const where = `procedure_id = '${id}' and number = 1`;
			await expect(conn.execute(`update procedure_version set source = 'changed' where ${where}`)).rejects.toThrow(
				/immutable/
			);
			await expect(
				conn.execute(`update procedure_version set content_hash = repeat('0', 64) where ${where}`)
			).rejects.toThrow(/immutable/);
			await expect(conn.execute(`update procedure_version set number = 7 where ${where}`)).rejects.toThrow(/immutable/);
			await expect(conn.execute(`update procedure_version set retired_at = now() where ${where}`)).rejects.toThrow(
				/already retired/
			);
			await expect(conn.execute(`delete from procedure_version where ${where}`)).rejects.toThrow(/immutable/);
			await expect(conn.execute(`truncate procedure_version cascade`)).rejects.toThrow(/immutable/);
		} finally {
			await owner.close(true);
		}
		// The app's own role may not even try to delete.
		await expect(
			orm.em.fork().getConnection().execute(`delete from procedure_version where procedure_id = '${id}'`)
		).rejects.toThrow(/permission denied/);
	});

	it('refuses an oversized draft with a clear message and keeps the saved draft as it was', async () => {
		const source = procedureSource();
		const created = await svc.create(orm.em.fork(), viewer(author), source);
		if (!created.ok) throw new Error();
		const huge = source + 'x'.repeat(MAX_DOCUMENT_BYTES);
		const r = await svc.saveDraft(orm.em.fork(), viewer(author), created.value.id, { source: huge });
		expect(r).toMatchObject({ ok: false, status: 400, message: expect.stringMatching(/limit is 1,000,000 bytes/) });
		const kept = await orm.em.fork().findOneOrFail(ProcedureDraft, { procedure: created.value.id });
		expect(kept.source).toBe(source);
		expect(await svc.create(orm.em.fork(), viewer(author), huge)).toMatchObject({ ok: false, status: 400 });
	});

	it('reads an import: problems before saving; a binary or oversized file gets a clear message', () => {
		const good = svc.readImport(new TextEncoder().encode(procedureSource({ tolerance: 'H77' })), 'a.md');
		expect(good).toMatchObject({ ok: true, value: { errors: [{ line: 19 }] } });
		const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d]);
		expect(svc.readImport(png, 'photo.md')).toMatchObject({
			ok: false,
			message: expect.stringMatching(/not a text file/)
		});
		const latin1 = new Uint8Array([0x66, 0xfc, 0x72]); // "für" in Latin-1: not UTF-8
		expect(svc.readImport(latin1, 'old.md')).toMatchObject({ ok: false });
		const big = new Uint8Array(MAX_DOCUMENT_BYTES + 1).fill(0x61);
		expect(svc.readImport(big, 'big.md')).toMatchObject({ ok: false, message: expect.stringMatching(/limit/) });
	});

	it('withdraws a submission when the draft changes, and hides drafts from technicians', async () => {
		const id = await submitted();
		const before = await svc.get(orm.em.fork(), viewer(author), id);
		if (!before.ok) throw new Error();
		await svc.saveDraft(orm.em.fork(), viewer(author), id, {
			source: before.value.draft!.source + '\nOne more line.\n'
		});
		expect(await svc.approve(orm.em.fork(), viewer(lead2), id, { changeNote: 'Too late.' })).toMatchObject({
			ok: false,
			status: 409
		});
		expect(await svc.get(orm.em.fork(), viewer(tech), id)).toMatchObject({ ok: false, status: 404 });
		const rows = await svc.list(orm.em.fork(), viewer(tech));
		expect(rows.some((r) => r.id === id)).toBe(false);
		expect(rows.every((r) => r.draft === null && r.latest !== null)).toBe(true);
	});
});
