/**
 * The typed procedure model: what `parse` produces, what the server stores as JSON and what the
 * browser re-uses offline. Plain data only — no bigint, no class instances — so it survives
 * JSON.stringify/parse unchanged. Exact values are decimal strings ("25.021"), or "n/d" for the
 * rare converted limit with no finite decimal; units are unit ids from `checks/units`
 * ('mm', 'N_m', …).
 */
import { z } from 'zod';

/** Checkpoint ids: lower-case letters, digits and hyphens, starting with a letter or digit. */
export const CHECKPOINT_ID = /^[a-z0-9][a-z0-9-]{0,47}$/;

const exactString = z.string().regex(/^-?(?:\d+(?:\.\d+)?|\d+\/\d+)$/, 'an exact decimal or n/d string');
const unitId = z.string().min(1);

/** Limits as stored: decimal strings in the unit `unit` (a unit id). Either side may be open. */
export const LimitsJsonSchema = z.object({ min: exactString.optional(), max: exactString.optional(), unit: unitId });
export type LimitsJson = z.infer<typeof LimitsJsonSchema>;

/** A value with its unit, e.g. `{ value: '12', unit: 'N_m' }`. */
export const QuantityJsonSchema = z.object({ value: exactString, unit: unitId });
export type QuantityJson = z.infer<typeof QuantityJsonSchema>;

/**
 * A recorded identifier (serial, lot): required when present; `pattern` (placeholder syntax, see
 * `pattern.ts`) when its format is known. Patterns are stored as written and compiled on use.
 */
export const IdentifierSpecSchema = z.object({ pattern: z.string().min(1).optional() });
export type IdentifierSpec = z.infer<typeof IdentifierSpecSchema>;

export const CHECKPOINT_KINDS = [
	'torque',
	'measure',
	'clearance',
	'confirm',
	'choice',
	'part',
	'fluid',
	'test',
	'text',
	'photo'
] as const;
export type CheckpointKind = (typeof CHECKPOINT_KINDS)[number];

const base = {
	id: z.string().regex(CHECKPOINT_ID),
	/** 1-based line of the opening fence in the source. */
	line: z.number().int().positive(),
	/** 0-based index of the step that holds it. */
	stepIndex: z.number().int().nonnegative(),
	/** What the technician is asked, shown above the entry; plain text. */
	prompt: z.string().optional(),
	/** Set when a choice makes this checkpoint necessary only for some of its options. */
	when: z.object({ choice: z.string(), options: z.array(z.string()) }).optional()
};

export const TorquePassSchema = z.object({
	/** Share of the final target, e.g. "50" for a snug-down pass. */
	percent: exactString,
	target: exactString,
	limits: LimitsJsonSchema
});

export const AngleStageSchema = z.object({
	degrees: exactString,
	/** When absent, the stage is recorded as "turned" per fastener; with limits a reading may be judged. */
	limits: LimitsJsonSchema.optional()
});

export const TorqueCheckpointSchema = z.object({
	...base,
	kind: z.literal('torque'),
	target: QuantityJsonSchema,
	tolerance: z.string(),
	/** Limits of the final (100 %) pass, in the target's unit. */
	limits: LimitsJsonSchema,
	fasteners: z.array(z.string()).min(1),
	/** Tightening order: every fastener label exactly once. */
	order: z.array(z.string()).min(1),
	passes: z.array(TorquePassSchema).min(1),
	angles: z.array(AngleStageSchema),
	/** Which kind of wrench the spec calls for; 'any' lets the tool in use decide how to record. */
	tool: z.enum(['preset', 'indicating', 'any'])
});

export const MeasureStageSchema = z.object({
	name: z.string(),
	nominal: exactString.optional(),
	tolerance: z.string(),
	toleranceClass: z.string().optional(),
	limits: LimitsJsonSchema
});

export const MeasureCheckpointSchema = z.object({
	...base,
	kind: z.literal('measure'),
	feature: z.enum(['bore', 'shaft']).optional(),
	/** Unit of the spec (the nominal's unit). */
	unit: unitId,
	/** Repair stages; the first is the standard size. */
	stages: z.array(MeasureStageSchema).min(1),
	angles: z.array(z.string()),
	depths: z.array(z.string()),
	/** One label per reading, in entry order (depth-major when angles × depths are given). */
	positions: z.array(z.string()).min(1),
	ovality: LimitsJsonSchema.optional(),
	taper: LimitsJsonSchema.optional(),
	material: z.string().optional(),
	temperature: z.enum(['off', 'optional', 'required']),
	zeroCheck: z.boolean(),
	/** Gauge resolution in `unit`. */
	resolution: exactString.optional()
});

export const ClearanceCheckpointSchema = z.object({
	...base,
	kind: z.literal('clearance'),
	/** Measure checkpoint ids: clearance = bore − shaft, paired worst-case. */
	bore: z.string().optional(),
	shaft: z.string().optional(),
	fit: z
		.object({
			text: z.string(),
			nominal: exactString,
			hole: z.string(),
			shaft: z.string(),
			holeLimits: LimitsJsonSchema,
			shaftLimits: LimitsJsonSchema
		})
		.optional(),
	limits: LimitsJsonSchema,
	resolution: exactString.optional()
});

export const ConfirmCheckpointSchema = z.object({
	...base,
	kind: z.literal('confirm'),
	prompt: z.string(),
	photo: z.enum(['off', 'optional', 'required'])
});

export const ChoiceOptionSchema = z.object({
	key: z.string(),
	label: z.string(),
	/** Checkpoint ids that become required when this option is chosen. */
	then: z.array(z.string())
});

export const ChoiceCheckpointSchema = z.object({
	...base,
	kind: z.literal('choice'),
	prompt: z.string(),
	options: z.array(ChoiceOptionSchema).min(2)
});

export const PartCheckpointSchema = z.object({
	...base,
	kind: z.literal('part'),
	/** Accepted part numbers (patterns or literals); the first is the preferred one. */
	numbers: z.array(z.string().min(1)).min(1),
	serial: IdentifierSpecSchema.optional(),
	lot: IdentifierSpecSchema.optional(),
	quantity: z.number().int().positive()
});

export const FluidCheckpointSchema = z.object({
	...base,
	kind: z.literal('fluid'),
	spec: z.string(),
	lot: IdentifierSpecSchema.optional(),
	amount: LimitsJsonSchema.optional(),
	level: z.object({ description: z.string(), temperature: LimitsJsonSchema.optional() }).optional()
});

export const TestCheckpointSchema = z.object({
	...base,
	kind: z.literal('test'),
	prompt: z.string(),
	value: LimitsJsonSchema.optional(),
	qualification: z.string().optional()
});

export const TextCheckpointSchema = z.object({
	...base,
	kind: z.literal('text'),
	prompt: z.string(),
	minLength: z.number().int().nonnegative()
});

export const PhotoCheckpointSchema = z.object({
	...base,
	kind: z.literal('photo'),
	prompt: z.string(),
	min: z.number().int().positive()
});

export const CheckpointSchema = z.discriminatedUnion('kind', [
	TorqueCheckpointSchema,
	MeasureCheckpointSchema,
	ClearanceCheckpointSchema,
	ConfirmCheckpointSchema,
	ChoiceCheckpointSchema,
	PartCheckpointSchema,
	FluidCheckpointSchema,
	TestCheckpointSchema,
	TextCheckpointSchema,
	PhotoCheckpointSchema
]);
export type Checkpoint = z.infer<typeof CheckpointSchema>;
export type TorqueCheckpoint = z.infer<typeof TorqueCheckpointSchema>;
export type MeasureCheckpoint = z.infer<typeof MeasureCheckpointSchema>;
export type ClearanceCheckpoint = z.infer<typeof ClearanceCheckpointSchema>;
export type ConfirmCheckpoint = z.infer<typeof ConfirmCheckpointSchema>;
export type ChoiceCheckpoint = z.infer<typeof ChoiceCheckpointSchema>;
export type PartCheckpoint = z.infer<typeof PartCheckpointSchema>;
export type FluidCheckpoint = z.infer<typeof FluidCheckpointSchema>;
export type TestCheckpoint = z.infer<typeof TestCheckpointSchema>;
export type TextCheckpoint = z.infer<typeof TextCheckpointSchema>;
export type PhotoCheckpoint = z.infer<typeof PhotoCheckpointSchema>;
/** The checkpoint of a given kind, e.g. `CheckpointOf<'torque'>`. */
export type CheckpointOf<K extends CheckpointKind> = Extract<Checkpoint, { kind: K }>;

export const CALLOUT_LEVELS = ['warning', 'caution', 'note'] as const;
export type CalloutLevel = (typeof CALLOUT_LEVELS)[number];

/** Content of a step (or of the introduction) in source order. */
export const BlockSchema = z.discriminatedUnion('type', [
	z.object({ type: z.literal('markdown'), markdown: z.string(), line: z.number().int().positive() }),
	z.object({
		type: z.literal('callout'),
		level: z.enum(CALLOUT_LEVELS),
		markdown: z.string(),
		line: z.number().int().positive()
	}),
	z.object({ type: z.literal('checkpoint'), id: z.string() })
]);
export type Block = z.infer<typeof BlockSchema>;

export const StepSchema = z.object({
	index: z.number().int().nonnegative(),
	title: z.string(),
	line: z.number().int().positive(),
	/** A second person verifies this step. */
	critical: z.boolean(),
	minutes: z.number().positive().optional(),
	tools: z.array(z.string()),
	qualification: z.string().optional(),
	blocks: z.array(BlockSchema),
	checkpoints: z.array(CheckpointSchema)
});
export type Step = z.infer<typeof StepSchema>;

export const ProcedureMetaSchema = z.object({
	title: z.string().min(1),
	family: z.string().min(1),
	purpose: z.string().min(1),
	id: z.string().optional(),
	revision: z.string().optional(),
	/** Where the specifications come from, e.g. "invented for the demo — not service data". */
	specs: z.string().optional()
});
export type ProcedureMeta = z.infer<typeof ProcedureMetaSchema>;

export const ProcedureSchema = z.object({
	engine: z.string(),
	/** Content hash of the normalised source (see `contentHash`). */
	hash: z.string().regex(/^[0-9a-f]{64}$/),
	meta: ProcedureMetaSchema,
	intro: z.array(BlockSchema),
	steps: z.array(StepSchema)
});
export type Procedure = z.infer<typeof ProcedureSchema>;

/** A parse problem. Lines and columns are 1-based; stepIndex is 0-based (messages say "Step n" 1-based). */
export interface Problem {
	line: number;
	column: number;
	message: string;
	stepIndex?: number;
	checkpointId?: string;
}

/** What `parse` returns; `procedure` is null whenever there is at least one error. */
export interface ParseResult {
	procedure: Procedure | null;
	errors: Problem[];
	warnings: Problem[];
}
