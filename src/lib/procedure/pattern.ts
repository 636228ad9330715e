/**
 * Part-number, serial and lot patterns: a small placeholder language of Benchstamp's own.
 *
 * | write | matches                                   |
 * |-------|-------------------------------------------|
 * | `#`   | one digit 0–9                             |
 * | `@`   | one letter A–Z (either case)              |
 * | `*`   | one letter or digit                       |
 * | `{n}` | after a placeholder: repeat it n times (1–32) |
 * | `\x`  | the character x itself (so `\#` is a hash) |
 * | other | itself; letters match either case          |
 *
 * Patterns are fixed-length and compile to a flat list of character tests, so matching is one
 * pass over the input: no backtracking, no regular expressions, nothing a pattern can do to make
 * matching slow.
 */

/** One position of a compiled pattern. */
export type PatternSlot =
	| { readonly type: 'digit' }
	| { readonly type: 'letter' }
	| { readonly type: 'alnum' }
	| { readonly type: 'literal'; readonly char: string };

/** A compiled pattern; plain data so it can sit in the JSON model. */
export interface CompiledPattern {
	readonly source: string;
	slots: PatternSlot[];
}

/** Longest pattern after `{n}` expansion; part labels are short, and this bounds matching work. */
export const MAX_PATTERN_LENGTH = 64;

/** Compiles a pattern, or explains in one sentence why it cannot be used. */
export function compilePattern(
	source: string
): { ok: true; pattern: CompiledPattern } | { ok: false; message: string } {
	const chars = Array.from(source);
	if (chars.length === 0) return { ok: false, message: 'the pattern is empty' };
	const slots: PatternSlot[] = [];
	for (let i = 0; i < chars.length; i++) {
		const c = chars[i];
		if (c === '\\') {
			const next = chars[i + 1];
			if (next === undefined) return { ok: false, message: 'the pattern ends with "\\"; write "\\\\" for a backslash' };
			slots.push({ type: 'literal', char: next });
			i++;
		} else if (c === '{') {
			const close = chars.indexOf('}', i);
			const prev = slots[slots.length - 1];
			if (!prev || prev.type === 'literal' || close < 0) {
				return { ok: false, message: 'a count such as {4} must follow #, @ or *' };
			}
			const body = chars.slice(i + 1, close).join('');
			if (!/^[0-9]{1,2}$/.test(body) || Number(body) < 1 || Number(body) > 32) {
				return { ok: false, message: `"{${body}}" is not a count from 1 to 32` };
			}
			for (let k = 1; k < Number(body); k++) slots.push(prev);
			i = close;
		} else if (c === '}') {
			return { ok: false, message: '"}" has no matching "{"; write "\\}" for the character itself' };
		} else if (c === '#') slots.push({ type: 'digit' });
		else if (c === '@') slots.push({ type: 'letter' });
		else if (c === '*') slots.push({ type: 'alnum' });
		else slots.push({ type: 'literal', char: c });
		if (slots.length > MAX_PATTERN_LENGTH) {
			return { ok: false, message: `the pattern is longer than ${MAX_PATTERN_LENGTH} characters` };
		}
	}
	return { ok: true, pattern: { source, slots } };
}

const isDigit = (c: string) => c >= '0' && c <= '9';
const isLetter = (c: string) => (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z');

/** True when `text` matches the compiled pattern exactly (whole text, letters in either case). */
export function matchPattern(pattern: CompiledPattern, text: string): boolean {
	const chars = Array.from(text);
	if (chars.length !== pattern.slots.length) return false;
	for (let i = 0; i < chars.length; i++) {
		const c = chars[i];
		const slot = pattern.slots[i];
		switch (slot.type) {
			case 'digit':
				if (!isDigit(c)) return false;
				break;
			case 'letter':
				if (!isLetter(c)) return false;
				break;
			case 'alnum':
				if (!isDigit(c) && !isLetter(c)) return false;
				break;
			case 'literal':
				if (c !== slot.char && c.toUpperCase() !== slot.char.toUpperCase()) return false;
				break;
		}
	}
	return true;
}

/** A short human description of what a pattern expects, e.g. `BX-####-@@` → "BX-, 4 digits, -, 2 letters". */
export function describePattern(pattern: CompiledPattern): string {
	const words: string[] = [];
	let i = 0;
	const name = {
		digit: ['digit', 'digits'],
		letter: ['letter', 'letters'],
		alnum: ['letter or digit', 'letters or digits']
	} as const;
	while (i < pattern.slots.length) {
		const slot = pattern.slots[i];
		if (slot.type === 'literal') {
			let lit = '';
			while (i < pattern.slots.length) {
				const s = pattern.slots[i];
				if (s.type !== 'literal') break;
				lit += s.char;
				i++;
			}
			words.push(`"${lit}"`);
		} else {
			let n = 0;
			while (i < pattern.slots.length && pattern.slots[i].type === slot.type) {
				n++;
				i++;
			}
			words.push(n === 1 ? `1 ${name[slot.type][0]}` : `${n} ${name[slot.type][1]}`);
		}
	}
	return words.join(', ');
}
