import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { mustParse } from '$lib/procedure/test-helpers';
import { landedView, landLocally, type LandedRecord } from './landed';
import { getRun, openOfflineStore, saveRun } from './offline-store';
import type { OpenedRun } from './runner-source';
import { freshDbName, makeRun, runnerViewFor } from './test-helpers';

const confirm = (n: number, extra = '') =>
	`## Check item ${n}\n\n${extra}\`\`\`confirm c${n}\nprompt: Item ${n} checked.\n\`\`\`\n`;
const source = `---\ntitle: Landing\nfamily: KX-7 (invented)\npurpose: Unit tests\n---\n\n${confirm(1)}\n${confirm(2)}\n${confirm(3, '```step\ncritical: yes\n```\n\n')}`;
const model = mustParse(source);
const T = Date.UTC(2026, 11, 2, 9, 0);
// What the server answered: its own hash and clock. The tablet's clock (signedAt = T) is ten minutes slow.
const SERVER_HASH = 'a1'.repeat(32);
const SERVER_TIME = new Date(T + 600_000).toISOString();

function view(
	records: OpenedRun['view']['run']['records'] = [],
	state: OpenedRun['view']['run']['state'] = 'in_progress'
): OpenedRun['view'] {
	return runnerViewFor(
		'run-1',
		{ title: 'Landing', family: 'KX-7 (invented)', model, stepHtml: ['', '', ''], source, serverTime: T },
		{ state, procedureVersionId: 'pv-1', headHash: 'h'.repeat(64), recordCount: records.length, records }
	) as OpenedRun['view'];
}

const signoff = (stepIndex: number, over: Partial<LandedRecord> = {}): LandedRecord => ({
	id: `rec-${stepIndex}`,
	kind: 'signoff',
	body: {
		stepIndex,
		entries: [{ checkpointId: `c${stepIndex + 1}`, entry: { confirmed: true }, claimed: 'pass' }],
		tools: []
	},
	signer: { id: 'u-1', role: 'technician', name: 'Rowan Tech' },
	deviceId: 'dev-1',
	signedAt: T,
	answer: { id: `rec-${stepIndex}`, status: 'accepted', seq: 4, hash: SERVER_HASH, serverTime: SERVER_TIME },
	...over
});

describe('an accepted record laid into the view without refetching it (landedView)', () => {
	it('lays a plain sign-off in: the step reads signed, by whom, at the chain position, hash and time the server gave', () => {
		const next = landedView(view(), signoff(0))!;
		expect(next).not.toBeNull();
		const [r] = next.run.records;
		expect(r).toMatchObject({ id: 'rec-0', seq: 4, kind: 'signoff', signerId: 'u-1', signedOffline: false });
		expect(r).toMatchObject({ hash: SERVER_HASH, serverTime: SERVER_TIME, deviceTime: new Date(T).toISOString() });
		expect(next.run.headHash).toBe(SERVER_HASH);
		expect(r.body).toMatchObject({
			stepIndex: 0,
			signer: { name: 'Rowan Tech' },
			evaluation: [{ checkpointId: 'c1', status: 'pass' }]
		});
		expect(next.run.recordCount).toBe(1);
	});

	it('refreshes instead when only the server can tell the new state', () => {
		const once = landedView(view(), signoff(0))!;
		const cases: [string, OpenedRun['view'], LandedRecord][] = [
			['refused', view(), signoff(0, { answer: { id: 'rec-0', status: 'refused', reason: 'no' } })],
			['duplicate', view(), signoff(0, { answer: { id: 'rec-0', status: 'duplicate' } })],
			['no chain position', view(), signoff(0, { answer: { id: 'rec-0', status: 'accepted' } })],
			[
				'no server time (an older server)',
				view(),
				signoff(0, { answer: { id: 'rec-0', status: 'accepted', seq: 4, hash: SERVER_HASH } })
			],
			[
				'server opened a finding',
				view(),
				signoff(0, { answer: { id: 'rec-0', status: 'accepted', seq: 4, findings: ['f-1'] } })
			],
			['a finding record', view(), signoff(0, { kind: 'finding' })],
			['photos named', view(), signoff(0, { body: { stepIndex: 0, entries: [], photos: ['p-1'] } })],
			['critical step (verification next)', view(), signoff(2)],
			['run paused (it resumes)', view([], 'paused'), signoff(0)],
			['second sign-off of a step (may clash)', once, signoff(0, { id: 'rec-0b' })]
		];
		for (const [why, v, rec] of cases) expect(landedView(v, rec), why).toBeNull();
	});

	it('refreshes for the record that completes the run (the server moves it to awaiting review)', () => {
		const one = landedView(view(), signoff(0))!;
		const two = landedView(one, signoff(1))!;
		expect(two).not.toBeNull();
		// step 3 is critical and still open: the two plain sign-offs landed; the run is not complete.
		expect(two.run.records.map((r) => r.id)).toEqual(['rec-0', 'rec-1']);
		// With step 3 already signed (stored), the sign-off of step 2 is the last one: refresh.
		const step3 = { ...two.run.records[0], id: 'rec-2', seq: 3, body: { stepIndex: 2 } };
		const lastOpen = view([one.run.records[0], step3]);
		expect(landedView(lastOpen, signoff(1))).toBeNull();
	});

	it('keeps the landed record in the tablet copy, so an offline reload shows it', async () => {
		const store = await openOfflineStore({ dbName: freshDbName('landed') });
		const stored = { ...makeRun('run-1'), view: view() };
		await saveRun(store, stored);
		const opened: OpenedRun = { view: stored.view, origin: 'server', stored, pending: [], refused: [] };
		const next = await landLocally(store, opened, signoff(0));
		expect(next?.view.run.records.map((r) => r.id)).toEqual(['rec-0']);
		expect((await getRun(store, 'run-1'))?.view?.run.records.map((r) => r.id)).toEqual(['rec-0']);
		expect(await landLocally(store, next!, signoff(2))).toBeNull();
		await store.close();
	});
});
