import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { openOfflineStore } from './offline-store';
import { STALE_AFTER_MS, enqueue } from './outbox';
import { SyncIndicator } from './sync-state.svelte';
import { freshDbName, recordMaker } from './test-helpers';

const T0 = Date.UTC(2026, 11, 1, 8, 0);

async function until(check: () => boolean) {
	for (let i = 0; i < 200 && !check(); i++) await new Promise((r) => setTimeout(r, 1));
	expect(check()).toBe(true);
}

describe('SyncIndicator', () => {
	it('is unloaded and empty until the first read, then follows writes to the store', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('indicator') });
		let now = T0;
		const indicator = new SyncIndicator(store, () => now);
		expect(indicator.loaded).toBe(false);
		expect(indicator.state.waiting).toBe(0);

		const stop = indicator.start(1_000_000);
		await until(() => indicator.loaded);
		const make = recordMaker(31);
		await enqueue(store, make('run-1', T0), { now: T0 });
		await until(() => indicator.state.waiting === 1);
		expect(indicator.state.staleWarning).toBe(false);

		now = T0 + STALE_AFTER_MS + 1;
		await indicator.refresh();
		expect(indicator.state).toMatchObject({ waiting: 1, oldestWaitingAt: T0, staleWarning: true });

		stop();
		await enqueue(store, make('run-1', T0 + 1), { now: T0 + 1 });
		await new Promise((r) => setTimeout(r, 20));
		expect(indicator.state.waiting).toBe(1); // stopped: no longer following
		await store.close();
	});

	it('shows a read error instead of a false "all synced"', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('indicator-err') });
		await store.close();
		const indicator = new SyncIndicator(store, () => T0);
		await indicator.refresh();
		expect(indicator.loaded).toBe(true);
		expect(indicator.error).toMatch(/closed/);
	});
});
