/**
 * Crash (offline issue, acceptance): the server process killed with SIGKILL in the middle of a sync batch leaves each
 * record applied or not; after restart the replayed batch completes it and the chain verifies. The test owns its app
 * server (app-server.ts) on the shared demo database. Invented procedure and readings, not service data.
 */
import { expect, test } from '@playwright/test';
import { withClient, type PgClient } from '../../scripts/lib/postgres';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import { appServer } from './app-server';
import { oneBoreSource } from './bore-procedure';
import { publishAndStart, stamp } from './runner-support';
import { DEMO, ownerQuery, signIn } from './support';

const source = () =>
	oneBoreSource(`Crash test ${stamp()}`, 'Re-measure one bore many times while the server is killed.');

/** Demo technician Tomas Reyna's bench PIN (src/lib/server/db/seed.ts). */
const TECH_PIN = '111111';
const N = 200;

test('SIGKILL mid-batch: each record stored whole or not at all; the replay completes it; the chain verifies', async ({
	browser
}) => {
	test.slow();
	const runId = await publishAndStart(browser, source());
	const [tech] = await ownerQuery<{ id: string }>(`select id from app_user where email = $1`, [DEMO.technician.email]);
	const server = await appServer();
	await server.start();
	try {
		const bench = await (await browser.newContext({ baseURL: server.url })).newPage();
		await signIn(bench, DEMO.technician.email);
		await expect(bench).not.toHaveURL(/\/signin/);
		const records = Array.from({ length: N }, (_, i) => ({
			id: uuidv7(),
			runId,
			kind: 'attempt',
			body: {
				stepIndex: 0,
				entries: [{ checkpointId: 'bore-1', entry: { readings: [`22.0${10 + (i % 10)}`] }, claimed: 'pass' }]
			},
			signer: { id: tech.id, role: 'technician' },
			deviceId: 'crash-spec-tablet',
			signedAt: Date.now()
		}));
		const batch = { records, pins: { [tech.id]: TECH_PIN } };
		const url = `/api/runs/${runId}/records`;

		// Send the batch, and kill the server as soon as the first of its records is in the database.
		const first = bench.request.post(url, { data: batch, timeout: 60_000 }).then(
			(r) => `answered ${r.status()}`,
			() => 'connection dropped'
		);
		const count = async (c: PgClient) =>
			Number(
				(await c.query<{ n: string }>(`select count(*) as n from ledger_record where run_id = $1`, [runId])).rows[0].n
			);
		const ownerUrl = process.env.E2E_OWNER_DATABASE_URL!;
		await withClient(ownerUrl, async (c) => {
			const deadline = Date.now() + 30_000;
			while ((await count(c)) === 0) {
				expect(Date.now(), 'no record of the batch reached the database within 30 s').toBeLessThan(deadline);
				await new Promise((r) => setTimeout(r, 5));
			}
		});
		await server.kill('SIGKILL');
		expect(await first).toBe('connection dropped');

		// Applied or not: what is stored is a prefix of the batch, chained without a gap.
		const stored = await ownerQuery<{ id: string; seq: number }>(
			`select id, seq from ledger_record where run_id = $1 order by seq`,
			[runId]
		);
		const k = stored.length;
		expect(k, 'the kill landed in the middle of the batch').toBeGreaterThan(0);
		expect(k, 'the kill landed in the middle of the batch').toBeLessThan(N);
		expect(stored.map((r) => r.id)).toEqual(records.slice(0, k).map((r) => r.id));
		expect(stored.map((r) => r.seq)).toEqual(Array.from({ length: k }, (_, i) => i + 1));
		const [run] = await ownerQuery<{ record_count: number }>(`select record_count from run where id = $1`, [runId]);
		expect(run.record_count).toBe(k);

		// Restart and replay the same batch unchanged, as the tablet's outbox does.
		await server.start();
		const replay = await bench.request.post(url, { data: batch, timeout: 60_000 });
		expect(replay.status(), await replay.text()).toBe(200);
		const { answers } = (await replay.json()) as { answers: { id: string; status: string }[] };
		expect(answers.map((a) => a.id)).toEqual(records.map((r) => r.id));
		const statuses = answers.map((a) => a.status);
		expect(statuses.slice(0, k)).toEqual(Array(k).fill('duplicate'));
		expect(statuses.slice(k)).toEqual(Array(N - k).fill('accepted'));

		const after = await ownerQuery<{ id: string; n: string }>(
			`select id, count(*) as n from ledger_record where run_id = $1 group by id`,
			[runId]
		);
		expect(after).toHaveLength(N);
		expect(after.every((r) => r.n === '1')).toBe(true);
		expect(new Set(after.map((r) => r.id))).toEqual(new Set(records.map((r) => r.id)));

		const desk = await (await browser.newContext({ baseURL: server.url })).newPage();
		await signIn(desk, DEMO.quality.email);
		await expect(desk).not.toHaveURL(/\/signin/);
		const verified = await desk.request.post(`/api/runs/${runId}/verify`);
		expect(verified.status()).toBe(200);
		expect(await verified.json()).toMatchObject({ runId, ok: true, count: N });
		await desk.context().close();
		await bench.context().close();
	} finally {
		await server.stop();
	}
});
