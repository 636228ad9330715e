/**
 * The same step signed on two tablets (offline issue): both sign-offs are kept, the later supersedes, and the clash
 * reads in words on the runner's step history and on the quality run record. Demo people (src/lib/server/db/seed.ts):
 * Tomas Reyna (technician, PIN 111111), Wren Okafor (technician, 555555), both KTX-7 trained. Invented procedure.
 */
import { expect, test } from '@playwright/test';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import { FAMILY, publishAndStart, stamp, tablet } from './runner-support';
import { DEMO, ownerQuery } from './support';

const source = () => `---
title: Two tablets ${stamp()}
family: ${FAMILY}
purpose: Sign one step on two tablets.
specs: Invented for tests; not service data.
---

## Check the magnet

\`\`\`confirm magnet-1
prompt: Magnet is clean.
\`\`\`

## Fit the filter

\`\`\`confirm filter-1
prompt: Filter is seated.
\`\`\`
`;

test('a step signed on two tablets keeps both sign-offs and says so on the runner and the run record', async ({
	browser
}) => {
	test.slow(); // four sign-ins and a publication on a shared 2-core machine
	const runId = await publishAndStart(browser, source());
	const people = await ownerQuery<{ id: string; email: string }>(
		`select id, email from app_user where email = any($1)`,
		[[DEMO.technician.email, 'tech2@example.com']]
	);
	const idOf = (email: string) => people.find((p) => p.email === email)!.id;
	const signoff = (signerId: string, deviceId: string) => ({
		id: uuidv7(),
		runId,
		kind: 'signoff',
		body: { stepIndex: 0, entries: [{ checkpointId: 'magnet-1', entry: { confirmed: true }, claimed: 'pass' }] },
		signer: { id: signerId, role: 'technician' },
		deviceId,
		signedAt: Date.now()
	});
	const bench = await tablet(browser, DEMO.technician.email);
	const tomas = idOf(DEMO.technician.email);
	const wren = idOf('tech2@example.com');
	const first = signoff(tomas, 'bench-tablet-left');
	const later = signoff(wren, 'bench-tablet-right');
	for (const [r, pins] of [
		[first, { [tomas]: '111111' }],
		[later, { [wren]: '555555' }]
	] as const) {
		const sent = await bench.request.post(`/api/runs/${runId}/records`, { data: { records: [r], pins } });
		const reply = (await sent.json()) as { answers: { status: string; reason?: string }[] };
		expect(reply.answers[0], JSON.stringify(reply)).toMatchObject({ status: 'accepted' });
	}
	const stored = await ownerQuery<{ id: string; conflicts: string | null }>(
		`select id, body->>'conflictsWith' as conflicts from ledger_record where run_id = $1 order by seq`,
		[runId]
	);
	expect(stored).toEqual([
		{ id: first.id, conflicts: null },
		{ id: later.id, conflicts: first.id }
	]);

	await bench.goto(`/runs/${runId}`);
	await bench.getByRole('button', { name: /^Step 1: Check the magnet/ }).click();
	const history = bench.getByRole('region', { name: 'Step 1 history' });
	await expect(
		history.getByText(
			'Signed on two tablets: on bench-tablet-left, superseded by #2 by Wren Okafor on bench-tablet-right'
		)
	).toBeVisible();
	await expect(history.getByText(/Signed on two tablets: supersedes #1 by Tomas Reyna/)).toBeVisible();
	await expect(history.locator('.line-through')).toContainText('Sign-off by Tomas Reyna');
	await bench.context().close();

	const desk = await tablet(browser, DEMO.quality.email);
	await desk.goto(`/quality/runs/${runId}`);
	await expect(
		desk.getByText(
			'Signed on two tablets: this sign-off on tablet bench-tablet-left was superseded by #2 (Wren Okafor, tablet bench-tablet-right).'
		)
	).toBeVisible();
	await expect(
		desk.getByText(/^Signed on two tablets: supersedes #1 \(Tomas Reyna, tablet bench-tablet-left\)/)
	).toBeVisible();
	await desk.context().close();
});
