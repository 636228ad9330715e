import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';
import { CHECKPOINT_KINDS } from '../../src/lib/procedure/model';
import { DEMO } from './support';
import { FAMILY, LANDSCAPE, PORTRAIT, photoFile, publishAndStart, stamp, tablet } from './runner-support';

// A procedure using every checkpoint kind the engine has (FORMAT.md §5), invented for this test; not service data.
const source = () => `---
title: Every checkpoint kind ${stamp()}
family: ${FAMILY}
purpose: Show every kind of checkpoint entry on the runner.
specs: Invented for tests; not service data.
---

> Warning: Invented test data. Work to the manufacturer's service information.

## Torque and measure

\`\`\`step
tools: [click wrench 2–12 N·m]
\`\`\`

\`\`\`torque cover-screws
target: 8 N·m
tolerance: ±10 %
fasteners: [C1, C2, C3]
passes: 50 %, 100 %
tool: preset
\`\`\`

\`\`\`measure bore-a
feature: bore
nominal: 22 mm
tolerance: H7
angles: [0°, 90°]
zero-check: yes
\`\`\`

## Clearance, confirm and choice

\`\`\`clearance pin-fit
fit: 8 H7/g6
\`\`\`

\`\`\`confirm magnet
prompt: The magnet faces the sensor pocket.
photo: optional
\`\`\`

\`\`\`choice disposition
prompt: What was fitted?
options:
  reused: The same sensor, reused
  new: A new sensor
\`\`\`

## Part, fluid and test

\`\`\`part sensor
prompt: New line-pressure sensor
number: KL-4410-##@
serial: PS########
\`\`\`

\`\`\`fluid fill
spec: KLW DCF-7 (invented dual-clutch fluid)
lot: FL-####-@@
amount: 5.2 L ±0.2 L
\`\`\`

\`\`\`fluid level
spec: KLW DCF-7 (invented dual-clutch fluid)
level: fluid just runs from the check plug
temperature: 35 to 45 °C
\`\`\`

\`\`\`test seal
prompt: Hold the test pressure for two minutes with no drop.
value: 1100 to 1300 kPa
\`\`\`

## Text and photo

\`\`\`text notes
prompt: Describe the condition of the bores.
min-length: 10
\`\`\`

\`\`\`photo plate
prompt: Photograph the identification plate.
min: 1
\`\`\`
`;

const STEPS = [
	{ n: 1, kinds: ['torque', 'measure'] },
	{ n: 2, kinds: ['clearance', 'confirm', 'choice'] },
	{ n: 3, kinds: ['part', 'fluid', 'test'] },
	{ n: 4, kinds: ['text', 'photo'] }
];

/** Every interactive element inside main, with its size; inline text links are exempt (issue 6). */
async function tooSmall(page: Page): Promise<string[]> {
	return page.locator('main').evaluate((main) => {
		const bad: string[] = [];
		const els = main.querySelectorAll<HTMLElement>(
			'button, input, select, textarea, [role=button], label:has(input[type=checkbox]), label:has(input[type=radio])'
		);
		for (const el of els) {
			const r = el.getBoundingClientRect();
			if (r.width === 0 && r.height === 0) continue; // not rendered
			if (r.width < 64 || r.height < 64)
				bad.push(
					`${el.tagName} "${el.getAttribute('aria-label') ?? el.textContent?.trim().slice(0, 40)}" ${r.width}×${r.height}`
				);
		}
		return bad;
	});
}

/** Opens every control a step has (typing fallback, a photo taken) so they are measured too. */
async function openEverything(page: Page, n: number) {
	if (n === 1)
		await page.getByRole('region', { name: 'Checkpoint bore-a' }).getByRole('button', { name: 'Zeroed' }).click();
	if (n === 2) {
		const magnet = page.getByRole('region', { name: 'Checkpoint magnet' });
		await magnet.locator('input[type=file]').setInputFiles(await photoFile('magnet.png', n));
		await expect(magnet.getByRole('img', { name: /Photo 1/ })).toBeVisible();
	}
	if (n === 3) {
		const sensor = page.getByRole('region', { name: 'Checkpoint sensor' });
		await sensor.getByRole('button', { name: 'Not listed? Type it' }).click();
		await expect(sensor.getByLabel('Serial number')).toBeVisible();
	}
}

test('the all-kinds test procedure covers every checkpoint kind the engine has', () => {
	const covered = new Set(STEPS.flatMap((s) => s.kinds));
	expect([...CHECKPOINT_KINDS].filter((k) => !covered.has(k))).toEqual([]);
	expect(
		source()
			.match(/^```([a-z]+) /gm)
			?.map((m) => m.slice(3, -1))
	).toEqual(STEPS.flatMap((s) => s.kinds).flatMap((k) => (k === 'fluid' ? [k, k] : [k])));
});

/** One published run for the whole file (per worker): every combination below walks the same steps. */
let shared: Promise<string> | undefined;

for (const viewport of [PORTRAIT, LANDSCAPE])
	for (const theme of ['light', 'dark'] as const)
		test(`every checkpoint kind's entry: tap targets ≥ 64 CSS px and no serious axe violation, ${viewport.width}×${viewport.height} ${theme}`, async ({
			browser
		}) => {
			test.setTimeout(180_000);
			const runId = await (shared ??= publishAndStart(browser, source()));
			const page = await tablet(browser, DEMO.technician.email, { viewport });
			// As the theme toggle stores it: in local storage (read on load) and a cookie (for the server's render).
			await page.evaluate((t) => {
				localStorage.setItem('benchstamp-theme', t);
				document.cookie = `benchstamp-theme=${t}; Path=/; SameSite=Lax`;
			}, theme);
			await page.goto(`/runs/${runId}`);
			await expect(page.locator('html')).toHaveAttribute('data-theme', theme);
			const problems: string[] = [];
			for (const { n } of STEPS) {
				await page.getByRole('button', { name: new RegExp(`^Step ${n}:`) }).click();
				await expect(page.getByRole('heading', { name: new RegExp(`^Step ${n}:`) })).toBeVisible();
				await openEverything(page, n);
				// The finding form (with its camera control) is reachable on every step: measure it open.
				await page.getByRole('button', { name: 'Record a finding on this step' }).click();
				await expect(page.getByRole('region', { name: 'Record a finding' })).toBeVisible();
				for (const s of await tooSmall(page)) problems.push(`step ${n}: ${s}`);
				const axe = await new AxeBuilder({ page }).include('main').analyze();
				for (const v of axe.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical'))
					problems.push(`step ${n}: axe ${v.id} (${v.impact}) on ${v.nodes.map((x) => x.target.join(' ')).join(', ')}`);
				await page.getByRole('region', { name: 'Record a finding' }).getByRole('button', { name: 'Cancel' }).click();
			}
			await page.context().close();
			expect(problems).toEqual([]);
		});

test('the torque, part and fluid entries offer taps: a preset wrench setting and click per fastener, register lots', async ({
	browser
}) => {
	test.setTimeout(90_000);
	const runId = await publishAndStart(browser, source());
	const page = await tablet(browser, DEMO.technician.email);
	await page.goto(`/runs/${runId}`);
	// Preset torque with the click wrench TW-014 (2–12 N·m): 50 % of 8 N·m is 4 N·m, then 8 N·m.
	await page.getByRole('button', { name: /TW-014/ }).click();
	const torque = page.getByRole('region', { name: 'Checkpoint cover-screws' });
	await torque.getByRole('button', { name: /Pass 1 \(50 %\): wrench set to/ }).click();
	for (const [i, v] of ['4', '8'].entries()) {
		await torque.getByRole('button', { name: new RegExp(`Pass ${i + 1} \\(\\d+ %\\): wrench set to`) }).click();
		for (const ch of v) await torque.getByRole('button', { name: ch, exact: true }).click();
		await torque.getByRole('button', { name: 'Record', exact: true }).click();
	}
	for (const p of [1, 2])
		for (const f of ['C1', 'C2', 'C3']) await torque.getByRole('button', { name: `Pass ${p}, ${f} reached` }).click();
	await expect(page.getByTestId('verdict-cover-screws')).toContainText('Pass');
	await expect(page.getByTestId('verdict-cover-screws')).toContainText('set to 4 N·m, reached');

	await page.getByRole('button', { name: /^Step 3:/ }).click();
	// The demo register holds serialised sensors PS26110451/2 of KL-4410-03C and fluid lots FL-2611-AB/AC (invented).
	const sensor = page.getByRole('region', { name: 'Checkpoint sensor' });
	await sensor.getByRole('button', { name: /KL-4410-03C · PS26110451/ }).click();
	await expect(page.getByTestId('verdict-sensor')).toContainText('Pass');
	const fill = page.getByRole('region', { name: 'Checkpoint fill' });
	await fill.getByRole('button', { name: /FL-2611-AB/ }).click();
	await fill.getByRole('button', { name: 'Spec confirmed' }).click();
	for (const ch of '5.2')
		await fill.getByRole('button', { name: ch === '.' ? 'Decimal point' : ch, exact: true }).click();
	await fill.getByRole('button', { name: 'Record', exact: true }).click();
	await expect(page.getByTestId('verdict-fill')).toContainText('Pass');
	await page.context().close();
});
