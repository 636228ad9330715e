import { expect, test } from '@playwright/test';
import { DEMO, makePerson, ownerQuery } from './support';
import { FAMILY, publishAndStart, signAs, stamp, tablet, typePin } from './runner-support';

// What the technician sees when the server refuses a record. Invented procedure and tools; not service data.
// TW-014 is the demo click wrench 2–12 N·m (src/lib/server/registers-seed.ts): its usable range starts at 20 % of
// its maximum, 2.4 N·m (ISO 6789-1 usable range, DEFAULT_MIN_SHARE), so a 2.2 N·m target is below it even though
// the wrench claims 2 N·m.
const source = () => `---
title: Refusals ${stamp()}
family: ${FAMILY}
purpose: Show each refusal on the runner.
specs: Invented for tests; not service data.
---

## Check with a gauge

\`\`\`step
tools: [caliper]
\`\`\`

\`\`\`confirm gauge-ok
prompt: The gauge reads zero on its master.
\`\`\`

## Tighten the small screw

\`\`\`step
tools: [click wrench 2–12 N·m]
\`\`\`

\`\`\`torque small-screw
target: 2.2 N·m
tolerance: ±0.2 N·m
fasteners: 1
tool: any
\`\`\`

## Adapt the control unit

\`\`\`step
qualification: transmission control adaptation
\`\`\`

\`\`\`confirm adapted
prompt: The adaptation ran to the end.
\`\`\`
`;

const TECH = 'Tomas Reyna';

test('the runner shows each refusal in words: past-due tool, wrench below 20 %, unqualified signer', async ({
	browser
}) => {
	test.setTimeout(120_000);
	// A newcomer of our own who holds the family but not the adaptation (the demo tech2 may have been trained in it
	// by the registers test): made before the runner opens, so the signer list has them.
	const newcomer = await makePerson(['technician'], '246813');
	const [{ name: newcomerName }] = await ownerQuery<{ name: string }>(`select name from app_user where id = $1`, [
		newcomer.id
	]);
	await ownerQuery(
		`insert into qualification (id, user_id, family, family_key, trained_by, trained_on, notes, recorded_at)
		 values (gen_random_uuid(), $1, $2, $3, 'E2E trainer', current_date - 30, '', now())`,
		[newcomer.id, FAMILY, FAMILY.toLowerCase()]
	);
	const runId = await publishAndStart(browser, source());
	// A caliper of our own, calibrated and in date when the page opens.
	const tag = `CL-E${Date.now().toString(36).slice(-5).toUpperCase()}`;
	const [tool] = await ownerQuery<{ id: string }>(
		`insert into tool (id, asset_tag, kind, description, range_min, range_max, unit, resolution, accuracy_pct, active, created_at, updated_at)
		 values (gen_random_uuid(), $1, 'caliper', 'Test caliper 0–150 mm (invented)', '0', '150', 'mm', '0.01', '0.1', true, now(), now())
		 returning id`,
		[tag]
	);
	const calibrate = (performed: string, due: string) =>
		ownerQuery(
			`insert into calibration (id, tool_id, kind, performed_on, certificate_no, as_found, as_left, next_due_on, notes, recorded_at)
			 values (gen_random_uuid(), $1, 'calibration', $2, 'TEST', 'in', 'in', $3, 'Invented (test).', now())`,
			[tool.id, performed, due]
		);
	await calibrate('2026-01-10', '2099-01-10');

	const page = await tablet(browser, DEMO.technician.email);
	await page.goto(`/runs/${runId}`);
	const answers = page.getByRole('list', { name: 'Answers from the server' });

	// 1. Past due: chosen while in date, then the register's newest calibration says it fell due yesterday.
	await page.getByRole('button', { name: new RegExp(tag) }).click();
	await page.getByRole('region', { name: 'Checkpoint gauge-ok' }).getByRole('button', { name: 'Done' }).click();
	await calibrate(new Date().toISOString().slice(0, 10), '2026-01-01');
	await page.getByRole('button', { name: 'Sign this step' }).click();
	const sign1 = page.getByRole('region', { name: 'Sign step 1' });
	await signAs(sign1, TECH, '111111');
	await expect(answers).toContainText(
		`Step 1 sign-off by ${TECH}: Tool ${tag} cannot be used: Blocked: calibration past due.`
	);
	await sign1.getByRole('button', { name: 'Cancel' }).click();

	// 2. A torque target below 20 % of the wrench's maximum: the tablet lists the wrench among the tools that cannot
	//    be used, with the reason in words, and offers no button for it. (The server's own refusal of a record that
	//    names it anyway: tests/integration/runs-refusals.test.ts.)
	await page.getByRole('button', { name: /^Step 2:/ }).click();
	const why = "The target 2.2 N·m is below the tool's usable range of 2.4–12 N·m.";
	const unusable = page
		.getByRole('list', { name: 'Tools that cannot be used' })
		.getByRole('listitem')
		.filter({ hasText: 'TW-014' });
	await expect(unusable).toContainText(why);
	await expect(page.getByRole('button', { name: /TW-014/ })).toHaveCount(0);

	// 3. The newcomer holds KTX-7 but not "transmission control adaptation".
	await page.getByRole('button', { name: /^Step 3:/ }).click();
	await page.getByRole('region', { name: 'Checkpoint adapted' }).getByRole('button', { name: 'Done' }).click();
	await page.getByRole('button', { name: 'Sign this step' }).click();
	await signAs(page.getByRole('region', { name: 'Sign step 3' }), newcomerName, '246813');
	await expect(answers).toContainText(
		`Step 3 sign-off by ${newcomerName}: Step 3 needs the transmission control adaptation qualification, which ${newcomerName} does not hold.`
	);
	const stored = await ownerQuery(`select 1 from ledger_record where run_id = $1`, [runId]);
	expect(stored).toEqual([]);
	await page.context().close();
});

test('a sixth wrong PIN is refused because signing is locked, and the message says a lead can unlock it', async ({
	browser
}) => {
	test.setTimeout(90_000);
	const runId = await publishAndStart(browser, source());
	// A person of our own (so the lock touches no demo account); their PIN is not 000000.
	const person = await makePerson(['technician']);
	const [{ name }] = await ownerQuery<{ name: string }>(`select name from app_user where id = $1`, [person.id]);
	const page = await tablet(browser, DEMO.technician.email);
	await page.goto(`/runs/${runId}`);
	await page.getByRole('region', { name: 'Checkpoint gauge-ok' }).getByRole('button', { name: 'Done' }).click();
	await page.getByRole('button', { name: 'Sign this step' }).click();
	const panel = page.getByRole('region', { name: 'Sign step 1' });
	await panel.getByRole('button', { name, exact: true }).click();
	const answers = page.getByRole('list', { name: 'Answers from the server' });
	for (let i = 1; i <= 4; i++) {
		await typePin(panel, '000000');
		await expect(answers.locator('li')).toHaveCount(i);
	}
	await expect(answers.locator('li').first()).toContainText(`Wrong PIN for ${name}: 1 try left before signing locks.`);
	await typePin(panel, '000000');
	await expect(answers.locator('li').first()).toContainText(
		`Wrong PIN. ${name}'s signing on this tablet is locked for 15 more minutes`
	);
	await typePin(panel, '000000');
	await expect(answers.locator('li')).toHaveCount(6);
	await expect(answers.locator('li').first()).toContainText(
		`${name}'s signing on this tablet is locked for 15 more minutes after too many wrong PINs; a lead can unlock it.`
	);
	await expect(answers.locator('li').first()).not.toContainText('Wrong PIN.');
	await page.context().close();
});
