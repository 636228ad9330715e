/**
 * The procedure language: parse Markdown procedures into a typed, JSON-serialisable model,
 * render them to safe HTML, and hash their canonical source. Pure TypeScript; runs in browser
 * and Node. Evaluation of entries lives in `$lib/checks/evaluate`.
 */
export { parse, isAllowedImage, isAllowedLink, IMAGE_PREFIX, STEP_ATTRIBUTES_WORD, utf8Length } from './parse';
export {
	render,
	renderProcedure,
	renderStep,
	renderCheckpoint,
	renderMarkdown,
	checkpointSummary,
	limitsText,
	escapeHtml,
	CALLOUT_LABELS
} from './render';
export { contentHash, normaliseSource } from './hash';
export { ENGINE_VERSION, MAX_DOCUMENT_BYTES, MAX_STEPS } from './version';
export {
	compilePattern,
	matchPattern,
	describePattern,
	MAX_PATTERN_LENGTH,
	type CompiledPattern,
	type PatternSlot
} from './pattern';
export { exactToString, exactFromString, limitsFromJson, limitsToJson, type ExactLimits } from './quantity';
export { KIND_KEYS } from './checkpoints';
export * from './model';
