/**
 * Safe HTML for procedures: the editor preview, the technician's step view and the audit view
 * all call these, on the server and in the browser, and get the same markup.
 *
 * Two layers: the Marked renderer never emits raw HTML (it is escaped), links outside
 * http(s)/mailto/relative, or images outside `/images/`; then DOMPurify with a short allow-list
 * removes anything that slipped through. YAML values (titles, prompts, labels) are escaped text.
 */
import DOMPurify from 'isomorphic-dompurify';
import { Marked, type Tokens } from 'marked';
import { decimalPlaces, toFixed, ZERO } from '../checks/exact';
import { formatValue } from '../checks/format';
import { unitById } from '../checks/units';
import type { Block, CalloutLevel, Checkpoint, LimitsJson, Procedure, Step } from './model';
import { isAllowedImage, isAllowedLink, parse } from './parse';
import { exactFromString } from './quantity';

/** Escapes text for HTML element content and quoted attribute values. */
export function escapeHtml(s: string): string {
	return s
		.replace(/&/g, '&amp;')
		.replace(/</g, '&lt;')
		.replace(/>/g, '&gt;')
		.replace(/"/g, '&quot;')
		.replace(/'/g, '&#39;');
}

const CALLOUT = /^\s*(warning|caution|note)\s*:\s*/i;

/** Icon and word per callout level; meaning never rests on colour alone. */
export const CALLOUT_LABELS: Record<CalloutLevel, { icon: string; word: string }> = {
	warning: { icon: '⚠', word: 'Warning' },
	caution: { icon: '✋', word: 'Caution' },
	note: { icon: 'ℹ', word: 'Note' }
};

const md = new Marked({ gfm: true, breaks: false });
md.use({
	renderer: {
		html(token: Tokens.HTML | Tokens.Tag) {
			return escapeHtml(token.text);
		},
		link(token: Tokens.Link) {
			const inner = this.parser.parseInline(token.tokens);
			if (!isAllowedLink(token.href)) return inner;
			const title = token.title ? ` title="${escapeHtml(token.title)}"` : '';
			return `<a href="${escapeHtml(token.href.trim())}"${title} rel="noopener noreferrer">${inner}</a>`;
		},
		image(token: Tokens.Image) {
			if (!isAllowedImage(token.href)) return '';
			const title = token.title ? ` title="${escapeHtml(token.title)}"` : '';
			return `<img src="${escapeHtml(token.href.trim())}" alt="${escapeHtml(token.text)}"${title}>`;
		},
		code(token: Tokens.Code) {
			return `<pre><code>${escapeHtml(token.text)}</code></pre>\n`;
		},
		blockquote(token: Tokens.Blockquote) {
			const m = CALLOUT.exec(token.text);
			if (m) return calloutHtml(m[1].toLowerCase() as CalloutLevel, token.text.slice(m[0].length));
			return `<blockquote>\n${this.parser.parse(token.tokens)}</blockquote>\n`;
		}
	}
});

function calloutHtml(level: CalloutLevel, markdown: string): string {
	const { icon, word } = CALLOUT_LABELS[level];
	return (
		`<aside class="callout callout-${level}" role="note" aria-label="${word}">` +
		`<p class="callout-label"><span class="callout-icon" aria-hidden="true">${icon}</span> <strong>${word}</strong></p>` +
		`${md.parse(markdown, { async: false })}</aside>\n`
	);
}

const SANITIZE = {
	ALLOWED_TAGS: [
		'a',
		'aside',
		'blockquote',
		'br',
		'code',
		'del',
		'dd',
		'dl',
		'dt',
		'em',
		'h1',
		'h2',
		'h3',
		'h4',
		'h5',
		'h6',
		'header',
		'hr',
		'img',
		'li',
		'ol',
		'p',
		'pre',
		'section',
		'span',
		'strong',
		'table',
		'tbody',
		'td',
		'th',
		'thead',
		'tr',
		'ul',
		'input'
	],
	ALLOWED_ATTR: [
		'href',
		'src',
		'alt',
		'title',
		'rel',
		'class',
		'role',
		'aria-label',
		'aria-hidden',
		'align',
		'start',
		'type',
		'checked',
		'disabled'
	],
	ALLOWED_URI_REGEXP: /^(?:(?:https?|mailto):|[^a-z]|[a-z+.-]+(?:[^a-z+.\-:]|$))/i,
	ALLOW_DATA_ATTR: false,
	ALLOW_ARIA_ATTR: false
};

/** Final pass over every HTML string this module returns. */
export function sanitize(html: string): string {
	return DOMPurify.sanitize(html, SANITIZE) as string;
}

/** Prose Markdown → safe HTML (callouts included). */
export function renderMarkdown(markdown: string): string {
	return sanitize(md.parse(markdown, { async: false }));
}

/** "18 to 18.018 mm", "at most 0.005 mm", "at least 2.5 mm". */
export function limitsText(l: LimitsJson): string {
	const unit = unitById(l.unit);
	// Both bounds with the same number of places ("18.000 to 18.018 mm"), as drawings write them.
	const places = Math.max(
		...[l.min, l.max].map((s) => (s === undefined ? 0 : (decimalPlaces(exactFromString(s) ?? ZERO) ?? 6)))
	);
	const v = (s: string) => {
		const e = exactFromString(s);
		if (!e) return s;
		return decimalPlaces(e) !== undefined && places <= 9 ? toFixed(e, places) : formatValue(e);
	};
	const gap = unit.symbol === '°' ? '' : ' ';
	if (l.min !== undefined && l.max !== undefined) return `${v(l.min)} to ${v(l.max)}${gap}${unit.symbol}`;
	if (l.max !== undefined) return `at most ${v(l.max)}${gap}${unit.symbol}`;
	return `at least ${v(l.min ?? '0')}${gap}${unit.symbol}`;
}

const KIND_WORD: Record<Checkpoint['kind'], string> = {
	torque: 'Torque',
	measure: 'Measure',
	clearance: 'Clearance',
	confirm: 'Confirm',
	choice: 'Choice',
	part: 'Part record',
	fluid: 'Fluid',
	test: 'Test result',
	text: 'Note',
	photo: 'Photo evidence'
};

/** Plain-text lines describing a checkpoint's spec, for summaries and the bench runner. */
export function checkpointSummary(cp: Checkpoint): string[] {
	const lines: string[] = [];
	const q = (value: string, unitId: string) =>
		`${formatValue(exactFromString(value) ?? { n: 0n, d: 1n })} ${unitById(unitId).symbol}`;
	switch (cp.kind) {
		case 'torque': {
			lines.push(`Target ${q(cp.target.value, cp.target.unit)} ${cp.tolerance}: ${limitsText(cp.limits)}.`);
			lines.push(
				`${cp.fasteners.length} fastener${cp.fasteners.length === 1 ? '' : 's'}, tightened in the order ${cp.order.join(', ')}.`
			);
			if (cp.passes.length > 1) {
				lines.push(
					`Passes: ${cp.passes.map((p, i) => `${i + 1}) all to ${p.percent} % = ${q(p.target, cp.target.unit)} (${limitsText(p.limits)})`).join('; ')}.`
				);
			}
			for (const a of cp.angles)
				lines.push(`Then turn each +${a.degrees}°${a.limits ? ` (${limitsText(a.limits)})` : ''}.`);
			if (cp.tool === 'preset')
				lines.push('Preset (click) wrench: record the setting and "reached" for each fastener.');
			else if (cp.tool === 'indicating') lines.push('Indicating wrench: record the reading for each fastener.');
			break;
		}
		case 'measure': {
			for (const s of cp.stages) {
				const nominal = s.nominal ? `${q(s.nominal, cp.unit)} ${s.tolerance}` : s.tolerance;
				lines.push(
					`${cp.stages.length > 1 ? `${s.name}: ` : ''}${cp.feature ? `${cp.feature} ` : ''}${nominal} → ${limitsText(s.limits)}.`
				);
			}
			lines.push(
				`${cp.positions.length} reading${cp.positions.length === 1 ? '' : 's'}${cp.positions.length > 1 && (cp.angles.length || cp.depths.length) ? `: ${cp.positions.join('; ')}` : ''}.`
			);
			if (cp.ovality) lines.push(`Ovality ${limitsText(cp.ovality)} at each depth.`);
			if (cp.taper) lines.push(`Taper ${limitsText(cp.taper)} between depths.`);
			if (cp.zeroCheck) lines.push('Zero the gauge on its master first.');
			if (cp.material)
				lines.push(
					`Part temperature ${cp.temperature === 'required' ? 'required' : 'optional'}; readings corrected to 20 °C for ${cp.material.replace('_', ' ')}.`
				);
			else if (cp.temperature !== 'off') lines.push(`Part temperature ${cp.temperature}.`);
			if (cp.resolution) lines.push(`Gauge resolution ${q(cp.resolution, cp.unit)}.`);
			break;
		}
		case 'clearance':
			if (cp.bore && cp.shaft) lines.push(`From ${cp.bore} (bore) − ${cp.shaft} (shaft), worst case.`);
			if (cp.fit)
				lines.push(
					`Fit ${cp.fit.text}: hole ${limitsText(cp.fit.holeLimits)}, shaft ${limitsText(cp.fit.shaftLimits)}.`
				);
			lines.push(`Clearance ${limitsText(cp.limits)}.`);
			break;
		case 'confirm':
			lines.push(
				cp.photo === 'required'
					? 'Confirm, with a photo.'
					: cp.photo === 'optional'
						? 'Confirm; a photo may be added.'
						: 'Confirm.'
			);
			break;
		case 'choice':
			for (const o of cp.options) lines.push(`${o.label}${o.then.length ? ` → then ${o.then.join(', ')}` : ''}`);
			break;
		case 'part':
			lines.push(`Part number ${cp.numbers.join(' or ')}, quantity ${cp.quantity}.`);
			if (cp.serial) lines.push(`Serial number${cp.serial.pattern ? ` (${cp.serial.pattern})` : ''} required.`);
			if (cp.lot) lines.push(`Lot number${cp.lot.pattern ? ` (${cp.lot.pattern})` : ''} required.`);
			break;
		case 'fluid':
			lines.push(`Fluid: ${cp.spec}.`);
			if (cp.lot) lines.push(`Fluid lot${cp.lot.pattern ? ` (${cp.lot.pattern})` : ''} required.`);
			if (cp.amount) lines.push(`Amount ${limitsText(cp.amount)}.`);
			if (cp.level)
				lines.push(
					`Level: ${cp.level.description}${cp.level.temperature ? `, with the fluid at ${limitsText(cp.level.temperature)}` : ''}.`
				);
			break;
		case 'test':
			if (cp.value) lines.push(`Value ${limitsText(cp.value)}; record pass or fail.`);
			else lines.push('Record pass or fail.');
			if (cp.qualification) lines.push(`Performed by a person qualified for: ${cp.qualification}.`);
			break;
		case 'text':
			lines.push(cp.minLength > 1 ? `Written note, at least ${cp.minLength} characters.` : 'Written note.');
			break;
		case 'photo':
			lines.push(`At least ${cp.min} photo${cp.min === 1 ? '' : 's'}.`);
			break;
	}
	if (cp.when) lines.push(`Required when ${cp.when.choice} is ${cp.when.options.join(' or ')}.`);
	return lines;
}

function checkpointHtml(cp: Checkpoint): string {
	const prompt = cp.prompt ? `<p class="checkpoint-prompt">${escapeHtml(cp.prompt)}</p>` : '';
	const items = checkpointSummary(cp)
		.map((l) => `<li>${escapeHtml(l)}</li>`)
		.join('');
	return (
		`<section class="checkpoint checkpoint-${cp.kind}" aria-label="${escapeHtml(`${KIND_WORD[cp.kind]} checkpoint ${cp.id}`)}">` +
		`<p class="checkpoint-kind"><strong>${KIND_WORD[cp.kind]}</strong> <code>${escapeHtml(cp.id)}</code></p>` +
		`${prompt}<ul class="checkpoint-spec">${items}</ul></section>\n`
	);
}

/** Safe HTML summary of one checkpoint. */
export function renderCheckpoint(cp: Checkpoint): string {
	return sanitize(checkpointHtml(cp));
}

function blocksHtml(blocks: Block[], checkpoints: Checkpoint[]): string {
	const byId = new Map(checkpoints.map((c) => [c.id, c]));
	return blocks
		.map((b) => {
			if (b.type === 'markdown') return md.parse(b.markdown, { async: false });
			if (b.type === 'callout') return calloutHtml(b.level, b.markdown);
			const cp = byId.get(b.id);
			return cp ? checkpointHtml(cp) : '';
		})
		.join('');
}

function stepHtml(step: Step): string {
	const meta: string[] = [];
	if (step.critical)
		meta.push(
			'<span class="step-critical"><span aria-hidden="true">◆</span> Critical: a second person verifies</span>'
		);
	if (step.minutes !== undefined) meta.push(`<span class="step-minutes">About ${step.minutes} min</span>`);
	if (step.tools.length) meta.push(`<span class="step-tools">Tools: ${escapeHtml(step.tools.join(', '))}</span>`);
	if (step.qualification)
		meta.push(`<span class="step-qualification">Qualification: ${escapeHtml(step.qualification)}</span>`);
	return (
		`<section class="step${step.critical ? ' step-is-critical' : ''}">` +
		`<h2>Step ${step.index + 1}: ${escapeHtml(step.title)}</h2>` +
		(meta.length ? `<p class="step-meta">${meta.join(' · ')}</p>` : '') +
		blocksHtml(step.blocks, step.checkpoints) +
		`</section>\n`
	);
}

/** Safe HTML of one step: heading, attributes, prose, callouts and checkpoint summaries in order. */
export function renderStep(step: Step): string {
	return sanitize(stepHtml(step));
}

/** Safe HTML of a whole procedure: header from the front matter, introduction, then every step. */
export function renderProcedure(p: Procedure): string {
	const m = p.meta;
	const header =
		`<header class="procedure-header"><h1>${escapeHtml(m.title)}</h1>` +
		`<p class="procedure-family">Unit family: ${escapeHtml(m.family)}${m.revision ? ` · Revision ${escapeHtml(m.revision)}` : ''}</p>` +
		`<p class="procedure-purpose">${escapeHtml(m.purpose)}</p>` +
		(m.specs ? `<p class="procedure-specs">Specifications: ${escapeHtml(m.specs)}</p>` : '') +
		`</header>\n`;
	return sanitize(header + blocksHtml(p.intro, []) + p.steps.map(stepHtml).join(''));
}

/**
 * Renders a parsed procedure, or Markdown source: source that parses is rendered as a
 * procedure; source with errors is rendered as plain prose (fences shown as code) so an editor
 * preview still shows something.
 */
export function render(input: Procedure | string): string {
	if (typeof input !== 'string') return renderProcedure(input);
	const r = parse(input);
	return r.procedure ? renderProcedure(r.procedure) : renderMarkdown(input);
}
