// Imported by the demo seed (outside Vite): relative imports only.
import { UniqueConstraintViolationException } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { diffLines } from 'diff';
import { contentHash, normaliseSource } from '../../procedure/hash';
import type { Problem } from '../../procedure/model';
import { parse, utf8Length } from '../../procedure/parse';
import { ENGINE_VERSION, MAX_DOCUMENT_BYTES } from '../../procedure/version';
import type { RoleName } from '../../accounts/schema';
import type { IProcedure, IProcedureDraft, IProcedureVersion, IUser } from '../db/entities';
import * as adminLog from '../repositories/admin-log';
import * as procedures from '../repositories/procedures';

export interface Viewer {
	id: string;
	name: string;
	roles: readonly RoleName[];
}
export type Result<T = void> =
	| { ok: true; value: T }
	| { ok: false; status: 400 | 403 | 404 | 409; message: string; field?: string; problems?: Problem[] };

const ok = <T>(value: T): Result<T> => ({ ok: true, value });
const refuse = (
	status: 400 | 403 | 404 | 409,
	message: string,
	extra: { field?: string; problems?: Problem[] } = {}
): Result<never> => ({ ok: false, status, message, ...extra });

/** Who may do what (the routes check roles first; the service checks again and adds the four-eyes rule). */
export const may = {
	edit: (v: Viewer) => v.roles.includes('lead') || v.roles.includes('admin'),
	approve: (v: Viewer) => v.roles.includes('lead') || v.roles.includes('quality'),
	retire: (v: Viewer) => v.roles.includes('lead') || v.roles.includes('quality') || v.roles.includes('admin'),
	readDrafts: (v: Viewer) => v.roles.some((r) => r === 'lead' || r === 'quality' || r === 'admin')
};
export const EDIT_ROLES: RoleName[] = ['lead', 'admin'];
export const APPROVE_ROLES: RoleName[] = ['lead', 'quality'];
export const RETIRE_ROLES: RoleName[] = ['lead', 'quality', 'admin'];
export const DRAFT_READ_ROLES: RoleName[] = ['lead', 'quality', 'admin'];

// ---- plain views -------------------------------------------------------------------------------------------

export interface PersonRef {
	id: string;
	name: string;
}
export interface VersionView {
	number: number;
	title: string;
	contentHash: string;
	engineVersion: string;
	changeNote: string;
	author: PersonRef;
	approver: PersonRef;
	publishedAt: string;
	retiredAt: string | null;
	retiredBy: PersonRef | null;
}
export interface DraftView {
	source: string;
	author: PersonRef;
	updatedAt: string;
	updatedBy: PersonRef;
	submittedAt: string | null;
	submittedBy: PersonRef | null;
	contributors: string[];
	contentHash: string;
}
export interface LibraryRow {
	id: string;
	slug: string;
	title: string;
	family: string;
	latest: { number: number; publishedAt: string; retired: boolean } | null;
	draft: { updatedAt: string; submitted: boolean } | null;
	changedAt: string;
	changedBy: string | null;
}
export interface ProcedureView {
	id: string;
	slug: string;
	title: string;
	family: string;
	versions: VersionView[];
	draft: DraftView | null;
}

const person = (u: unknown): PersonRef => {
	const user = u as IUser;
	return { id: user.id, name: user.name };
};
const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null);

function versionView(v: IProcedureVersion, title: string): VersionView {
	return {
		number: v.number,
		title,
		contentHash: v.contentHash,
		engineVersion: v.engineVersion,
		changeNote: v.changeNote,
		author: person(v.author),
		approver: person(v.approver),
		publishedAt: iso(v.publishedAt)!,
		retiredAt: iso(v.retiredAt),
		retiredBy: v.retiredBy ? person(v.retiredBy) : null
	};
}

function draftView(d: IProcedureDraft): DraftView {
	return {
		source: d.source,
		author: person(d.author),
		updatedAt: iso(d.updatedAt)!,
		updatedBy: person(d.updatedBy),
		submittedAt: iso(d.submittedAt),
		submittedBy: d.submittedBy ? person(d.submittedBy) : null,
		contributors: [...d.contributors],
		contentHash: contentHash(d.source)
	};
}

// ---- reading -----------------------------------------------------------------------------------------------

/** The library table. Technicians see only procedures with a published version, and no drafts. */
export async function list(em: EntityManager, viewer: Viewer): Promise<LibraryRow[]> {
	const all = await procedures.listAll(em);
	const versions = await procedures.listVersionsLight(em);
	const drafts = may.readDrafts(viewer) ? await procedures.listDrafts(em) : [];
	const latest = new Map<string, IProcedureVersion>();
	for (const v of versions) latest.set((v.procedure as unknown as IProcedure).id, v);
	const draftOf = new Map(drafts.map((d) => [(d.procedure as unknown as IProcedure).id, d]));
	return all
		.filter((p) => may.readDrafts(viewer) || latest.has(p.id))
		.map((p) => {
			const v = latest.get(p.id);
			const d = draftOf.get(p.id);
			return {
				id: p.id,
				slug: p.slug,
				title: p.title,
				family: p.family,
				latest: v ? { number: v.number, publishedAt: iso(v.publishedAt)!, retired: !!v.retiredAt } : null,
				draft: d ? { updatedAt: iso(d.updatedAt)!, submitted: !!d.submittedAt } : null,
				changedAt: iso(p.changedAt)!,
				changedBy: p.changedBy ? (p.changedBy as unknown as IUser).name : null
			};
		});
}

/** One procedure with its history; the draft only for roles that may read drafts. */
export async function get(em: EntityManager, viewer: Viewer, id: string): Promise<Result<ProcedureView>> {
	const p = await procedures.findById(em, id);
	if (!p) return refuse(404, 'No such procedure.');
	const versions = await procedures.listVersionsLight(em, [p.id]);
	if (!versions.length && !may.readDrafts(viewer)) return refuse(404, 'No such procedure.');
	const draft = may.readDrafts(viewer) ? await procedures.findDraft(em, p.id) : null;
	return ok({
		id: p.id,
		slug: p.slug,
		title: p.title,
		family: p.family,
		versions: versions.map((v) => versionView(v, p.title)),
		draft: draft ? draftView(draft) : null
	});
}

export interface VersionDetail extends VersionView {
	procedureId: string;
	slug: string;
	source: string;
	model: IProcedureVersion['model'];
}

export async function getVersion(em: EntityManager, id: string, number: number): Promise<Result<VersionDetail>> {
	const p = await procedures.findById(em, id);
	const v = p && Number.isSafeInteger(number) ? await procedures.findVersion(em, p.id, number) : null;
	if (!p || !v) return refuse(404, 'No such version.');
	return ok({
		...versionView(v, v.model.meta.title),
		procedureId: p.id,
		slug: p.slug,
		source: v.source,
		model: v.model
	});
}

// ---- validating --------------------------------------------------------------------------------------------

export interface Check {
	bytes: number;
	errors: Problem[];
	warnings: Problem[];
}

export function validate(source: string): Check {
	const r = parse(source);
	return { bytes: utf8Length(source), errors: r.errors, warnings: r.warnings };
}

const tooBig = (bytes: number) =>
	`This document is ${bytes.toLocaleString('en')} bytes (UTF-8); the limit is ${MAX_DOCUMENT_BYTES.toLocaleString('en')} bytes. Nothing was saved — your text is still in the editor. Split it into smaller procedures.`;

/**
 * Reads an uploaded `.md` file: refuses binary content (NUL bytes, not UTF-8) and oversized files with a clear
 * message; otherwise returns the text and its problems, so they can be shown before anything is saved.
 */
export function readImport(bytes: Uint8Array, name: string): Result<Check & { source: string; name: string }> {
	if (bytes.length > MAX_DOCUMENT_BYTES)
		return refuse(400, tooBig(bytes.length).replace(' — your text is still in the editor', ''), { field: 'file' });
	if (bytes.length === 0) return refuse(400, `“${name}” is empty.`, { field: 'file' });
	let text: string;
	try {
		text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
	} catch {
		text = '\u0000';
	}
	if (text.includes('\u0000'))
		return refuse(
			400,
			`“${name}” is not a text file (it looks like an image, a PDF or a word-processor document). Save the procedure as plain Markdown (.md, UTF-8) and import that.`,
			{ field: 'file' }
		);
	const source = text.startsWith('\uFEFF') ? text.slice(1) : text;
	return ok({ ...validate(source), source, name });
}

// ---- writing -----------------------------------------------------------------------------------------------

/** `key: value` of the front matter, read leniently so a draft with errors still gets a title and a slug. */
function frontMatter(source: string): Record<string, string> {
	const m = source.replace(/^\uFEFF/, '').match(/^---\r?\n([\s\S]*?)\r?\n---/);
	const out: Record<string, string> = {};
	for (const line of m?.[1].split(/\r?\n/) ?? []) {
		const kv = line.match(/^([a-z]+):\s*(.*)$/);
		if (kv) out[kv[1]] = kv[2].trim();
	}
	return out;
}

const slugify = (s: string) =>
	s
		.normalize('NFKD')
		.toLowerCase()
		.replace(/[^a-z0-9]+/g, '-')
		.replace(/^-+|-+$/g, '')
		.slice(0, 56) || 'procedure';

async function freeSlug(em: EntityManager, wanted: string): Promise<string> {
	const base = slugify(wanted);
	for (let i = 1; ; i++) {
		const slug = i === 1 ? base : `${base}-${i}`;
		if (!(await procedures.slugTaken(em, slug))) return slug;
	}
}

function checkSize(source: string): Result<number> {
	const bytes = utf8Length(source);
	return bytes > MAX_DOCUMENT_BYTES ? refuse(400, tooBig(bytes), { field: 'source' }) : ok(bytes);
}

const touch = (p: IProcedure, actor: Viewer) => {
	p.changedAt = new Date();
	p.changedBy = actor.id as never;
};

/** A new procedure with its first draft. */
export async function create(em: EntityManager, actor: Viewer, source: string): Promise<Result<{ id: string }>> {
	if (!may.edit(actor)) return refuse(403, 'Only a lead technician or an administrator writes procedures.');
	const size = checkSize(source);
	if (!size.ok) return size;
	const fm = frontMatter(source);
	const title = (fm.title || 'Untitled procedure').slice(0, 200);
	const p = procedures.create(em, {
		slug: await freeSlug(em, fm.id || title),
		title,
		family: (fm.family || '—').slice(0, 200),
		createdBy: actor.id
	});
	procedures.createDraft(em, p, source, actor.id);
	adminLog.append(em, actor, {
		action: 'procedure.created',
		subjectType: 'procedure',
		subjectId: p.id,
		detail: { title }
	});
	await em.flush();
	return ok({ id: p.id });
}

/**
 * Saves the open draft (opening one, from the latest version's text, when there is none). A change after
 * submission withdraws the submission: what an approver approves is what was submitted.
 */
export async function saveDraft(
	em: EntityManager,
	actor: Viewer,
	id: string,
	input: { source: string; baseUpdatedAt?: string }
): Promise<Result<DraftView>> {
	if (!may.edit(actor)) return refuse(403, 'Only a lead technician or an administrator edits procedures.');
	const size = checkSize(input.source);
	if (!size.ok) return size;
	const p = await procedures.findById(em, id);
	if (!p) return refuse(404, 'No such procedure.');
	let draft = await procedures.findDraft(em, p.id);
	if (draft && input.baseUpdatedAt && new Date(input.baseUpdatedAt).getTime() !== new Date(draft.updatedAt).getTime()) {
		return refuse(
			409,
			`${(draft.updatedBy as unknown as IUser).name} saved this draft since you opened it. Your text was not saved; it is still in the editor — copy it, then reload.`
		);
	}
	if (!draft) draft = procedures.createDraft(em, p, input.source, actor.id);
	if (draft.source !== input.source && draft.submittedAt) {
		draft.submittedAt = null;
		draft.submittedBy = null;
	}
	draft.source = input.source;
	draft.updatedAt = new Date();
	draft.updatedBy = actor.id as never;
	if (!draft.contributors.includes(actor.id)) draft.contributors = [...draft.contributors, actor.id];
	const fm = frontMatter(input.source);
	if (fm.title) p.title = fm.title.slice(0, 200);
	if (fm.family) p.family = fm.family.slice(0, 200);
	touch(p, actor);
	await em.flush();
	return ok(draftView((await procedures.findDraft(em, p.id))!));
}

/** Opens a draft from the latest published version, for "Edit" on a procedure that has none. */
export async function openDraft(em: EntityManager, actor: Viewer, id: string): Promise<Result<DraftView>> {
	if (!may.edit(actor)) return refuse(403, 'Only a lead technician or an administrator edits procedures.');
	const p = await procedures.findById(em, id);
	if (!p) return refuse(404, 'No such procedure.');
	const existing = await procedures.findDraft(em, p.id);
	if (existing) return ok(draftView(existing));
	const last = await procedures.lastVersionNumber(em, p.id);
	const v = last ? await procedures.findVersion(em, p.id, last) : null;
	if (!v) return refuse(404, 'This procedure has neither a draft nor a version.');
	return saveDraft(em, actor, id, { source: v.source });
}

export async function submit(em: EntityManager, actor: Viewer, id: string): Promise<Result<DraftView>> {
	if (!may.edit(actor)) return refuse(403, 'Only a lead technician or an administrator submits procedures.');
	const p = await procedures.findById(em, id);
	const draft = p && (await procedures.findDraft(em, p.id));
	if (!p || !draft) return refuse(404, 'There is no open draft to submit.');
	const check = validate(draft.source);
	if (check.errors.length)
		return refuse(400, `The draft has ${check.errors.length} error(s); fix them before submitting.`, {
			problems: check.errors
		});
	if (draft.submittedAt) return ok(draftView(draft));
	draft.submittedAt = new Date();
	draft.submittedBy = actor.id as never;
	touch(p, actor);
	adminLog.append(em, actor, {
		action: 'procedure.submitted',
		subjectType: 'procedure',
		subjectId: p.id,
		detail: { hash: contentHash(draft.source) }
	});
	await em.flush();
	return ok(draftView((await procedures.findDraft(em, p.id))!));
}

/**
 * Publishes the submitted draft as the next version. The draft row is locked FOR UPDATE in the transaction, so of
 * two concurrent approvals one publishes and the other finds no draft; the unique (procedure, number) constraint
 * is the backstop.
 */
export async function approve(
	em: EntityManager,
	actor: Viewer,
	id: string,
	input: { changeNote: string; hash?: string }
): Promise<Result<{ number: number; contentHash: string }>> {
	if (!may.approve(actor)) return refuse(403, 'Approval is for a lead technician or a quality lead.');
	const changeNote = input.changeNote.trim();
	if (changeNote.length < 3)
		return refuse(400, 'Say what changed and why (at least a few words).', { field: 'changeNote' });
	try {
		return await em.transactional(async (tx) => {
			const p = await procedures.findById(tx, id);
			if (!p) return refuse(404, 'No such procedure.');
			const draft = await procedures.lockDraft(tx, p.id);
			if (!draft) return refuse(409, 'There is no open draft: it may just have been approved by someone else.');
			if (!draft.submittedAt) return refuse(409, 'The draft has not been submitted for approval.');
			if (draft.contributors.includes(actor.id))
				return refuse(403, 'You wrote or edited this draft: someone else must approve it.');
			const hash = contentHash(draft.source);
			if (input.hash && input.hash !== hash)
				return refuse(409, 'The draft changed since you read it. Read it again before approving.');
			const parsed = parse(draft.source);
			if (!parsed.procedure || parsed.errors.length)
				return refuse(400, 'The draft has errors and cannot be published.', { problems: parsed.errors });
			const number = (await procedures.lastVersionNumber(tx, p.id)) + 1;
			procedures.createVersion(tx, {
				procedure: p,
				number,
				// Stored normalised (FORMAT.md §6), so a plain sha256 of the stored text is the content hash.
				source: normaliseSource(draft.source),
				model: parsed.procedure,
				contentHash: hash,
				engineVersion: ENGINE_VERSION,
				changeNote,
				author: (draft.author as unknown as IUser).id,
				approver: actor.id,
				publishedAt: new Date()
			});
			p.title = parsed.procedure.meta.title.slice(0, 200);
			p.family = parsed.procedure.meta.family.slice(0, 200);
			touch(p, actor);
			tx.remove(draft);
			adminLog.append(tx, actor, {
				action: 'procedure.approved',
				subjectType: 'procedure',
				subjectId: p.id,
				detail: { version: number, hash, changeNote }
			});
			await tx.flush();
			return ok({ number, contentHash: hash });
		});
	} catch (e) {
		if (e instanceof UniqueConstraintViolationException)
			return refuse(409, 'Another approval published this version at the same moment.');
		throw e;
	}
}

/** Retires a version: no new run may start on it; runs already on it keep it. Set once, by the database's rule. */
export async function retire(
	em: EntityManager,
	actor: Viewer,
	id: string,
	number: number,
	reason?: string
): Promise<Result<VersionView>> {
	if (!may.retire(actor)) return refuse(403, 'Retiring a version is for a lead, a quality lead or an administrator.');
	const p = await procedures.findById(em, id);
	const v = p && Number.isSafeInteger(number) ? await procedures.findVersion(em, p.id, number) : null;
	if (!p || !v) return refuse(404, 'No such version.');
	if (v.retiredAt) return refuse(409, `Version ${number} is already retired.`);
	v.retiredAt = new Date();
	v.retiredBy = actor.id as never;
	touch(p, actor);
	adminLog.append(em, actor, {
		action: 'procedure.retired',
		subjectType: 'procedure',
		subjectId: p.id,
		detail: { version: number, reason: reason || null }
	});
	await em.flush();
	return ok(versionView((await procedures.findVersion(em, p.id, number))!, p.title));
}

export interface DiffLine {
	kind: 'same' | 'added' | 'removed';
	text: string;
	/** Line number in the "from" text (same/removed) and in the "to" text (same/added). */
	fromLine: number | null;
	toLine: number | null;
}
export interface DiffView {
	from: string;
	to: string;
	added: number;
	removed: number;
	lines: DiffLine[];
}

/** Line diff between two versions, or a version and the draft (`'draft'`, for roles that read drafts). */
export async function diff(
	em: EntityManager,
	viewer: Viewer,
	id: string,
	from: number | 'draft',
	to: number | 'draft'
): Promise<Result<DiffView>> {
	const p = await procedures.findById(em, id);
	if (!p) return refuse(404, 'No such procedure.');
	const text = async (which: number | 'draft') => {
		if (which === 'draft') return may.readDrafts(viewer) ? (await procedures.findDraft(em, p.id))?.source : undefined;
		return (await procedures.findVersion(em, p.id, which))?.source;
	};
	const a = await text(from);
	const b = await text(to);
	if (a === undefined || b === undefined) return refuse(404, 'One of the two texts does not exist.');
	const lines: DiffLine[] = [];
	let fromLine = 1;
	let toLine = 1;
	for (const change of diffLines(a.replace(/\r\n?/g, '\n'), b.replace(/\r\n?/g, '\n'))) {
		const parts = change.value.replace(/\n$/, '').split('\n');
		for (const t of parts) {
			if (change.added) lines.push({ kind: 'added', text: t, fromLine: null, toLine: toLine++ });
			else if (change.removed) lines.push({ kind: 'removed', text: t, fromLine: fromLine++, toLine: null });
			else lines.push({ kind: 'same', text: t, fromLine: fromLine++, toLine: toLine++ });
		}
	}
	const label = (w: number | 'draft') => (w === 'draft' ? 'draft' : `v${w}`);
	return ok({
		from: label(from),
		to: label(to),
		added: lines.filter((l) => l.kind === 'added').length,
		removed: lines.filter((l) => l.kind === 'removed').length,
		lines
	});
}

/**
 * Publishes a file as version 1 of a new procedure, with author and approver given — for the demo library at first
 * start only (the seed), where the files in procedures/ are the shop's starting point.
 */
export async function publishInitial(
	em: EntityManager,
	source: string,
	people: { author: Viewer; approver: Viewer; changeNote: string }
): Promise<Result<{ id: string }>> {
	const parsed = parse(source);
	if (!parsed.procedure) return refuse(400, 'The file has errors.', { problems: parsed.errors });
	const meta = parsed.procedure.meta;
	const p = procedures.create(em, {
		slug: await freeSlug(em, meta.id || meta.title),
		title: meta.title.slice(0, 200),
		family: meta.family.slice(0, 200),
		createdBy: people.author.id
	});
	procedures.createVersion(em, {
		procedure: p,
		number: 1,
		source: normaliseSource(source),
		model: parsed.procedure,
		contentHash: contentHash(source),
		engineVersion: ENGINE_VERSION,
		changeNote: people.changeNote,
		author: people.author.id,
		approver: people.approver.id,
		publishedAt: new Date()
	});
	adminLog.append(em, people.approver, {
		action: 'procedure.approved',
		subjectType: 'procedure',
		subjectId: p.id,
		detail: { version: 1, hash: contentHash(source), changeNote: people.changeNote, seeded: true }
	});
	await em.flush();
	return ok({ id: p.id });
}
