/**
 * XSS corpus. Vectors are adapted from the OWASP XSS Filter Evasion Cheat Sheet
 * (cheatsheetseries.owasp.org, "XSS Filter Evasion Cheat Sheet"), placed in prose, link targets,
 * image targets, headings, callouts and YAML values that the renderer shows.
 */
import { describe, expect, it } from 'vitest';
import { block, doc } from './test-helpers';
import { parse } from './parse';
import { escapeHtml, render, renderMarkdown, renderProcedure } from './render';

const VECTORS = [
	`<SCRIPT SRC=https://cdn.example/xss.js></SCRIPT>`,
	`<script>alert('XSS')</script>`,
	`<IMG SRC="javascript:alert('XSS');">`,
	`<IMG SRC=javascript:alert('XSS')>`,
	`<IMG SRC=JaVaScRiPt:alert('XSS')>`,
	'<IMG SRC=`javascript:alert("RSnake says, \'XSS\'")`>',
	`<a onmouseover="alert(document.cookie)">xxs link</a>`,
	`<IMG """><SCRIPT>alert("XSS")</SCRIPT>"\\>`,
	`<IMG SRC=# onmouseover="alert('xxs')">`,
	`<IMG SRC=/ onerror="alert(String.fromCharCode(88,83,83))"></img>`,
	`<img src=x onerror="&#0000106&#0000097&#0000118&#0000097&#0000115&#0000099&#0000114&#0000105&#0000112&#0000116&#0000058&#0000097&#0000108&#0000101&#0000114&#0000116&#0000040&#0000039&#0000088&#0000083&#0000083&#0000039&#0000041">`,
	`<IMG SRC=&#106;&#97;&#118;&#97;&#115;&#99;&#114;&#105;&#112;&#116;&#58;&#97;&#108;&#101;&#114;&#116;&#40;&#39;&#88;&#83;&#83;&#39;&#41;>`,
	`<IMG SRC="jav	ascript:alert('XSS');">`,
	`<IMG SRC="jav&#x09;ascript:alert('XSS');">`,
	`<IMG SRC=" &#14;  javascript:alert('XSS');">`,
	`<SCRIPT/XSS SRC="http://xss.example/xss.js"></SCRIPT>`,
	`<BODY onload!#$%&()*~+-_.,:;?@[/|\\]^\`=alert("XSS")>`,
	`<<SCRIPT>alert("XSS");//\\<</SCRIPT>`,
	`<SCRIPT SRC=http://xss.example/xss.js?< B >`,
	`<iframe src=http://xss.example/scriptlet.html <`,
	`</TITLE><SCRIPT>alert("XSS");</SCRIPT>`,
	`<INPUT TYPE="IMAGE" SRC="javascript:alert('XSS');">`,
	`<BODY BACKGROUND="javascript:alert('XSS')">`,
	`<IMG DYNSRC="javascript:alert('XSS')">`,
	`<STYLE>li {list-style-image: url("javascript:alert('XSS')");}</STYLE><UL><LI>XSS</br>`,
	`<svg/onload=alert('XSS')>`,
	`<svg><script>alert(1)</script></svg>`,
	`<BGSOUND SRC="javascript:alert('XSS');">`,
	`<LINK REL="stylesheet" HREF="javascript:alert('XSS');">`,
	`<META HTTP-EQUIV="refresh" CONTENT="0;url=javascript:alert('XSS');">`,
	`<META HTTP-EQUIV="refresh" CONTENT="0;url=data:text/html base64,PHNjcmlwdD5hbGVydCgnWFNTJyk8L3NjcmlwdD4K">`,
	`<TABLE BACKGROUND="javascript:alert('XSS')">`,
	`<DIV STYLE="background-image: url(javascript:alert('XSS'))">`,
	`<DIV STYLE="width: expression(alert('XSS'));">`,
	`<OBJECT TYPE="text/x-scriptlet" DATA="http://xss.example/scriptlet.html"></OBJECT>`,
	`<EMBED SRC="data:image/svg+xml;base64,PHN2ZyB4bWxuczpzdmc9Imh0dH A6Ly93d3cudzMub3JnLzIwMDAvc3ZnIiB4bWxucz0iaHR0cDovL3d3dy53My5vcmcv MjAwMC9zdmciIHhtbG5zOnhsaW5rPSJodHRwOi8vd3d3LnczLm9yZy8xOTk5L3hs aW5rIiB2ZXJzaW9uPSIxLjAiIHg9IjAiIHk9IjAiIHdpZHRoPSIxOTQiIGhlaWdodD0iMjAw IiBpZD0ieHNzIj48c2NyaXB0IHR5cGU9InRleHQvZWNtYXNjcmlwdCI+YWxlcnQoIlh TUyIpOzwvc2NyaXB0Pjwvc3ZnPg==" type="image/svg+xml" AllowScriptAccess="always"></EMBED>`,
	`<FRAMESET><FRAME SRC="javascript:alert('XSS');"></FRAMESET>`,
	`<BASE HREF="javascript:alert('XSS');//">`,
	`<math><mtext><table><mglyph><style><img src=x onerror=alert(1)>`,
	`<form><button formaction=javascript:alert(1)>X</button></form>`,
	`<details open ontoggle=alert(1)>`
];

/** Link and image targets a document might carry in Markdown syntax. */
const URL_VECTORS = [
	`javascript:alert('XSS')`,
	`JaVaScRiPt:alert(1)`,
	`jav&#x09;ascript:alert(1)`,
	`vbscript:msgbox("XSS")`,
	`data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==`,
	`data:image/svg+xml,<svg onload=alert(1)>`,
	`//evil.example/x`,
	`\\\\evil.example\\x`,
	`java%0ascript:alert(1)`,
	`&#106;avascript:alert(1)`
];

function expectInert(html: string) {
	const lower = html.toLowerCase();
	expect(lower).not.toMatch(/<script/);
	expect(lower).not.toMatch(
		/<(iframe|object|embed|svg|style|math|form|button|frameset|frame|base|meta|link|bgsound|body|input type="image"|details|table background)/
	);
	// No event-handler attribute on any real tag (escaped text like &lt;img onerror=…&gt; is inert).
	for (const tag of html.match(/<[a-z][^>]*>/gi) ?? []) {
		expect(tag).not.toMatch(/\son[a-z]+\s*=/i);
		expect(tag.toLowerCase()).not.toMatch(/(javascript|vbscript|data):/);
		expect(tag.toLowerCase()).not.toMatch(/style=/);
	}
	// Text content never holds a raw "<" (it is escaped), so every "<x …>" is a real element.
	const tags = (html.match(/<[a-z][^>]*>/gi) ?? []).join(' ');
	for (const href of [...tags.matchAll(/(?:href|src)="([^"]*)"/gi)].map((m) => m[1].toLowerCase())) {
		expect(href).not.toMatch(/^\s*(javascript|vbscript|data):/);
		expect(href).not.toMatch(/^\/\//);
	}
}

describe('XSS corpus is inert', () => {
	it('has at least 30 vectors', () => {
		expect(VECTORS.length + URL_VECTORS.length).toBeGreaterThanOrEqual(30);
	});

	it.each(VECTORS)('in prose: %s', (v) => {
		expectInert(renderMarkdown(`Some text ${v} more text\n\n${v}\n`));
		expectInert(render(doc(`Prose ${v}\n\n${v}\n`)));
	});

	it.each(VECTORS)('in a heading and a callout: %s', (v) => {
		expectInert(render(doc(`### Sub ${v}\n\n> Warning: ${v}\n`, `Title ${v}`)));
	});

	it.each([...VECTORS, ...URL_VECTORS])('in YAML values that are rendered: %s', (v) => {
		const yamlValue = JSON.stringify(v);
		const source = `---\ntitle: ${yamlValue}\nfamily: ${yamlValue}\npurpose: ${yamlValue}\nspecs: ${yamlValue}\n---\n\n## Step\n\n${block('confirm c1', `prompt: ${yamlValue}`)}\n${block('choice c2', `prompt: ${yamlValue}\noptions: [${yamlValue}, plain]`)}\n${block('fluid c3', `spec: ${yamlValue}\nlevel: ${yamlValue}`)}\n${block('step', `tools: [${yamlValue}]\nqualification: ${yamlValue}`)}`;
		const r = parse(source);
		expect(r.procedure, JSON.stringify(r.errors)).not.toBeNull();
		const html = renderProcedure(r.procedure!);
		expectInert(html);
		expect(html).toContain(escapeHtml('plain'));
	});

	it.each(URL_VECTORS)('in a link target: %s', (v) => {
		const html = renderMarkdown(`[click](${v}) and <${v}> and [ref][r]\n\n[r]: ${v}\n`);
		expectInert(html);
	});

	it.each(URL_VECTORS)('in an image target: %s', (v) => {
		const html = renderMarkdown(`![pic](${v}) ![pic2](${v} "t")`);
		expectInert(html);
		expect(html).not.toContain('<img');
	});
});

describe('links and images', () => {
	it.each([
		['https://example.com/a', true],
		['http://example.com/a', true],
		['mailto:shop@example.com', true],
		['/runs/12', true],
		['notes.md', true],
		['javascript:alert(1)', false],
		['ftp://example.com', false],
		['//example.com', false]
	])('link %s allowed=%s, with rel="noopener noreferrer"', (href, allowed) => {
		const html = renderMarkdown(`[x](${href})`);
		if (allowed) expect(html).toContain('rel="noopener noreferrer"');
		else expect(html).not.toContain('<a');
	});

	it.each([
		['/images/bore-2.jpg', true],
		['/images/abc', true],
		['/images/../secret', false],
		['https://example.com/a.png', false],
		['/static/a.png', false],
		['images/a.png', false]
	])('image %s kept=%s', (src, kept) => {
		expect(renderMarkdown(`![a](${src})`).includes('<img')).toBe(kept);
	});

	it('warns at parse time about a dropped image and a dropped link, at their line', () => {
		const r = parse(doc('Text\n\n![a](https://x.example/a.png)\n\n[b](javascript:alert(1))\n'));
		expect(r.warnings.map((w) => [w.line, /image|link/.exec(w.message)?.[0]])).toEqual([
			[11, 'image'],
			[13, 'link']
		]);
	});

	it('raw HTML is shown as text and warned about', () => {
		const r = parse(doc('<div>hello</div>\n'));
		expect(r.warnings[0].message).toMatch(/Raw HTML/);
		expect(render(doc('<div>hello</div>\n'))).toContain('&lt;div&gt;');
	});
});

describe('callouts and steps', () => {
	it.each([
		['Warning', '⚠'],
		['Caution', '✋'],
		['Note', 'ℹ']
	])('%s renders with an icon and a word', (word, icon) => {
		const html = render(doc(`> ${word}: Hot fluid can burn.\n`));
		expect(html).toContain(`callout-${word.toLowerCase()}`);
		expect(html).toContain(icon);
		expect(html).toContain(`<strong>${word}</strong>`);
	});

	it('renders a step with its attributes and a checkpoint summary in words', () => {
		const html = render(
			doc(
				block('step', 'critical: yes\nminutes: 10\ntools: [torque wrench]') +
					'Tighten.\n\n' +
					block('torque t1', 'target: 24 N·m\ntolerance: ±10 %\nfasteners: 4')
			)
		);
		expect(html).toContain('Critical: a second person verifies');
		expect(html).toContain('About 10 min');
		expect(html).toContain('Target 24 N·m ±10 %: 21.6 to 26.4 N·m.');
	});

	it('is identical on repeated calls (no hidden state)', () => {
		const source = doc('Text **bold**\n\n> Note: x\n');
		expect(render(source)).toBe(render(source));
	});
});
