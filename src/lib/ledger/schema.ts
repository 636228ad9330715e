/**
 * zod schemas of the ledger envelope: the server validates every incoming record with these before it appends.
 * Kept apart from record.ts so browser code that only hashes does not bundle zod.
 */
import { z } from 'zod';
import { canonicalize, JcsError, type JsonValue } from './jcs';
import { RECORD_KINDS } from './record';

/** 64 lower-case hex digits. */
export const hashSchema = z.string().regex(/^[0-9a-f]{64}$/, 'A record hash is 64 lower-case hexadecimal digits.');

/** How deeply a record body may nest; real bodies are 3–4 levels deep. Bounds the recursion on hostile input. */
export const MAX_BODY_DEPTH = 32;

/** True when `value` nests arrays/objects more than `max` levels deep (iterative, so it cannot overflow itself). */
function nestsDeeperThan(value: unknown, max: number): boolean {
	const stack: [unknown, number][] = [[value, 0]];
	while (stack.length) {
		const [v, depth] = stack.pop()!;
		if (v === null || typeof v !== 'object') continue;
		if (depth >= max) return true;
		for (const child of Object.values(v)) stack.push([child, depth + 1]);
	}
	return false;
}

/**
 * Any JSON value that {@link canonicalize} accepts (so lone surrogates from `"\ud800"` escapes are refused), nested
 * at most {@link MAX_BODY_DEPTH} levels.
 */
export const jsonBodySchema = z
	.unknown()
	.refine((v) => !nestsDeeperThan(v, MAX_BODY_DEPTH), `A record body may nest at most ${MAX_BODY_DEPTH} levels.`)
	.pipe(
		z.json().superRefine((value, ctx) => {
			try {
				canonicalize(value);
			} catch (e) {
				if (!(e instanceof JcsError)) throw e;
				ctx.addIssue({ code: 'custom', message: e.message });
			}
		})
	) as unknown as z.ZodType<JsonValue>;

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
