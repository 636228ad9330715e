import { expect, test, type Page } from '@playwright/test';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import { DEMO, ownerQuery } from './support';
import { FAMILY, publishAndStart, stamp, tablet } from './runner-support';

// Per-record authorization, beside the route × role matrix (which calls every route with made-up ids): a person with
// the right role, acting on a real record that is not theirs to act on. Invented procedure; not service data.
const source = () => `---
title: Per-record rights ${stamp()}
family: ${FAMILY}
purpose: Check who may act on whose records.
specs: Invented for tests; not service data.
---

## Close the cover

\`\`\`step
critical: yes
\`\`\`

\`\`\`confirm cover-closed
prompt: The cover is closed and its gasket seated.
\`\`\`
`;

const idOf = async (email: string) =>
	(await ownerQuery<{ id: string }>(`select id from app_user where email = $1`, [email]))[0].id;

/** A sign-off or verification of step 1, sent through the one submit route by `page`'s session. */
async function send(
	page: Page,
	runId: string,
	kind: 'signoff' | 'verification',
	signer: { id: string; role: string },
	pin: string,
	body: object
) {
	const res = await page.request.post(`/api/runs/${runId}/records`, {
		data: {
			records: [{ id: uuidv7(), runId, kind, body, signer, deviceId: 'authz-records-spec' }],
			pins: { [signer.id]: pin }
		}
	});
	return {
		status: res.status(),
		answers: ((await res.json()) as { answers?: { status: string; reason?: string; id: string }[] }).answers
	};
}

test('a technician cannot open or record on another technician’s run', async ({ browser }) => {
	const runId = await publishAndStart(browser, source()); // assigned to the demo technician
	const other = await tablet(browser, 'tech2@example.com'); // Wren Okafor: neither assigned nor signed in it
	expect((await other.goto(`/runs/${runId}`))?.status()).toBe(404);
	for (const path of [`/api/runs/${runId}`, `/api/runs/${runId}/runner`])
		expect((await other.request.get(path)).status(), path).toBe(404);
	const wren = await idOf('tech2@example.com');
	const sent = await send(other, runId, 'signoff', { id: wren, role: 'technician' }, '555555', {
		stepIndex: 0,
		entries: [{ checkpointId: 'cover-closed', entry: { confirmed: true } }]
	});
	expect(sent.status).toBe(404);
	expect(await ownerQuery(`select 1 from ledger_record where run_id = $1`, [runId])).toEqual([]);
	await other.context().close();
});

test('a lead cannot verify their own work, and a quality lead cannot release a run they signed in', async ({
	browser
}) => {
	const runId = await publishAndStart(browser, source(), DEMO.lead.email);
	const lead = await tablet(browser, DEMO.lead.email);
	const leadId = await idOf(DEMO.lead.email);
	const signed = await send(lead, runId, 'signoff', { id: leadId, role: 'lead' }, '222222', {
		stepIndex: 0,
		entries: [{ checkpointId: 'cover-closed', entry: { confirmed: true } }]
	});
	expect(signed.answers?.[0], JSON.stringify(signed)).toMatchObject({ status: 'accepted' });
	const own = await send(lead, runId, 'verification', { id: leadId, role: 'lead' }, '222222', {
		stepIndex: 0,
		signoffId: signed.answers![0].id
	});
	expect(own.answers?.[0]).toMatchObject({ status: 'refused' });
	expect(own.answers?.[0].reason).toMatch(/worked on step 1, so cannot verify it/);

	// The quality lead verifies (she did not do the step): the run awaits review — and she may not release it.
	const quality = await tablet(browser, DEMO.quality.email);
	const qualityId = await idOf(DEMO.quality.email);
	const verified = await send(quality, runId, 'verification', { id: qualityId, role: 'quality' }, '333333', {
		stepIndex: 0,
		signoffId: signed.answers![0].id
	});
	expect(verified.answers?.[0], JSON.stringify(verified)).toMatchObject({ status: 'accepted' });
	const release = await quality.request.post(`/api/audit/runs/${runId}/release`, { data: { pin: '333333' } });
	expect(release.status()).toBe(403);
	expect(((await release.json()) as { message: string }).message).toMatch(
		/signed a verification of step 1 on this run, so cannot release it/
	);
	const [run] = await ownerQuery<{ state: string }>(`select state from run where id = $1`, [runId]);
	expect(run.state).toBe('awaiting_review');
	await lead.context().close();
	await quality.context().close();
});
