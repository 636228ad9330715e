/**
 * `evaluateOnTablet`: the runner's instant judgement, with the very same judging functions as the server's
 * `evaluate` but without zod's parse — the runner builds every entry from its own controls (keypad, taps), so the
 * shape is known, and leaving the schemas out keeps zod out of the tablet's JavaScript. The tablet's verdict is only
 * feedback: the server parses every entry with `entrySchemas` and re-judges it before anything is stored.
 */
import type { Checkpoint } from '../procedure/model';
import { emptyEvaluation, judgeParsed, type EntryData, type Evaluation, type EvaluationContext } from './judge';

/** The entry fields that are lists, per kind: the schemas default them to `[]` when they are missing. */
const LIST_FIELDS: Partial<Record<Checkpoint['kind'], readonly string[]>> = {
	torque: ['passes', 'angles'],
	measure: ['readings'],
	confirm: ['photos'],
	photo: ['photos']
};

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/** `entry` in its parsed shape: missing lists become `[]`, as the schema's defaults make them. */
function withDefaults<K extends Checkpoint['kind']>(kind: K, entry: unknown): EntryData<K> | undefined {
	if (!isRecord(entry)) return undefined;
	const out: Record<string, unknown> = { ...entry };
	for (const f of LIST_FIELDS[kind] ?? []) if (out[f] === undefined) out[f] = [];
	return out as EntryData<K>;
}

/** Judges an entry the runner built against its checkpoint; never throws. */
export function evaluateOnTablet(checkpoint: Checkpoint, entry: unknown, context: EvaluationContext = {}): Evaluation {
	const out = emptyEvaluation(checkpoint);
	if (entry === undefined || entry === null) {
		out.reasons.push('Nothing recorded yet.');
		return out;
	}
	const data = withDefaults(checkpoint.kind, entry);
	if (!data) {
		out.reasons.push('The entry cannot be read (entry: not an object).');
		return out;
	}
	return judgeParsed(checkpoint, data, context, withDefaults, out);
}
