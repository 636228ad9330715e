import { sha256 } from '@noble/hashes/sha2.js';
import { bytesToHex, utf8ToBytes } from '@noble/hashes/utils.js';

/**
 * The canonical form of a procedure's source, the text the content hash is taken over.
 *
 * - a leading byte-order mark is removed;
 * - CRLF and lone CR become LF (editors on different tablets disagree, the meaning does not);
 * - Unicode is put in NFC so "é" typed two ways hashes the same;
 * - trailing blank lines are dropped and exactly one final LF is added.
 *
 * Trailing spaces inside lines are kept: two trailing spaces are a line break in Markdown, so
 * removing them could make two documents that render differently hash the same.
 */
export function normaliseSource(source: string): string {
	let text = source.startsWith('\uFEFF') ? source.slice(1) : source;
	text = text.replace(/\r\n?/g, '\n').normalize('NFC');
	text = text.replace(/\n+$/, '');
	return text + '\n';
}

/** sha256 (lower-case hex) of {@link normaliseSource}(source); same result in browser and Node. */
export function contentHash(source: string): string {
	return bytesToHex(sha256(utf8ToBytes(normaliseSource(source))));
}
