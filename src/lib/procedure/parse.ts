/**
 * `parse(source)`: a procedure document (Markdown with YAML front matter and checkpoint blocks)
 * → typed model + problems with 1-based lines. Never throws.
 */
import { Marked, type Token, type Tokens } from 'marked';
import { unitById } from '../checks/units';
import { pairedClearance, parseCheckpoint, sentence, type PendingClearance, type Sink } from './checkpoints';
import { contentHash } from './hash';
import {
	type Block,
	type CalloutLevel,
	CHECKPOINT_ID,
	CHECKPOINT_KINDS,
	type Checkpoint,
	type CheckpointKind,
	type ParseResult,
	type Problem,
	type Procedure,
	type ProcedureMeta,
	ProcedureSchema,
	type Step
} from './model';
import { limitsFromJson, limitsToJson } from './quantity';
import { ENGINE_VERSION, MAX_DOCUMENT_BYTES, MAX_STEPS } from './version';
import { asList, asText, readYamlBody, suggestion, type YEntry } from './yaml-body';

/** Info-string word that opens a step's attribute block. */
export const STEP_ATTRIBUTES_WORD = 'step';
const STEP_KEYS = ['critical', 'minutes', 'tools', 'qualification'] as const;
const META_KEYS = ['title', 'family', 'purpose', 'id', 'revision', 'specs'] as const;

/** Image targets must be images stored by the app: `/images/<id>`. */
export const IMAGE_PREFIX = '/images/';
export const IMAGE_PATH = /^\/images\/[A-Za-z0-9][A-Za-z0-9._-]{0,127}$/;

/** Link targets allowed in prose: http(s), mailto, or relative (not protocol-relative). */
export function isAllowedLink(href: string): boolean {
	const h = href.trim();
	if (/^(https?:\/\/|mailto:)/i.test(h)) return true;
	if (h.startsWith('//')) return false;
	// Relative: no scheme before the first "/", "?" or "#".
	return !/^[^/?#]*:/.test(h) && ![...h].some((c) => c.charCodeAt(0) < 0x20);
}

/** True when an image target is one of the app's stored images. */
export function isAllowedImage(src: string): boolean {
	return IMAGE_PATH.test(src.trim()) && !src.includes('..');
}

/** Shared lexer; a private instance so no one's `marked.use()` changes how procedures read. */
const markdown = new Marked({ gfm: true });

/** Byte length of the UTF-8 encoding, without allocating the bytes. */
export function utf8Length(s: string): number {
	let n = 0;
	for (let i = 0; i < s.length; i++) {
		const c = s.charCodeAt(i);
		if (c < 0x80) n += 1;
		else if (c < 0x800) n += 2;
		else if (c >= 0xd800 && c <= 0xdbff && i + 1 < s.length && (s.charCodeAt(i + 1) & 0xfc00) === 0xdc00) {
			n += 4;
			i++;
		} else n += 3;
	}
	return n;
}

class Lines {
	private readonly starts: number[] = [0];
	constructor(readonly text: string) {
		for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) this.starts.push(i + 1);
	}
	get count(): number {
		return this.starts.length;
	}
	/** 1-based line and column of an offset. */
	at(offset: number): { line: number; column: number } {
		let lo = 0;
		let hi = this.starts.length - 1;
		while (lo < hi) {
			const mid = (lo + hi + 1) >> 1;
			if (this.starts[mid] <= offset) lo = mid;
			else hi = mid - 1;
		}
		return { line: lo + 1, column: offset - this.starts[lo] + 1 };
	}
}

const CALLOUT = /^\s*(warning|caution|note)\s*:\s*/i;

/**
 * Parses a procedure document. Never throws: an unexpected internal failure becomes an error
 * at line 1 so the editor can still show something.
 */
export function parse(source: string): ParseResult {
	try {
		return parseUnsafe(source);
	} catch (e) {
		return {
			procedure: null,
			errors: [
				{
					line: 1,
					column: 1,
					message: `Benchstamp could not read this document (internal error: ${e instanceof Error ? e.message : String(e)}). Please report it.`
				}
			],
			warnings: []
		};
	}
}

function parseUnsafe(source: string): ParseResult {
	const errors: Problem[] = [];
	const warnings: Problem[] = [];
	if (typeof source !== 'string') {
		return { procedure: null, errors: [{ line: 1, column: 1, message: 'The document is not text.' }], warnings };
	}
	const bytes = utf8Length(source);
	if (bytes > MAX_DOCUMENT_BYTES) {
		errors.push({
			line: 1,
			column: 1,
			message: `This document is ${bytes.toLocaleString('en-US')} bytes (UTF-8); the limit is ${MAX_DOCUMENT_BYTES.toLocaleString('en-US')} bytes. Split it into smaller procedures.`
		});
		return { procedure: null, errors, warnings };
	}
	// Same line count as the original: only CRLF/CR pairs collapse, a BOM is dropped.
	const text = (source.startsWith('\uFEFF') ? source.slice(1) : source).replace(/\r\n?/g, '\n');
	const lines = new Lines(text);

	// ---- front matter
	let meta: ProcedureMeta | undefined;
	let bodyStart = 0;
	const fm = /^---[ \t]*\n/.exec(text);
	if (!fm) {
		errors.push({
			line: 1,
			column: 1,
			message: 'The document must begin with front matter: a line "---", then title, family and purpose, then "---".'
		});
	} else {
		const close = /^(?:---|\.\.\.)[ \t]*$/m;
		const rest = text.slice(fm[0].length);
		const m = close.exec(rest);
		if (!m) {
			errors.push({ line: 1, column: 1, message: 'The front matter has no closing "---" line.' });
		} else {
			const yamlText = rest.slice(0, m.index);
			bodyStart = fm[0].length + m.index + m[0].length;
			const body = readYamlBody(yamlText, 2);
			for (const p of body.errors) errors.push({ ...p, message: `Front matter: ${sentence(p.message)}` });
			for (const p of body.warnings) warnings.push({ ...p, message: `Front matter: ${sentence(p.message)}` });
			if (body.errors.length === 0) meta = readMeta(body.entries, errors, warnings);
		}
	}

	// ---- body
	const bodyText = text.slice(bodyStart);
	const tokens = markdown.lexer(bodyText);
	const intro: Block[] = [];
	const steps: Step[] = [];
	const ids = new Map<string, { line: number }>();
	const checkpoints: (Checkpoint | PendingClearance)[] = [];
	let offset = bodyStart;
	let tooMany = false;

	const problem = (
		list: Problem[],
		pos: { line: number; column: number },
		message: string,
		stepIndex?: number,
		checkpointId?: string
	) => {
		const prefix =
			stepIndex === undefined
				? ''
				: checkpointId
					? `Step ${stepIndex + 1}, checkpoint ${checkpointId}: `
					: `Step ${stepIndex + 1}: `;
		list.push({
			line: pos.line,
			column: pos.column,
			message: prefix ? prefix + message : message.charAt(0).toUpperCase() + message.slice(1),
			...(stepIndex !== undefined && { stepIndex }),
			...(checkpointId !== undefined && { checkpointId })
		});
	};

	for (const token of tokens) {
		const start = text.indexOf(token.raw, offset) >= 0 && token.raw !== '' ? text.indexOf(token.raw, offset) : offset;
		offset = start + token.raw.length;
		const pos = lines.at(start);
		const current = steps[steps.length - 1];
		const stepIndex = current?.index;
		const blocks = current ? current.blocks : intro;

		if (token.type === 'heading' && token.depth === 2) {
			if (steps.length >= MAX_STEPS) {
				if (!tooMany) {
					problem(
						errors,
						pos,
						`This procedure has more than ${MAX_STEPS} steps (the limit); split it into smaller procedures.`
					);
					tooMany = true;
				}
				continue;
			}
			const title = token.text.trim();
			if (title === '') problem(errors, pos, 'A step heading needs a title after "##".');
			steps.push({
				index: steps.length,
				title,
				line: pos.line,
				critical: false,
				tools: [],
				blocks: [],
				checkpoints: []
			});
			continue;
		}
		if (tooMany) continue;
		if (token.type === 'heading' && token.depth === 1) {
			problem(
				warnings,
				pos,
				'A "#" heading is shown as text; the title comes from the front matter and steps start with "##".',
				stepIndex
			);
		}
		if (token.type === 'code' && (token as Tokens.Code).lang) {
			const code = token as Tokens.Code;
			const [word, ...restWords] = (code.lang ?? '').trim().split(/\s+/);
			const kindWord = word.toLowerCase();
			const firstLine = pos.line + 1;
			const indent = /^ */.exec(token.raw)?.[0].length ?? 0;
			const fenceOk = /^ {0,3}(`{3,}|~{3,})/.test(token.raw);
			if (!fenceOk) {
				blocks.push({ type: 'markdown', markdown: token.raw, line: pos.line });
				continue;
			}
			if (kindWord === STEP_ATTRIBUTES_WORD) {
				if (!current) {
					problem(errors, pos, 'A "step" attribute block must come after a "##" step heading.');
					continue;
				}
				readStepAttributes(current, code.text, firstLine, indent, pos, errors, warnings, problem);
				continue;
			}
			if (!(CHECKPOINT_KINDS as readonly string[]).includes(kindWord)) {
				problem(
					errors,
					pos,
					`"${word}" is not a checkpoint kind; use one of ${CHECKPOINT_KINDS.join(', ')}.${suggestion(kindWord, CHECKPOINT_KINDS)} For a plain code sample, leave the info string empty.`,
					stepIndex
				);
				continue;
			}
			const kind = kindWord as CheckpointKind;
			const id = restWords[0];
			if (!current) {
				problem(
					errors,
					pos,
					`Checkpoint ${id ?? `(${kind})`} comes before the first step; put it under a "##" step heading.`
				);
				continue;
			}
			if (!id) {
				problem(
					errors,
					pos,
					`a ${kind} checkpoint needs an id after the kind, such as "${kind} ${kind === 'torque' ? 'pan-bolts' : 'bore-1'}".`,
					stepIndex
				);
				continue;
			}
			if (!CHECKPOINT_ID.test(id)) {
				problem(
					errors,
					pos,
					`"${id}" cannot be a checkpoint id; use lower-case letters, digits and hyphens (up to 48), such as bore-2.`,
					stepIndex
				);
				continue;
			}
			if (restWords.length > 1)
				problem(
					warnings,
					pos,
					`only the kind and the id belong after the fence; "${restWords.slice(1).join(' ')}" is ignored.`,
					stepIndex,
					id
				);
			const seen = ids.get(id);
			if (seen) {
				problem(
					errors,
					pos,
					`the id "${id}" is already used by the checkpoint on line ${seen.line}; each checkpoint needs its own id.`,
					stepIndex,
					id
				);
				continue;
			}
			ids.set(id, { line: pos.line });
			const body = readYamlBody(code.text, firstLine, indent);
			for (const p of body.errors) problem(errors, p, sentence(p.message), stepIndex, id);
			for (const p of body.warnings) problem(warnings, p, sentence(p.message), stepIndex, id);
			if (body.errors.length) continue;
			const sink: Sink = {
				error: (at, message) => problem(errors, at ?? pos, message, stepIndex, id),
				warning: (at, message) => problem(warnings, at ?? pos, message, stepIndex, id)
			};
			const cp = parseCheckpoint(
				{ kind, id, line: pos.line, column: pos.column, stepIndex: current.index, entries: body.entries },
				sink
			);
			if (cp) {
				checkpoints.push(cp);
				current.checkpoints.push(cp as Checkpoint);
				current.blocks.push({ type: 'checkpoint', id });
			}
			continue;
		}
		if (token.type === 'blockquote') {
			const bq = token as Tokens.Blockquote;
			const m = CALLOUT.exec(bq.text);
			inspectInline(token, start, text, lines, warnings, problem, stepIndex);
			if (m) {
				const level = m[1].toLowerCase() as CalloutLevel;
				blocks.push({ type: 'callout', level, markdown: bq.text.slice(m[0].length), line: pos.line });
				continue;
			}
		}
		if (token.type === 'html') {
			problem(warnings, pos, 'Raw HTML is not allowed in a procedure; it is shown as plain text.', stepIndex);
		} else if (token.type !== 'blockquote') {
			inspectInline(token, start, text, lines, warnings, problem, stepIndex);
		}
		if (token.type === 'space') continue;
		// Adjacent prose merges into one block so the model stays small.
		const last = blocks[blocks.length - 1];
		if (last && last.type === 'markdown' && token.type !== 'heading') last.markdown += token.raw;
		else blocks.push({ type: 'markdown', markdown: token.raw, line: pos.line });
	}

	// ---- cross references
	const byId = new Map(checkpoints.map((c) => [c.id, c]));
	for (const cp of checkpoints) {
		if (cp.kind === 'clearance') resolveClearance(cp, byId, errors, problem);
		if (cp.kind === 'choice') {
			for (const opt of cp.options) {
				for (const ref of opt.then) {
					const target = byId.get(ref);
					const pos = { line: cp.line, column: 1 };
					if (!target) {
						problem(
							errors,
							pos,
							`option "${opt.key}" needs checkpoint "${ref}", but there is no checkpoint with that id${ids.has(ref) ? ' that parsed without errors' : ''}.`,
							cp.stepIndex,
							cp.id
						);
					} else if (ref === cp.id) {
						problem(errors, pos, `a choice cannot require itself.`, cp.stepIndex, cp.id);
					} else {
						const when = target.when ?? { choice: cp.id, options: [] };
						if (when.choice !== cp.id) {
							problem(
								errors,
								pos,
								`checkpoint "${ref}" is already made conditional by choice "${when.choice}"; one choice per checkpoint.`,
								cp.stepIndex,
								cp.id
							);
						} else {
							if (!when.options.includes(opt.key)) when.options.push(opt.key);
							target.when = when;
						}
					}
				}
			}
		}
	}

	if (!meta || errors.length > 0)
		return { procedure: null, errors: sortProblems(errors), warnings: sortProblems(warnings) };
	const procedure: Procedure = { engine: ENGINE_VERSION, hash: contentHash(source), meta, intro, steps };
	const checked = ProcedureSchema.safeParse(procedure);
	if (!checked.success) {
		const issue = checked.error.issues[0];
		errors.push({
			line: 1,
			column: 1,
			message: `Internal check of the model failed at ${issue.path.join('.')}: ${issue.message}. Please report it.`
		});
		return { procedure: null, errors, warnings: sortProblems(warnings) };
	}
	return { procedure: checked.data, errors: [], warnings: sortProblems(warnings) };
}

type ProblemFn = (
	list: Problem[],
	pos: { line: number; column: number },
	message: string,
	stepIndex?: number,
	checkpointId?: string
) => void;

function sortProblems(list: Problem[]): Problem[] {
	return list.sort((a, b) => a.line - b.line || a.column - b.column);
}

function readMeta(entries: YEntry[], errors: Problem[], warnings: Problem[]): ProcedureMeta | undefined {
	const get = (k: string) => entries.find((e) => e.key === k);
	for (const e of entries) {
		if (!(META_KEYS as readonly string[]).includes(e.key)) {
			warnings.push({
				line: e.line,
				column: e.column,
				message: `Front matter: "${e.key}" is not a front-matter key, so it is ignored.${suggestion(e.key, META_KEYS)}`
			});
		}
	}
	const out: Partial<ProcedureMeta> = {};
	let ok = true;
	for (const key of META_KEYS) {
		const e = get(key);
		const required = key === 'title' || key === 'family' || key === 'purpose';
		if (!e) {
			if (required) {
				errors.push({
					line: 1,
					column: 1,
					message: `Front matter: "${key}" is missing; add a line such as "${key}: ${key === 'title' ? 'Valve body teardown' : key === 'family' ? 'KX-7 (invented)' : 'Why this procedure exists'}".`
				});
				ok = false;
			}
			continue;
		}
		const t = asText(e.value)?.trim();
		if (!t) {
			errors.push({ line: e.line, column: e.column, message: `Front matter: "${key}" is empty or not plain text.` });
			ok = false;
			continue;
		}
		out[key] = t;
	}
	return ok ? (out as ProcedureMeta) : undefined;
}

function readStepAttributes(
	step: Step,
	body: string,
	firstLine: number,
	indent: number,
	pos: { line: number; column: number },
	errors: Problem[],
	warnings: Problem[],
	problem: ProblemFn
) {
	const seen = (step as Step & { _attrs?: boolean })._attrs;
	if (seen) {
		problem(errors, pos, 'this step already has a "step" attribute block; keep one.', step.index);
		return;
	}
	Object.defineProperty(step, '_attrs', { value: true, enumerable: false });
	const y = readYamlBody(body, firstLine, indent);
	for (const p of y.errors) problem(errors, p, sentence(p.message), step.index);
	for (const p of y.warnings) problem(warnings, p, sentence(p.message), step.index);
	for (const e of y.entries) {
		const t = asText(e.value)?.trim() ?? '';
		switch (e.key) {
			case 'critical': {
				const v = t.toLowerCase();
				if (['yes', 'true'].includes(v)) step.critical = true;
				else if (['no', 'false'].includes(v)) step.critical = false;
				else problem(errors, e, `"critical" must be yes or no; "${t}" is neither.`, step.index);
				break;
			}
			case 'minutes': {
				if (!/^\d+(?:\.\d+)?$/.test(t) || Number(t) <= 0 || Number(t) > 10000)
					problem(errors, e, `"minutes" must be a number of minutes above 0, such as 15; "${t}" is not.`, step.index);
				else step.minutes = Number(t);
				break;
			}
			case 'tools': {
				const l = asList(e.value);
				if (!l) problem(errors, e, `"tools" must be a list such as [torque wrench, dial bore gauge].`, step.index);
				else step.tools = l;
				break;
			}
			case 'qualification': {
				if (t === '') problem(errors, e, `"qualification" is empty.`, step.index);
				else step.qualification = t;
				break;
			}
			default:
				problem(
					warnings,
					e,
					`"${e.key}" is not a step attribute, so it is ignored.${suggestion(e.key, STEP_KEYS)}`,
					step.index
				);
		}
	}
}

/** Walks inline content for images and links the renderer will drop, and for raw HTML. */
function inspectInline(
	token: Token,
	start: number,
	text: string,
	lines: Lines,
	warnings: Problem[],
	problem: ProblemFn,
	stepIndex: number | undefined
) {
	let searchFrom = start;
	const where = (needle: string) => {
		const i = needle ? text.indexOf(needle, searchFrom) : -1;
		if (i >= 0) searchFrom = i;
		return lines.at(i >= 0 ? i : start);
	};
	const visit = (t: Token) => {
		if (t.type === 'image') {
			const img = t as Tokens.Image;
			if (!isAllowedImage(img.href)) {
				problem(
					warnings,
					where(img.href),
					`the image "${img.href}" is not one of this app's stored images (${IMAGE_PREFIX}<id>), so it is left out.`,
					stepIndex
				);
			}
		} else if (t.type === 'link') {
			const link = t as Tokens.Link;
			if (!isAllowedLink(link.href)) {
				problem(
					warnings,
					where(link.href),
					`the link "${link.href}" is not http(s), mailto or a page of this app, so it is shown as plain text.`,
					stepIndex
				);
			}
		} else if (t.type === 'html' && token.type !== 'html') {
			problem(warnings, where(t.raw), 'Raw HTML is not allowed in a procedure; it is shown as plain text.', stepIndex);
		} else if (t.type === 'code' && (t as Tokens.Code).lang && t !== token) {
			problem(
				warnings,
				where(t.raw.trim().split('\n')[0]),
				`a checkpoint or attribute block inside a list or quote is not read; start the fence at the beginning of a line.`,
				stepIndex
			);
		}
		const children = (t as { tokens?: Token[] }).tokens;
		if (children) children.forEach(visit);
		const items = (t as { items?: Token[] }).items;
		if (items) items.forEach(visit);
		const rows = (t as Tokens.Table).rows;
		const header = (t as Tokens.Table).header;
		if (t.type === 'table') {
			for (const cell of header) cell.tokens.forEach(visit);
			for (const row of rows) for (const cell of row) cell.tokens.forEach(visit);
		}
	};
	visit(token);
}

function resolveClearance(
	cp: PendingClearance,
	byId: Map<string, Checkpoint | PendingClearance>,
	errors: Problem[],
	problem: ProblemFn
) {
	const pos = { line: cp.line, column: 1 };
	if (cp.bore === undefined || cp.shaft === undefined) {
		if (!cp.limits) problem(errors, pos, 'the clearance has no limits; add "limits" or a "fit".', cp.stepIndex, cp.id);
		return;
	}
	const refs: Checkpoint[] = [];
	for (const [role, ref] of [
		['bore', cp.bore],
		['shaft', cp.shaft]
	] as const) {
		const target = byId.get(ref);
		if (!target) {
			problem(
				errors,
				pos,
				`"${role}: ${ref}" names a checkpoint that does not exist (or has errors); use the id of a measure checkpoint.`,
				cp.stepIndex,
				cp.id
			);
			return;
		}
		if (target.kind !== 'measure') {
			problem(
				errors,
				pos,
				`"${role}: ${ref}" is a ${target.kind} checkpoint; a clearance needs measure checkpoints.`,
				cp.stepIndex,
				cp.id
			);
			return;
		}
		if (target.feature && target.feature !== role) {
			problem(
				errors,
				pos,
				`"${role}: ${ref}" measures a ${target.feature}; check which is the bore and which the shaft.`,
				cp.stepIndex,
				cp.id
			);
			return;
		}
		refs.push(target as Checkpoint);
	}
	if (cp.bore === cp.shaft) {
		problem(errors, pos, '"bore" and "shaft" must be two different measure checkpoints.', cp.stepIndex, cp.id);
		return;
	}
	if (!cp.limits) {
		const [b, s] = refs as [Extract<Checkpoint, { kind: 'measure' }>, Extract<Checkpoint, { kind: 'measure' }>];
		const unit = unitById(b.unit);
		const pair = pairedClearance(limitsFromJson(b.stages[0].limits), limitsFromJson(s.stages[0].limits), unit);
		if (!pair) {
			problem(
				errors,
				pos,
				`the clearance cannot be worked out from one-sided limits; add "limits", such as 0.020 to 0.060 mm.`,
				cp.stepIndex,
				cp.id
			);
			return;
		}
		cp.limits = limitsToJson(pair);
	}
}
