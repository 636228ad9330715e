import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { seededRandom } from './backoff';
import { PROBE_CAP_MS, healthProbe, nothingSent, syncOnTriggers, type SyncReason, type SyncResult } from './sync';

const idle: SyncResult = nothingSent();
// A failed exchange with records waiting, the regular retry five minutes away (the back-off's cap).
const failedWaiting = (): SyncResult => ({ ...idle, status: 'failed', sent: 3, nextAttemptAt: Date.now() + 300_000 });

describe('sync when only the server came back (no online event)', () => {
	beforeEach(() => void vi.useFakeTimers({ now: Date.UTC(2026, 11, 2, 8, 0) }));
	afterEach(() => void vi.useRealTimers());

	function wire(results: (() => SyncResult)[], probeAnswers: boolean[]) {
		const calls: { force: boolean; reason: SyncReason; at: number }[] = [];
		const probedAt: number[] = [];
		const visibility = { target: new EventTarget(), visible: () => true };
		const triggers = syncOnTriggers({
			sync: async (force, reason) => {
				calls.push({ force, reason, at: Date.now() });
				return (results.shift() ?? (() => idle))();
			},
			events: new EventTarget(),
			now: Date.now,
			intervalMs: 3_600_000,
			probe: async () => (probedAt.push(Date.now()), probeAnswers.shift() ?? false),
			visibility,
			random: seededRandom(5)
		});
		return { calls, probedAt, triggers, visibility };
	}

	it('probes with the back-off capped at a few seconds and syncs as soon as the server answers', async () => {
		const start = Date.now();
		const { calls, probedAt, triggers } = wire(
			[failedWaiting, () => ({ ...idle, sent: 3, accepted: 3 })],
			[false, false, false, true]
		);
		await vi.advanceTimersByTimeAsync(30_000);
		expect(probedAt).toHaveLength(4);
		const gaps = probedAt.map((t, i) => t - (i === 0 ? start : probedAt[i - 1]));
		for (const g of gaps) expect(g).toBeLessThanOrEqual(PROBE_CAP_MS);
		expect(gaps[0]).toBeGreaterThanOrEqual(1_000); // nextRetryDelay(1): [1 s, 2 s), never immediate
		expect(calls.map((c) => [c.reason, c.force])).toEqual([
			['start', false],
			['probe', true]
		]);
		// Synced within four probes, not at the five-minute retry.
		expect(calls[1].at - start).toBeLessThan(4 * PROBE_CAP_MS);
		// Done: no more probing.
		await vi.advanceTimersByTimeAsync(60_000);
		expect(probedAt).toHaveLength(4);
		triggers.stop();
	});

	it('stops probing when the sync the probe started still fails (the retry schedule takes over), and on stop', async () => {
		const { calls, probedAt, triggers } = wire([failedWaiting, failedWaiting], [true]);
		await vi.advanceTimersByTimeAsync(60_000);
		expect(calls.map((c) => c.reason)).toEqual(['start', 'probe']);
		expect(probedAt).toHaveLength(1);
		triggers.stop();
		await vi.advanceTimersByTimeAsync(600_000);
		expect(calls).toHaveLength(2);
	});

	it('does not probe when nothing waits', async () => {
		const { probedAt, triggers } = wire([() => ({ ...idle, status: 'failed', error: 'store gone' })], []);
		await vi.advanceTimersByTimeAsync(60_000);
		expect(probedAt).toEqual([]);
		triggers.stop();
	});

	it('on coming into view: probes, and syncs (forced) when the server answers', async () => {
		const { calls, probedAt, triggers, visibility } = wire([() => idle], [true]);
		await vi.advanceTimersByTimeAsync(10);
		visibility.target.dispatchEvent(new Event('visibilitychange'));
		await vi.advanceTimersByTimeAsync(10);
		expect(probedAt).toHaveLength(1);
		expect(calls.map((c) => [c.reason, c.force])).toEqual([
			['start', false],
			['visible', true]
		]);
		triggers.stop();
	});
});

describe('healthProbe', () => {
	it('is up only on a 2xx from GET /api/health, down on an error status or no answer', async () => {
		const urls: string[] = [];
		const answering = (status: number) =>
			(async (url: string) => (urls.push(url), new Response('{}', { status }))) as unknown as typeof fetch;
		expect(await healthProbe(answering(200))()).toBe(true);
		expect(await healthProbe(answering(503))()).toBe(false);
		expect(await healthProbe((async () => Promise.reject(new TypeError('Failed to fetch'))) as typeof fetch)()).toBe(
			false
		);
		expect(urls).toEqual(['/api/health', '/api/health']);
	});
});
