/**
 * `evaluate(checkpoint, entry, context)`: judges what a technician recorded against a parsed
 * checkpoint. Pure and deterministic — the server runs it to decide what is stored, the tablet runs the same judging
 * functions (`evaluateOnTablet`) for instant feedback — so nothing here reads the clock,
 * randomness, or anything outside its arguments.
 *
 * Readings arrive as decimal strings with a unit id and are judged exactly (rational arithmetic);
 * display text is rounded to the instrument's resolution, judging never is.
 */
import type { Checkpoint } from '../procedure/model';
import { entrySchemas } from './entry-schemas';
import { emptyEvaluation, judgeParsed, type EntryData, type Evaluation, type EvaluationContext } from './judge';

export { entrySchemas, TorqueToolContextSchema, type EntryOf, type TorqueToolContext } from './entry-schemas';
export {
	roundToResolution,
	type EntryData,
	type Evaluation,
	type EvaluationContext,
	type ReadingResult,
	type Status
} from './judge';

const parseEntry = <K extends Checkpoint['kind']>(kind: K, entry: unknown): EntryData<K> | undefined => {
	const parsed = entrySchemas[kind].safeParse(entry);
	return parsed.success ? (parsed.data as EntryData<K>) : undefined;
};

/**
 * Judges an entry against its checkpoint. Never throws; an unreadable entry is `incomplete`
 * with a reason. `entry` is validated with `entrySchemas[checkpoint.kind]`.
 */
export function evaluate(checkpoint: Checkpoint, entry: unknown, context: EvaluationContext = {}): Evaluation {
	const out = emptyEvaluation(checkpoint);
	if (entry === undefined || entry === null) {
		out.reasons.push('Nothing recorded yet.');
		return out;
	}
	const parsed = entrySchemas[checkpoint.kind].safeParse(entry);
	if (!parsed.success) {
		const issue = parsed.error.issues[0];
		out.reasons.push(`The entry cannot be read (${issue.path.join('.') || 'entry'}: ${issue.message}).`);
		return out;
	}
	return judgeParsed(checkpoint, parsed.data, context, parseEntry, out);
}
