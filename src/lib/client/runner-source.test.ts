import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { contentHash } from '$lib/procedure';
import type { OfflineRunnerView } from '$lib/server/services/offline.service';
import { applyAnswers, clearRefused, enqueue } from './outbox';
import { getRun, openOfflineStore } from './offline-store';
import { htmlWithStoredImages, makeAvailable, NotOnThisTablet, openRun, type FetchLike } from './runner-source';
import { freshDbName, recordMaker, runnerViewFor } from './test-helpers';

const IMAGE_ID = '0190f5d2-6c1e-7a51-9c2b-3f4e5d6c7b8a';

function viewFor(runId: string, overrides: Partial<OfflineRunnerView> = {}): OfflineRunnerView {
	return runnerViewFor(runId, {
		stepHtml: [`<p>Step</p><img src="/images/${IMAGE_ID}" alt="plate">`],
		images: [{ id: IMAGE_ID, sha256: 'a'.repeat(64) }],
		...overrides
	});
}

/** A fake server: the runner view and one picture, or down. */
function server(view: OfflineRunnerView | null, log: string[] = []): FetchLike {
	return async (url) => {
		log.push(url);
		if (!view) throw new TypeError('Failed to fetch');
		if (url.endsWith('/runner')) return new Response(JSON.stringify(view), { status: 200 });
		if (url === `/images/${IMAGE_ID}`) return new Response(new Blob([new Uint8Array([1, 2, 3])]), { status: 200 });
		return new Response('{}', { status: 404 });
	};
}

describe('the runner reads from the tablet store', () => {
	it('makes a run available: view, source, pictures stored; a source not matching its hash is refused', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('src') });
		const stored = await makeAvailable(store, server(viewFor('run-a')), 'run-a', 10);
		expect(stored.view?.run.id).toBe('run-a');
		expect(stored.images[0].blob?.size).toBe(3);
		expect((await getRun(store, 'run-a'))?.source).toBe(stored.source);
		const tampered = viewFor('run-b', { source: viewFor('run-b').source + '\nmore' });
		await expect(makeAvailable(store, server(tampered), 'run-b')).rejects.toThrow(/does not match/);
		expect(await getRun(store, 'run-b')).toBeUndefined();
		expect(contentHash(tampered.source)).not.toBe(tampered.run.contentHash);
	});

	it('opens the same view from the store when the server is down, with waiting records laid over it', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('src') });
		await makeAvailable(store, server(viewFor('run-a')), 'run-a');
		const make = recordMaker(3);
		await enqueue(store, make('run-a', 1_000), { now: 1_000 });
		await enqueue(store, make('run-other', 1_001), { now: 1_001 });
		const opened = await openRun(store, server(null), 'run-a');
		expect(opened.origin).toBe('tablet');
		expect(opened.view.run.id).toBe('run-a');
		expect(opened.pending.map((r) => r.runId)).toEqual(['run-a']);
		const online = await openRun(store, server(viewFor('run-a')), 'run-a');
		expect(online.origin).toBe('server');
	});

	it('lists the records of the run the server refused at sync, with the reason, until they are dealt with', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('src') });
		await makeAvailable(store, server(viewFor('run-a')), 'run-a');
		const make = recordMaker(4);
		const mine = make('run-a', 1_000);
		const other = make('run-other', 1_001);
		await enqueue(store, mine, { now: 1_000 });
		await enqueue(store, other, { now: 1_001 });
		await applyAnswers(
			store,
			[
				{ id: mine.id, status: 'refused', reason: 'Step 1 is already not applicable.' },
				{ id: other.id, status: 'refused', reason: 'elsewhere' }
			],
			{ now: 2_000 }
		);
		const opened = await openRun(store, server(null), 'run-a');
		expect(opened.pending).toEqual([]);
		expect(opened.refused.map((r) => [r.record.id, r.reason])).toEqual([
			[mine.id, 'Step 1 is already not applicable.']
		]);
		await clearRefused(store, mine.id);
		expect((await openRun(store, server(null), 'run-a')).refused).toEqual([]);
	});

	it('says when a run is not on this tablet and the server is down', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('src') });
		await expect(openRun(store, server(null), 'run-z')).rejects.toBeInstanceOf(NotOnThisTablet);
	});

	it('keeps a picture already stored instead of fetching it again', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('src') });
		const log: string[] = [];
		await makeAvailable(store, server(viewFor('run-a'), log), 'run-a');
		await makeAvailable(store, server(viewFor('run-a'), log), 'run-a');
		expect(log.filter((u) => u.startsWith('/images/'))).toHaveLength(1);
	});

	it('swaps stored pictures into the step HTML', () => {
		const { html } = htmlWithStoredImages(`<img src="/images/${IMAGE_ID}">`, [
			{ id: IMAGE_ID, sha256: 'a', blob: new Blob([new Uint8Array([1])]) }
		]);
		expect(html).toMatch(/src="blob:/);
	});
});
