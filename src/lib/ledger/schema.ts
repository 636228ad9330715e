/**
 * zod schemas of the ledger envelope: the server validates every incoming record with these before it appends.
 * Kept apart from record.ts so browser code that only hashes does not bundle zod.
 */
import { z } from 'zod';
import { canonicalize, canonicalString, JcsError, type JsonValue } from './jcs';
import { RECORD_KINDS } from './record';

/** 64 lower-case hex digits. */
export const hashSchema = z.string().regex(/^[0-9a-f]{64}$/, 'A record hash is 64 lower-case hexadecimal digits.');

/** How deeply a record body may nest; real bodies are 3–4 levels deep. Bounds the recursion on hostile input. */
export const MAX_BODY_DEPTH = 32;

/** A UTF-16 surrogate unit (paired or not): strings holding one are checked by `canonicalString`. */
const SURROGATE = /[\ud800-\udfff]/;

const hasLoneSurrogate = (s: string): boolean => {
	if (!SURROGATE.test(s)) return false;
	try {
		canonicalString(s);
		return false;
	} catch {
		return true;
	}
};

/**
 * Why `value` is not a ledger body, in ONE iterative walk (no recursion, so hostile nesting cannot overflow it):
 * `'deep'` when arrays/objects nest more than `max` levels, `'bad'` for anything that is not plain JSON — a value
 * other than null, boolean, finite number, string, array or plain object; `undefined` anywhere (JSON has none);
 * an array hole; a lone surrogate in a string or a member name — or null when it is fine. Exactly what `z.json()`
 * and {@link canonicalize} together accepted, without their three walks (a cycle nests without end: `'deep'`).
 */
export function bodyProblem(value: unknown, max = MAX_BODY_DEPTH): 'deep' | 'bad' | null {
	const values: unknown[] = [value];
	const depths: number[] = [0];
	while (values.length) {
		const v = values.pop();
		const depth = depths.pop()!;
		switch (typeof v) {
			case 'boolean':
				continue;
			case 'number':
				if (!Number.isFinite(v)) return 'bad';
				continue;
			case 'string':
				if (hasLoneSurrogate(v)) return 'bad';
				continue;
			case 'object':
				if (v === null) continue;
				break;
			default:
				return 'bad';
		}
		if (depth >= max) return 'deep';
		if (Array.isArray(v)) {
			for (let i = 0; i < v.length; i++) {
				if (!(i in v) || v[i] === undefined) return 'bad';
				values.push(v[i]);
				depths.push(depth + 1);
			}
			continue;
		}
		const proto: unknown = Object.getPrototypeOf(v);
		if (proto !== Object.prototype && proto !== null) return 'bad';
		for (const key of Object.keys(v)) {
			const child = (v as Record<string, unknown>)[key];
			if (child === undefined || hasLoneSurrogate(key)) return 'bad';
			values.push(child);
			depths.push(depth + 1);
		}
	}
	return null;
}

/** The sentence for a body {@link bodyProblem} found bad: `canonicalize`'s own, with the path, where it has one. */
function badBodyMessage(value: unknown): string {
	try {
		canonicalize(value);
	} catch (e) {
		if (e instanceof JcsError) return e.message;
		throw e;
	}
	return 'A record body holds undefined, which is not a JSON value.';
}

/**
 * Any JSON value that {@link canonicalize} accepts (so lone surrogates from `"\ud800"` escapes are refused), nested
 * at most {@link MAX_BODY_DEPTH} levels. One walk ({@link bodyProblem}); the wording of a refusal is worked out only
 * for a refused body.
 */
export const jsonBodySchema = z.unknown().superRefine((value, ctx) => {
	const problem = bodyProblem(value);
	if (problem === 'deep')
		ctx.addIssue({ code: 'custom', message: `A record body may nest at most ${MAX_BODY_DEPTH} levels.` });
	else if (problem === 'bad') ctx.addIssue({ code: 'custom', message: badBodyMessage(value) });
}) as unknown as z.ZodType<JsonValue>;

/** A record kind. */
export const recordKindSchema = z.enum(RECORD_KINDS, { error: 'Unknown record kind.' });

/** What a client submits (see {@link RecordDraft}). */
export const recordDraftSchema = z.strictObject({
	id: z.uuidv7({ error: 'A record id is a uuid v7 made on the device.' }),
	runId: z.uuid({ error: 'The run id must be a uuid.' }),
	kind: recordKindSchema,
	body: jsonBodySchema
});

/** The hashed envelope (see {@link LedgerRecord}); the genesis rule (seq 1 ⇔ prevHash null) is checked too. */
export const ledgerRecordSchema = recordDraftSchema
	.extend({
		seq: z.int().min(1, 'The first record of a run has seq 1.'),
		prevHash: hashSchema.nullable()
	})
	.refine((r) => (r.seq === 1) === (r.prevHash === null), {
		message: 'Only the first record of a run (seq 1) has no previous hash.',
		path: ['prevHash']
	});

/** A stored record (see {@link StoredRecord}). */
export const storedRecordSchema = recordDraftSchema
	.extend({
		seq: z.int().min(1, 'The first record of a run has seq 1.'),
		prevHash: hashSchema.nullable(),
		hash: hashSchema
	})
	.refine((r) => (r.seq === 1) === (r.prevHash === null), {
		message: 'Only the first record of a run (seq 1) has no previous hash.',
		path: ['prevHash']
	});
