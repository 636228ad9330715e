/**
 * The insert forms of the editor: one zod schema per checkpoint kind (validated in the browser by superforms), and
 * the fenced block each writes. Every schema ends by parsing the block it would write with the engine itself, so a
 * form can only insert a block that parses clean — the problem is shown beside the field that caused it.
 */
import { z } from 'zod';
import { CHECKPOINT_ID, parse } from '$lib/procedure';

export const INSERT_KINDS = ['torque', 'measure', 'confirm', 'part'] as const;
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
	})
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
	part: { id: '', prompt: '', number: '', serial: '', lot: '', quantity: '1' }
};

const list = (v: string) => (v.includes(',') ? `[${v}]` : v);

/** The fenced block a form writes (no validation: see `blockSchema`). Keys in FORMAT.md order. */
export function toBlock<K extends InsertKind>(kind: K, data: BlockData<K>): string {
	const d = data as Record<string, string>;
	const lines: [string, string | undefined][] = [['prompt', d.prompt || undefined]];
	if (kind === 'torque') {
		lines.push(['target', `${d.target} ${d.unit}`], ['tolerance', d.tolerance], ['fasteners', list(d.fasteners)]);
		lines.push(['passes', d.passes || undefined], ['tool', d.tool === 'any' ? undefined : d.tool]);
	} else if (kind === 'measure') {
		lines.push(['feature', d.feature], ['nominal', `${d.nominal} ${d.unit}`], ['tolerance', d.tolerance]);
		lines.push(['angles', d.angles ? `[${d.angles}]` : undefined], ['depths', d.depths ? `[${d.depths}]` : undefined]);
		lines.push(['resolution', d.resolution || undefined]);
	} else if (kind === 'confirm') {
		lines.push(['photo', d.photo === 'off' ? undefined : d.photo]);
	} else if (kind === 'part') {
		lines.push(['number', d.number], ['serial', d.serial || undefined], ['lot', d.lot || undefined]);
		lines.push(['quantity', d.quantity === '1' ? undefined : d.quantity]);
	}
	const body = lines.filter(([, v]) => v !== undefined).map(([k, v]) => `${k}: ${v}`);
	return ['```' + `${kind} ${d.id}`, ...body, '```'].join('\n');
}

const HEAD = '---\ntitle: Insert check\nfamily: check\npurpose: check\n---\n\n## Check\n\n';
const HEAD_LINES = HEAD.split('\n').length - 1;

/** The schema of a kind's form, ending with the engine's own verdict on the block it would write. */
export function blockSchema<K extends InsertKind>(kind: K) {
	return (shapes[kind] as z.ZodObject).superRefine((data, ctx) => {
		const block = toBlock(kind, data as BlockData<K>);
		const blockLines = block.split('\n');
		const r = parse(HEAD + block + '\n');
		for (const problem of r.errors) {
			const line = blockLines[problem.line - HEAD_LINES - 1] ?? '';
			const key = line.match(/^([a-z-]+):/)?.[1];
			const field = key && key in (data as object) ? key : key === 'target' || key === 'nominal' ? key : 'id';
			ctx.addIssue({
				code: 'custom',
				path: [field],
				message: problem.message.replace(/^Step 1, checkpoint [^:]+: /, '')
			});
		}
	});
}
