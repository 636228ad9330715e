/**
 * Identifies the parser + evaluator that produced a model or judged an entry. The server stores it
 * beside every record so a later audit can tell which rules were in force.
 * Bump the minor for additions that keep old documents' meaning; the major when meaning changes.
 */
export const ENGINE_VERSION = 'benchstamp-engine/1.0.0';

/** Largest accepted document, counted in bytes of its UTF-8 encoding (1 000 000 bytes, not MiB). */
export const MAX_DOCUMENT_BYTES = 1_000_000;

/** Largest accepted number of steps (`##` headings) in one procedure. */
export const MAX_STEPS = 500;
