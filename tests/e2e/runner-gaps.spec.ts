import { expect, test, type Locator } from '@playwright/test';
import { DEMO } from './support';
import { FAMILY, publishAndStart, signAs, stamp, tablet } from './runner-support';

// Invented for the test (not service data). Demo register (src/lib/server/registers-seed.ts): click wrench TW-014
// 2–12 N·m (usable from 20 % of 12 = 2.4 N·m, ISO 6789-1), dial wrench TW-022 5–25 N·m, beam wrench TW-031 past due,
// micrometer MC-007 blocked by a failed in-house check. Demo people (seed.ts): Tomas Reyna (technician, PIN 111111),
// Lena Marsh (lead, 222222).
const TOMAS = 'Tomas Reyna';
const LENA = 'Lena Marsh';
const source = () => `---
title: Runner gaps ${stamp()}
family: ${FAMILY}
purpose: Show N/A in the strip, a counted part quantity, a reloaded preset torque and blocked tools.
specs: Invented for a test; not service data.
---

> Warning: Invented test data. Work to the manufacturer's service information.

## Tighten the sensor cover

\`\`\`step
tools: [click wrench 2–12 N·m]
\`\`\`

\`\`\`torque cover
target: 4 N·m
tolerance: ±10 %
fasteners: [C1, C2]
tool: preset
\`\`\`

## Fit the retaining clips

\`\`\`part clips
prompt: Retaining clips
number: KL-9901-##
quantity: 3
\`\`\`

## Fit the heat shield

\`\`\`confirm shield
prompt: Heat shield fitted.
\`\`\`
`;

async function expectTapTargets(controls: Locator[]) {
	for (const c of controls) {
		const box = (await c.boundingBox())!;
		expect(Math.min(box.width, box.height), await c.innerText()).toBeGreaterThanOrEqual(64);
	}
}

test('runner gaps: blocked tools with reasons, part quantity, preset torque signed after reload, N/A in the strip', async ({
	browser
}) => {
	test.setTimeout(180_000); // a published procedure, three PIN signatures and a reload on a shared 2-core machine
	const runId = await publishAndStart(browser, source());
	const page = await tablet(browser, DEMO.technician.email);
	await page.goto(`/runs/${runId}`);

	// Tools: usable ones are buttons; the others are listed with their reason in words and cannot be tapped.
	const blocked = page.getByRole('list', { name: 'Tools that cannot be used' });
	await expect(blocked.getByRole('listitem').filter({ hasText: 'TW-022' })).toContainText(
		"below the tool's usable range of 5–25 N·m"
	);
	await expect(blocked.getByRole('listitem').filter({ hasText: 'TW-031' })).toContainText(
		'Blocked: calibration past due'
	);
	await expect(blocked.getByRole('listitem').filter({ hasText: 'MC-007' })).toContainText(
		'Blocked: found out of tolerance'
	);
	for (const tag of ['TW-022', 'TW-031', 'MC-007'])
		await expect(page.getByRole('button', { name: new RegExp(tag) })).toHaveCount(0);

	// Preset torque with TW-014: the wrench set to 4 N·m, both fasteners reached.
	await page.getByRole('button', { name: /TW-014/ }).click();
	const torque = page.getByRole('region', { name: 'Checkpoint cover' });
	await torque.getByRole('button', { name: /Pass 1 \(100 %\): wrench set to/ }).click();
	await torque.getByRole('button', { name: '4', exact: true }).click();
	await torque.getByRole('button', { name: 'Record', exact: true }).click();
	for (const f of ['C1', 'C2']) await torque.getByRole('button', { name: `Pass 1, ${f} reached` }).click();
	await expect(page.getByTestId('verdict-cover')).toContainText('Pass');
	await page.getByRole('button', { name: 'Sign this step' }).click();
	await signAs(page.getByRole('region', { name: 'Sign step 1' }), TOMAS, '111111');
	await expect(page.getByText(`Step 1 sign-off by ${TOMAS}`, { exact: true })).toBeVisible();

	// Part quantity: counted with − / +, judged by the engine when recorded (3 asked).
	await page.getByRole('button', { name: /^Step 2:/ }).click();
	const clips = page.getByRole('region', { name: 'Checkpoint clips' });
	await clips.getByLabel('Part number').fill('KL-9901-12');
	await expect(page.getByTestId('verdict-clips')).toContainText('Enter the quantity fitted (3).');
	const more = clips.getByRole('button', { name: 'One more' });
	const fewer = clips.getByRole('button', { name: 'One fewer' });
	const record = clips.getByRole('button', { name: 'Record quantity' });
	await expectTapTargets([more, fewer, record]);
	await more.click();
	await more.click();
	await record.click();
	await expect(page.getByTestId('verdict-clips')).toContainText('2 fitted; this step needs 3.');
	await expect(page.getByTestId('verdict-clips')).toContainText('Fail');
	await more.click();
	await more.click();
	await fewer.click();
	await expect(clips.getByLabel('Quantity counted')).toHaveText('3');
	await record.click();
	await expect(page.getByTestId('verdict-clips')).toContainText('Pass');
	await page.getByRole('button', { name: 'Sign this step' }).click();
	await signAs(page.getByRole('region', { name: 'Sign step 2' }), TOMAS, '111111');
	await expect(page.getByText(`Step 2 sign-off by ${TOMAS}`, { exact: true })).toBeVisible();

	// Step 3 does not apply: a lead approves; the strip says N/A in words (with an icon), not "not signed".
	await page.getByRole('button', { name: /^Step 3:/ }).click();
	await page.getByRole('button', { name: 'Step does not apply…' }).click();
	const na = page.getByRole('region', { name: 'Mark the step not applicable' });
	await na.getByRole('button', { name: 'The part is not fitted on this unit' }).click();
	await na.getByRole('button', { name: 'Ask a lead to approve' }).click();
	await signAs(page.getByRole('region', { name: 'Lead approves: step 3 not applicable' }), LENA, '222222');
	const step3 = page.getByRole('button', { name: /^Step 3: Fit the heat shield, not applicable$/ });
	await expect(step3).toContainText('N/A');
	await expect(step3.locator('svg')).toHaveCount(1);

	// Reloaded: the signed preset torque shows as signed and passed (the stored record), not "Not finished".
	await page.reload();
	await page.getByRole('button', { name: /^Step 1: Tighten the sensor cover, signed$/ }).click();
	const reloaded = page.getByRole('region', { name: 'Checkpoint cover' });
	await expect(reloaded.getByText("As recorded in the step's sign-off.")).toBeVisible();
	await expect(page.getByTestId('verdict-cover')).toContainText('Pass');
	await expect(page.getByTestId('verdict-cover')).toContainText('set to 4 N·m, reached');
	await expect(page.getByTestId('verdict-cover')).not.toContainText('Not finished');
	await expect(reloaded.getByRole('button', { name: 'Pass 1, C1 reached' })).toHaveAttribute('aria-pressed', 'true');
	await expect(page.getByRole('button', { name: /^Step 3: .*, not applicable$/ })).toContainText('N/A');
	await page.context().close();
});
