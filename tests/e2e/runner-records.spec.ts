import { expect, test, type Page } from '@playwright/test';
import { DEMO, ownerQuery } from './support';
import { publishAndStart, signAs, stamp, tablet, typePin } from './runner-support';

// Invented for the test (not service data): three one-tap steps of a KTX-7 procedure. Demo people
// (src/lib/server/db/seed.ts): Tomas Reyna (technician, PIN 111111), Wren Okafor (technician, 555555), Lena Marsh
// (lead, 222222); both technicians hold KTX-7 training (src/lib/server/registers-seed.ts).
const TOMAS = 'Tomas Reyna';
const WREN = 'Wren Okafor';
const LENA = 'Lena Marsh';

const source = `---
title: Records walk-through ${stamp()}
family: KTX-7 (invented seven-speed dual-clutch transaxle)
purpose: Walk N/A, handover, correction and unlock in the runner.
specs: Invented for a test; not service data.
---

## Check the magnet

\`\`\`confirm magnet
prompt: Magnet wiped clean.
\`\`\`

## Fit the cooler line clip

\`\`\`confirm clip
prompt: Clip fitted.
\`\`\`

## Fit the filter

\`\`\`confirm filter
prompt: Filter seated.
\`\`\`
`;

async function signStep(page: Page, n: number, checkpoint: string, name: string, pin: string) {
	await page
		.getByRole('region', { name: `Checkpoint ${checkpoint}` })
		.getByRole('button', { name: 'Done' })
		.click();
	await page.getByRole('button', { name: 'Sign this step' }).click();
	await signAs(page.getByRole('region', { name: `Sign step ${n}` }), name, pin);
}

test('N/A with a lead’s approval, a correction, a handover with both names, and a lead unlocking a locked signer', async ({
	browser
}) => {
	test.setTimeout(240_000); // four signers, five wrong PINs and an unlock on a shared 2-core machine
	const runId = await publishAndStart(browser, source);
	const page = await tablet(browser, DEMO.technician.email);
	await page.goto(`/runs/${runId}`);

	// Step 1 signed, then corrected: the sign-off stays readable, struck through, and the step needs a new one.
	await signStep(page, 1, 'magnet', TOMAS, '111111');
	await expect(page.getByText(`Step 1 sign-off by ${TOMAS}`, { exact: true })).toBeVisible();
	// The runner moves on to step 2 once the page data is reloaded; only then go back.
	await expect(page.getByRole('heading', { name: 'Step 2: Fit the cooler line clip' })).toBeVisible();
	await page.getByRole('button', { name: /^Step 1: Check the magnet/ }).click();
	const history = page.getByRole('region', { name: 'Step 1 history' });
	await history.getByRole('button', { name: 'Correct #1' }).click();
	const correction = page.getByRole('region', { name: 'Correct a record' });
	await correction.getByLabel('Why is it corrected?').fill('Tapped Done before the magnet was wiped.');
	await correction.getByRole('button', { name: 'Continue to sign' }).click();
	await signAs(page.getByRole('region', { name: 'Sign the correction' }), TOMAS, '111111');
	await expect(history.getByText('Superseded by #2: Tapped Done before the magnet was wiped.')).toBeVisible();
	await expect(history.locator('.line-through')).toContainText(`Sign-off by ${TOMAS}`);
	await expect(page.getByLabel('Step status')).toContainText('Not signed');
	await page.getByRole('button', { name: 'Sign this step' }).click();
	await signAs(page.getByRole('region', { name: 'Sign step 1' }), TOMAS, '111111');
	await expect(page.getByRole('heading', { name: 'Step 2: Fit the cooler line clip' })).toBeVisible();

	// Step 2 does not apply: the technician taps a reason, the lead approves with their own PIN.
	await page.getByRole('button', { name: 'Step does not apply…' }).click();
	const na = page.getByRole('region', { name: 'Mark the step not applicable' });
	await na.getByRole('button', { name: 'The part is not fitted on this unit' }).click();
	await na.getByRole('button', { name: 'Ask a lead to approve' }).click();
	const approve = page.getByRole('region', { name: 'Lead approves: step 2 not applicable' });
	await expect(approve.getByRole('button', { name: TOMAS })).toHaveCount(0);
	await signAs(approve, LENA, '222222');
	await expect(page.getByText('Not applicable (approved by a lead)')).toBeVisible();
	await expect(page.getByRole('button', { name: 'Sign this step' })).toHaveCount(0);
	const [naRow] = await ownerQuery<{ body: { requestedBy: { name: string }; signer: { name: string } } }>(
		`select body from ledger_record where run_id = $1 and kind = 'na_approval'`,
		[runId]
	);
	expect([naRow.body.requestedBy.name, naRow.body.signer.name]).toEqual([TOMAS, LENA]);

	// End of shift: handed over to Wren with a note; the run is paused.
	await page.getByRole('button', { name: 'Hand over (end of shift)' }).click();
	const handover = page.getByRole('region', { name: 'Hand the run over' });
	await handover.getByLabel('Handover note for whoever continues').fill('Filter still to seat; pan on the bench.');
	await handover.getByLabel('Handed over to (optional)').selectOption({ label: WREN });
	await handover.getByRole('button', { name: 'Continue to sign' }).click();
	await signAs(page.getByRole('region', { name: 'Sign the handover' }), TOMAS, '111111');
	await expect(page.getByText('Handed over: the run is paused')).toBeVisible();
	await page.context().close();

	// Wren opens the run (handed over to her, so one of her own) and sees the note with both names.
	const wren = await tablet(browser, 'tech2@example.com');
	await wren.goto(`/runs/${runId}`);
	await expect(wren.getByText(`From ${TOMAS} to ${WREN}`)).toBeVisible();
	await expect(wren.getByText('Filter still to seat; pan on the bench.')).toBeVisible();
	await wren.getByRole('button', { name: /^Step 3: Fit the filter/ }).click();

	// Five wrong PINs lock her signing on this tablet; the lead unlocks it with the lead's own PIN.
	await wren.getByRole('region', { name: 'Checkpoint filter' }).getByRole('button', { name: 'Done' }).click();
	await wren.getByRole('button', { name: 'Sign this step' }).click();
	const sign3 = wren.getByRole('region', { name: 'Sign step 3' });
	await sign3.getByRole('button', { name: WREN, exact: true }).click();
	for (let i = 0; i < 5; i++) {
		await typePin(sign3, '000000');
		await expect(wren.getByRole('list', { name: 'Answers from the server' }).getByRole('listitem')).toHaveCount(i + 1);
	}
	await expect(wren.getByText(/signing on this tablet is locked for 15 more minutes/)).toBeVisible();
	await wren.getByRole('button', { name: 'A lead unlocks signing' }).click();
	const unlock = wren.getByRole('region', { name: 'Unlock signing' });
	await unlock.getByRole('button', { name: WREN, exact: true }).click();
	await signAs(wren.getByRole('region', { name: `Lead unlocks ${WREN}` }), LENA, '222222');
	await expect(wren.getByText(`${WREN} can sign on this tablet again.`)).toBeVisible();
	await typePin(sign3, '555555');
	await expect(wren.getByText(`Step 3 sign-off by ${WREN}`, { exact: true })).toBeVisible();
	// Step 1 signed again, step 2 N/A, step 3 signed: the run is complete; the note now says who took it up.
	await expect(wren.getByText('Awaiting review', { exact: true })).toBeVisible();
	await expect(wren.getByText(`taken up by ${WREN}`)).toBeVisible();
	const [log] = await ownerQuery<{ actor_name: string }>(
		`select actor_name from admin_log where action = 'pin.unlocked' and detail->>'runId' = $1`,
		[runId]
	);
	expect(log.actor_name).toBe(LENA);
	await wren.context().close();

	// The quality run record shows the superseded sign-off struck through, with the correction's reason.
	const quality = await tablet(browser, DEMO.quality.email);
	await quality.goto(`/quality/runs/${runId}`);
	await expect(quality.getByText('Superseded by #2: Tapped Done before the magnet was wiped.')).toBeVisible();
	await quality.context().close();
});
