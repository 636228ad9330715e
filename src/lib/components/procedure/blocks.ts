/**
 * The insert forms of the editor: one zod schema per checkpoint kind (validated in the browser by superforms), and
 * the fenced block each writes. Every schema ends by parsing the block it would write with the engine itself, so a
 * form can only insert a block that parses clean — the problem is shown beside the field that caused it.
 */
import { z } from 'zod';
import { CHECKPOINT_ID, CHECKPOINT_KINDS, parse } from '$lib/procedure';

/** Every checkpoint kind has an insert form: the list is the engine's own. */
export const INSERT_KINDS = CHECKPOINT_KINDS;
export type InsertKind = (typeof INSERT_KINDS)[number];

export interface FieldSpec {
	name: string;
	label: string;
	hint?: string;
	options?: { value: string; label: string }[];
}

const id = z
	.string()
	.trim()
	.regex(CHECKPOINT_ID, 'Lower-case letters, digits and hyphens, starting with a letter or digit (up to 48).');
const optional = z.string().trim().max(300);
const number = (what: string) =>
	z
		.string()
		.trim()
		.regex(/^\d+(\.\d+)?$/, `Write the ${what} as a number with a decimal point, e.g. 12.5.`)
		.refine((v) => Number(v) > 0, `The ${what} must be above zero.`);
/** An optional number (empty allowed), signed when `signed` (temperatures). */
const maybeNumber = (what: string, signed = false) =>
	z
		.string()
		.trim()
		.regex(signed ? /^(-?\d+(\.\d+)?)?$/ : /^(\d+(\.\d+)?)?$/, `Write the ${what} as a number with a decimal point.`);
const refId = z
	.string()
	.trim()
	.regex(/^([a-z0-9][a-z0-9-]{0,47})?$/, 'The id of a checkpoint: lower-case letters, digits and hyphens.');
const wholeNumber = (min: number, max: number) =>
	z
		.string()
		.trim()
		.regex(/^\d{1,4}$/, `A whole number from ${min} to ${max}.`)
		.refine((v) => Number(v) >= min && Number(v) <= max, `A whole number from ${min} to ${max}.`);
const prompt = (what: string) => z.string().trim().min(3, what).max(300);

const shapes = {
	torque: z.object({
		id,
		prompt: optional,
		target: number('target torque'),
		unit: z.enum(['N·m', 'lbf·ft', 'lbf·in']),
		tolerance: z.string().trim().min(1, 'Give a tolerance, e.g. ±10 % or 9 to 11 N·m.'),
		fasteners: z.string().trim().min(1, 'A count (e.g. 12) or labels separated by commas (C1, C2, C3).'),
		passes: optional,
		tool: z.enum(['any', 'preset', 'indicating'])
	}),
	measure: z.object({
		id,
		prompt: optional,
		feature: z.enum(['bore', 'shaft']),
		nominal: number('nominal size'),
		unit: z.enum(['mm', 'in']),
		tolerance: z.string().trim().min(1, 'Give an ISO class (H7 for a bore, g6 for a shaft) or e.g. ±0.01 mm.'),
		angles: optional,
		depths: optional,
		resolution: optional
	}),
	confirm: z.object({
		id,
		prompt: z.string().trim().min(3, 'Say what the technician confirms.').max(300),
		photo: z.enum(['off', 'optional', 'required'])
	}),
	part: z.object({
		id,
		prompt: optional,
		number: z.string().trim().min(1, 'Give the part number or its pattern, e.g. KL-4410-##@.').max(64),
		serial: optional,
		lot: optional,
		quantity: z
			.string()
			.trim()
			.regex(/^[1-9]\d{0,3}$/, 'A whole number from 1.')
	}),
	clearance: z.object({
		id,
		prompt: optional,
		from: z.enum(['measures', 'fit', 'reading']),
		bore: refId,
		shaft: refId,
		fit: optional,
		limits: optional,
		resolution: optional
	}),
	choice: z.object({
		id,
		prompt: prompt('Ask the question the technician answers.'),
		options: z.string().trim().min(1, 'List at least two options, separated by commas.').max(600),
		then: z.string().trim().max(600)
	}),
	fluid: z.object({
		id,
		prompt: optional,
		spec: z.string().trim().min(1, 'Name the fluid specification, e.g. KLW DCF-7.').max(200),
		lot: optional,
		amountMin: maybeNumber('smallest amount'),
		amountMax: maybeNumber('largest amount'),
		amountUnit: z.enum(['L', 'mL', 'US qt', 'US gal']),
		level: optional,
		tempMin: maybeNumber('lowest temperature', true),
		tempMax: maybeNumber('highest temperature', true),
		tempUnit: z.enum(['°C', '°F'])
	}),
	test: z.object({
		id,
		prompt: prompt('Say what is tested and what counts as a pass.'),
		value: optional,
		qualification: optional
	}),
	text: z.object({ id, prompt: prompt('Say what the technician writes down.'), minLength: wholeNumber(0, 2000) }),
	photo: z.object({ id, prompt: prompt('Say what the photo must show.'), min: wholeNumber(1, 50) })
};

export type BlockData<K extends InsertKind> = z.infer<(typeof shapes)[K]>;

export const FIELDS: Record<InsertKind, FieldSpec[]> = {
	torque: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. cover-screws' },
		{ name: 'prompt', label: 'Prompt (optional)' },
		{ name: 'target', label: 'Target torque' },
		{ name: 'unit', label: 'Unit', options: ['N·m', 'lbf·ft', 'lbf·in'].map((u) => ({ value: u, label: u })) },
		{ name: 'tolerance', label: 'Tolerance', hint: '±10 %, ±0.5 N·m or 9 to 11 N·m' },
		{ name: 'fasteners', label: 'Fasteners', hint: 'A count (12) or labels: C1, C2, C3' },
		{ name: 'passes', label: 'Passes (optional)', hint: 'e.g. 50 %, 100 %' },
		{
			name: 'tool',
			label: 'Wrench',
			options: [
				{ value: 'any', label: 'Any (decided at the bench)' },
				{ value: 'preset', label: 'Preset (click)' },
				{ value: 'indicating', label: 'Indicating' }
			]
		}
	],
	measure: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. bore-1' },
		{ name: 'prompt', label: 'Prompt (optional)' },
		{
			name: 'feature',
			label: 'Feature',
			options: [
				{ value: 'bore', label: 'Bore (hole)' },
				{ value: 'shaft', label: 'Shaft' }
			]
		},
		{ name: 'nominal', label: 'Nominal size' },
		{ name: 'unit', label: 'Unit', options: ['mm', 'in'].map((u) => ({ value: u, label: u })) },
		{ name: 'tolerance', label: 'Tolerance', hint: 'ISO class (H7, g6) or ±0.01 mm, max 22.05 mm…' },
		{ name: 'angles', label: 'Angles (optional)', hint: 'e.g. 0°, 90°' },
		{ name: 'depths', label: 'Depths (optional)', hint: 'e.g. top, bottom' },
		{ name: 'resolution', label: 'Gauge resolution (optional)', hint: 'e.g. 0.001 mm' }
	],
	confirm: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. magnet-1' },
		{ name: 'prompt', label: 'What the technician confirms' },
		{
			name: 'photo',
			label: 'Photo',
			options: [
				{ value: 'off', label: 'No photo' },
				{ value: 'optional', label: 'Optional' },
				{ value: 'required', label: 'Required' }
			]
		}
	],
	part: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. new-sensor' },
		{ name: 'prompt', label: 'Prompt (optional)' },
		{ name: 'number', label: 'Part number or pattern', hint: '# digit, @ letter, * either' },
		{ name: 'serial', label: 'Serial (optional)', hint: '"required" or a pattern, e.g. PS########' },
		{ name: 'lot', label: 'Lot (optional)', hint: '"required" or a pattern' },
		{ name: 'quantity', label: 'Quantity' }
	],
	clearance: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. piston-1-clearance' },
		{ name: 'prompt', label: 'Prompt (optional)' },
		{
			name: 'from',
			label: 'Clearance from',
			options: [
				{ value: 'measures', label: 'Two measure checkpoints (bore and shaft)' },
				{ value: 'fit', label: 'A fit designation, read directly' },
				{ value: 'reading', label: 'Limits only, read directly (feeler gauge)' }
			]
		},
		{ name: 'bore', label: 'Bore checkpoint id', hint: 'with "Two measure checkpoints", e.g. bore-1' },
		{ name: 'shaft', label: 'Shaft checkpoint id', hint: 'with "Two measure checkpoints", e.g. piston-1' },
		{ name: 'fit', label: 'Fit', hint: 'with "A fit designation": size, hole and shaft class, e.g. 18 H7/g6' },
		{ name: 'limits', label: 'Limits', hint: 'e.g. 0.020 to 0.070 mm; optional beside two measures or a fit' },
		{ name: 'resolution', label: 'Gauge resolution (optional)', hint: 'e.g. 0.001 mm' }
	],
	choice: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. sensor-disposition' },
		{ name: 'prompt', label: 'Question' },
		{ name: 'options', label: 'Options', hint: 'separated by commas: Reused, Replaced new, Replaced from donor' },
		{
			name: 'then',
			label: 'Follow-ups (optional)',
			hint: 'option: checkpoint ids, options separated by ";" — Replaced new: new-sensor; Replaced from donor: donor-sensor, donor-photo'
		}
	],
	fluid: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. fill' },
		{ name: 'prompt', label: 'Prompt (optional)' },
		{ name: 'spec', label: 'Fluid specification', hint: 'e.g. KLW DCF-7 (invented)' },
		{ name: 'lot', label: 'Lot (optional)', hint: '"required" or a pattern, e.g. FL-####-@@' },
		{ name: 'amountMin', label: 'Amount: at least', hint: 'leave both empty for a level check only' },
		{ name: 'amountMax', label: 'Amount: at most' },
		{
			name: 'amountUnit',
			label: 'Amount unit',
			options: ['L', 'mL', 'US qt', 'US gal'].map((u) => ({ value: u, label: u }))
		},
		{ name: 'level', label: 'Level check (optional)', hint: 'where and how, e.g. fluid just runs from the check plug' },
		{ name: 'tempMin', label: 'Level temperature: from (optional)' },
		{ name: 'tempMax', label: 'Level temperature: to' },
		{ name: 'tempUnit', label: 'Temperature unit', options: ['°C', '°F'].map((u) => ({ value: u, label: u })) }
	],
	test: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. seal-test' },
		{ name: 'prompt', label: 'What is tested' },
		{ name: 'value', label: 'Value with limits (optional)', hint: 'e.g. 1100 to 1300 kPa, max 0.05 mm' },
		{ name: 'qualification', label: 'Qualification needed (optional)', hint: 'e.g. transmission control adaptation' }
	],
	text: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. bore-findings' },
		{ name: 'prompt', label: 'What the technician writes' },
		{ name: 'minLength', label: 'Shortest answer (characters)', hint: '0 to 2000' }
	],
	photo: [
		{ name: 'id', label: 'Checkpoint id', hint: 'e.g. vb-as-found' },
		{ name: 'prompt', label: 'What the photo shows' },
		{ name: 'min', label: 'Photos needed (at least)', hint: '1 to 50' }
	]
};

export const DEFAULTS: { [K in InsertKind]: BlockData<K> } = {
	torque: { id: '', prompt: '', target: '', unit: 'N·m', tolerance: '±10 %', fasteners: '', passes: '', tool: 'any' },
	measure: {
		id: '',
		prompt: '',
		feature: 'bore',
		nominal: '',
		unit: 'mm',
		tolerance: 'H7',
		angles: '',
		depths: '',
		resolution: ''
	},
	confirm: { id: '', prompt: '', photo: 'off' },
	part: { id: '', prompt: '', number: '', serial: '', lot: '', quantity: '1' },
	clearance: { id: '', prompt: '', from: 'measures', bore: '', shaft: '', fit: '', limits: '', resolution: '' },
	choice: { id: '', prompt: '', options: '', then: '' },
	fluid: {
		id: '',
		prompt: '',
		spec: '',
		lot: '',
		amountMin: '',
		amountMax: '',
		amountUnit: 'L',
		level: '',
		tempMin: '',
		tempMax: '',
		tempUnit: '°C'
	},
	test: { id: '', prompt: '', value: '', qualification: '' },
	text: { id: '', prompt: '', minLength: '1' },
	photo: { id: '', prompt: '', min: '1' }
};

const list = (v: string) => (v.includes(',') ? `[${v}]` : v);
const split = (v: string, sep: string) =>
	v
		.split(sep)
		.map((x) => x.trim())
		.filter(Boolean);
/** Free text as a YAML scalar: plain when it reads back unchanged, double-quoted otherwise. */
const scalar = (v: string) => (/^[\p{L}\p{N}(]/u.test(v) && !/: |\s#|:$/.test(v) ? v : JSON.stringify(v));
/** An option key as the engine makes it from a label (FORMAT.md, choice). */
export const optionKey = (label: string) =>
	label
		.toLowerCase()
		.replace(/[^a-z0-9]+/g, '-')
		.replace(/^-+|-+$/g, '');
const range = (min: string, max: string, unit: string) => (min || max ? `${min} to ${max} ${unit}` : undefined);

/** One written line of the block body and the form field it came from. */
type Line = [field: string, text: string | undefined];
const kv = (field: string, key: string, v: string | undefined): Line => [
	field,
	v === undefined ? undefined : `${key}: ${v}`
];

function bodyLines(kind: InsertKind, d: Record<string, string>): Line[] {
	const out: Line[] = [kv('prompt', 'prompt', d.prompt ? scalar(d.prompt) : undefined)];
	const add = (field: string, key: string, v: string | undefined) => out.push(kv(field, key, v));
	if (kind === 'torque') {
		add('target', 'target', `${d.target} ${d.unit}`);
		add('tolerance', 'tolerance', d.tolerance);
		add('fasteners', 'fasteners', list(d.fasteners));
		add('passes', 'passes', d.passes || undefined);
		add('tool', 'tool', d.tool === 'any' ? undefined : d.tool);
	} else if (kind === 'measure') {
		add('feature', 'feature', d.feature);
		add('nominal', 'nominal', `${d.nominal} ${d.unit}`);
		add('tolerance', 'tolerance', d.tolerance);
		add('angles', 'angles', d.angles ? `[${d.angles}]` : undefined);
		add('depths', 'depths', d.depths ? `[${d.depths}]` : undefined);
		add('resolution', 'resolution', d.resolution || undefined);
	} else if (kind === 'confirm') {
		add('photo', 'photo', d.photo === 'off' ? undefined : d.photo);
	} else if (kind === 'part') {
		add('number', 'number', d.number);
		add('serial', 'serial', d.serial || undefined);
		add('lot', 'lot', d.lot || undefined);
		add('quantity', 'quantity', d.quantity === '1' ? undefined : d.quantity);
	} else if (kind === 'clearance') {
		if (d.from === 'measures') add('bore', 'bore', d.bore);
		if (d.from === 'measures') add('shaft', 'shaft', d.shaft);
		if (d.from === 'fit') add('fit', 'fit', d.fit);
		add('limits', 'limits', d.limits || undefined);
		add('resolution', 'resolution', d.resolution || undefined);
	} else if (kind === 'choice') {
		add('options', 'options', '');
		for (const label of split(d.options, ',')) out.push(['options', `  ${optionKey(label)}: ${scalar(label)}`]);
		const then = split(d.then, ';');
		if (then.length) add('then', 'then', '');
		for (const t of then) {
			const at = t.indexOf(':');
			out.push(['then', `  ${optionKey(t.slice(0, at))}: [${split(t.slice(at + 1), ',').join(', ')}]`]);
		}
	} else if (kind === 'fluid') {
		add('spec', 'spec', scalar(d.spec));
		add('lot', 'lot', d.lot || undefined);
		add('amountMax', 'amount', range(d.amountMin, d.amountMax, d.amountUnit));
		add('level', 'level', d.level ? scalar(d.level) : undefined);
		add('tempMin', 'temperature', range(d.tempMin, d.tempMax, d.tempUnit));
	} else if (kind === 'test') {
		add('value', 'value', d.value || undefined);
		add('qualification', 'qualification', d.qualification ? scalar(d.qualification) : undefined);
	} else if (kind === 'text') {
		add('minLength', 'min-length', d.minLength === '1' ? undefined : d.minLength);
	} else if (kind === 'photo') {
		add('min', 'min', d.min === '1' ? undefined : d.min);
	}
	return out.map(([f, t]) => [f, t?.replace(/: $/, ':')] as Line).filter(([, t]) => t !== undefined);
}

/** The fenced block a form writes (no validation: see `blockSchema`). Keys in FORMAT.md order. */
export function toBlock<K extends InsertKind>(kind: K, data: BlockData<K>): string {
	const d = data as Record<string, string>;
	const body = bodyLines(kind, d).map(([, t]) => t as string);
	return ['```' + `${kind} ${d.id}`, ...body, '```'].join('\n');
}

/** What a form must have before the engine is asked: fields that only some choices need. */
function missing(kind: InsertKind, d: Record<string, string>): [string, string][] {
	const out: [string, string][] = [];
	if (kind === 'clearance') {
		if (d.from === 'measures') {
			if (!d.bore) out.push(['bore', 'Give the id of the measure checkpoint of the bore, e.g. bore-1.']);
			if (!d.shaft) out.push(['shaft', 'Give the id of the measure checkpoint of the shaft, e.g. piston-1.']);
		} else if (d.from === 'fit' && !d.fit)
			out.push(['fit', 'Write the fit: size, hole and shaft class, e.g. 18 H7/g6.']);
		else if (d.from === 'reading' && !d.limits) out.push(['limits', 'Give the limits, e.g. 0.020 to 0.070 mm.']);
	} else if (kind === 'choice') {
		const labels = split(d.options, ',');
		if (labels.length < 2) out.push(['options', 'List at least two options, separated by commas.']);
		const bad = labels.find((l) => !optionKey(l));
		if (bad) out.push(['options', `Option "${bad}" needs at least one letter or digit.`]);
		const loose = split(d.then, ';').find((t) => !/^[^:]*[\p{L}\p{N}][^:]*:\s*\S/u.test(t));
		if (loose)
			out.push(['then', `Write "${loose}" as an option, a colon and checkpoint ids, e.g. Replaced new: new-sensor.`]);
	} else if (kind === 'fluid') {
		for (const [a, b, what] of [
			['amountMin', 'amountMax', 'amount'],
			['tempMin', 'tempMax', 'temperature']
		] as const) {
			if (d[a] && !d[b]) out.push([b, `Give the largest ${what} too.`]);
			if (!d[a] && d[b]) out.push([a, `Give the smallest ${what} too.`]);
		}
		if (!d.amountMin && !d.amountMax && !d.level)
			out.push(['amountMin', 'Give the amount to fill (at least and at most), or describe the level check.']);
	}
	return out;
}

/** Messages on the fence line name no key line; these say which field they are about. */
const FENCE_RULES: [RegExp, string][] = [
	[/^the id "/, 'id'],
	[/^option "|already made conditional|cannot require itself/, 'then']
];
const FALLBACK: Partial<Record<InsertKind, string>> = { clearance: 'bore', choice: 'options', fluid: 'amountMin' };

/** The checkpoint blocks of a document (no `step` blocks), so references from a new block can be checked. */
export function checkpointBlocks(source: string): string {
	const out: string[] = [];
	let fence: 'plain' | 'keep' | undefined;
	for (const line of source.replace(/\r\n?/g, '\n').split('\n')) {
		if (fence) {
			if (fence === 'keep') out.push(line);
			if (/^```\s*$/.test(line)) fence = undefined;
		} else if (/^```/.test(line)) {
			fence = /^```(?!step\b)[a-z]+\s+\S/.test(line) ? 'keep' : 'plain';
			if (fence === 'keep') out.push(line);
		}
	}
	return out.length ? out.join('\n') + '\n\n' : '';
}

const HEAD = '---\ntitle: Insert check\nfamily: check\npurpose: check\n---\n\n## Check\n\n';

/**
 * The schema of a kind's form, ending with the engine's own verdict on the block it would write — written after the
 * checkpoints of `context()` (the document being edited), so a clearance's measures, a choice's follow-ups and a
 * repeated id are checked too.
 */
export function blockSchema<K extends InsertKind>(kind: K, context: () => string = () => '') {
	return (shapes[kind] as z.ZodObject).superRefine((data, ctx) => {
		const d = data as Record<string, string>;
		const gaps = missing(kind, d);
		for (const [field, message] of gaps) ctx.addIssue({ code: 'custom', path: [field], message });
		if (gaps.length) return;
		const lines = bodyLines(kind, d);
		const before = HEAD + checkpointBlocks(context());
		const first = before.split('\n').length; // document line of the block's fence
		const r = parse(before + toBlock(kind, data as BlockData<K>) + '\n');
		const written = new Map(lines.map(([f, t]) => [t!.match(/^([a-z-]+):/)?.[1], f]));
		for (const problem of r.errors) {
			const at = problem.line - first;
			if (at < 0 || at > lines.length + 1) continue; // about the document's own blocks, not this one
			const message = problem.message.replace(/^Step 1, checkpoint [^:]+: /, '');
			let field = lines[at - 1]?.[0];
			if (!field) {
				const rule = FENCE_RULES.find(([re]) => re.test(message))?.[1];
				const named = [...message.matchAll(/"([a-z-]+)[":]/g)]
					.map((m) => written.get(m[1]) ?? (m[1] in d ? m[1] : undefined))
					.find(Boolean);
				field = rule ?? named ?? FALLBACK[kind] ?? 'id';
			}
			ctx.addIssue({ code: 'custom', path: [field], message });
		}
	});
}
