import { describe, expect, it } from 'vitest';
import { plural } from './plural';

describe('plural', () => {
	it('says one without an s, any other count with one, thousands grouped', () => {
		expect([plural(1, 'record'), plural(0, 'record'), plural(2, 'anchor'), plural(1_204, 'run')]).toEqual([
			'1 record',
			'0 records',
			'2 anchors',
			'1,204 runs'
		]);
		expect(plural(3, 'body', 'bodies')).toBe('3 bodies');
	});
});
