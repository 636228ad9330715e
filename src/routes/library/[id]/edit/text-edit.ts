/** 0-based offset of the start of 1-based `line` (clamped to the text). */
export function offsetOfLine(text: string, line: number): number {
	let offset = 0;
	for (let l = 1; l < line; l++) {
		const next = text.indexOf('\n', offset);
		if (next < 0) return text.length;
		offset = next + 1;
	}
	return offset;
}

/**
 * Inserts a fenced block at the cursor as its own paragraph: moved to the end of the cursor's line, with a blank
 * line before and after. Returns the new text and the cursor position after the block.
 */
export function insertAt(text: string, cursor: number, block: string): { text: string; cursor: number } {
	const lineEnd = text.indexOf('\n', cursor);
	const at = cursor > 0 && text[cursor - 1] !== '\n' ? (lineEnd < 0 ? text.length : lineEnd) : cursor;
	const before = text.slice(0, at);
	const after = text.slice(at);
	const lead = before === '' || before.endsWith('\n\n') ? '' : before.endsWith('\n') ? '\n' : '\n\n';
	const trail = after.startsWith('\n\n') ? '' : after.startsWith('\n') ? '\n' : '\n\n';
	const inserted = lead + block + trail;
	return { text: before + inserted + after, cursor: before.length + lead.length + block.length + 1 };
}
