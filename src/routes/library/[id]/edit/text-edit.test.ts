import { describe, expect, it } from 'vitest';
import { insertAt, offsetOfLine } from './text-edit';

describe('editor text helpers', () => {
	it('finds the start of a line', () => {
		expect(offsetOfLine('a\nbb\nccc', 1)).toBe(0);
		expect(offsetOfLine('a\nbb\nccc', 3)).toBe(5);
		expect(offsetOfLine('a\nbb', 9)).toBe(4);
	});
	it('inserts a block as its own paragraph after the cursor’s line', () => {
		expect(insertAt('Text here\nNext', 4, '```x a\n```').text).toBe('Text here\n\n```x a\n```\n\nNext');
		expect(insertAt('Para\n\n', 6, 'B').text).toBe('Para\n\nB\n\n');
		expect(insertAt('', 0, 'B').text).toBe('B\n\n');
	});
});
