import { describe, expect, it } from 'vitest';
import { emptySyncState } from '$lib/client/sync-state.svelte';
import { ago, syncWords } from './sync-words';

const now = Date.UTC(2026, 11, 1, 12, 0);

describe('sync indicator words', () => {
	it('says all synced, or offline with nothing waiting', () => {
		const s = { ...emptySyncState(), lastSuccessAt: now - 120_000 };
		expect(syncWords(s, now, true)).toMatchObject({ tone: 'pass', headline: 'All synced' });
		expect(syncWords(s, now, true).lines[0]).toBe('Last synced 2 min ago.');
		expect(syncWords(s, now, false).headline).toBe('Offline · nothing waiting');
	});
	it('counts records and photos waiting', () => {
		const s = { ...emptySyncState(), waiting: 5, photosWaiting: 1 };
		expect(syncWords(s, now, false)).toMatchObject({ tone: 'warn', headline: '6 waiting' });
		expect(syncWords(s, now, false).lines).toContain('1 photo waiting to upload.');
	});
	it('warns after 8 hours and flags a clock more than 5 minutes off', () => {
		const s = {
			...emptySyncState(),
			waiting: 2,
			staleWarning: true,
			oldestWaitingAt: now - 9 * 3_600_000,
			clockOffsetMs: -7 * 60_000
		};
		const w = syncWords(s, now, true);
		expect(w.headline).toBe('2 waiting over 8 h');
		expect(w.lines.join(' ')).toMatch(/9 h 0 min ago — more than 8 hours/);
		expect(w.lines.join(' ')).toMatch(/7 min off the server's/);
	});
	it('puts refused records first', () => {
		const w = syncWords({ ...emptySyncState(), refused: 1, waiting: 3 }, now, true);
		expect(w).toMatchObject({ tone: 'fail', headline: '1 record refused' });
	});
	it('writes times a technician reads at a glance', () => {
		expect(ago(now - 30_000, now)).toBe('just now');
		expect(ago(now - 3 * 3_600_000 - 10 * 60_000, now)).toBe('3 h 10 min ago');
		expect(ago(now - 2 * 86_400_000, now)).toBe('on 2026-11-29 12:00 UTC');
	});
});
