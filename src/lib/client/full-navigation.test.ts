import { describe, expect, it } from 'vitest';
import { needsFullNavigation } from './full-navigation';

const at = (path: string, origin = 'https://bench.kestrel.local') => new URL(path, origin);

describe('full navigation into the bench pages', () => {
	it.each([
		['a job page → the runner', '/jobs/1', '/runs/0190', true],
		['the runner → another run (a version move)', '/runs/0190', '/runs/0191', true],
		['anywhere → the bench', '/library', '/bench', true],
		['the runner → itself with a query', '/runs/0190', '/runs/0190?step=2', false],
		['the bench → the library', '/bench', '/library', false],
		['the bench → a quality run record', '/bench', '/quality/runs/0190', false]
	])('%s: %s', (_what, from, to, expected) => {
		expect(needsFullNavigation(at(from), at(to))).toBe(expected);
	});
	it('leaves another origin alone', () => {
		expect(needsFullNavigation(at('/jobs/1', 'https://elsewhere.example'), at('/runs/0190'))).toBe(false);
	});
});
