import { z } from 'zod';
import { isoDate, isRealDate } from './dates';
import { JOB_STATES } from './job-states';
import { PART_CATEGORIES, PART_UNITS } from './parts';
import { CALIBRATION_KINDS, TOLERANCE_RESULTS, TOOL_KINDS, TOOL_UNITS, UNITS_FOR_KIND } from './tool-kinds';

/** Form schemas of the registers, shared by the browser (instant messages) and the server (the authority). */

const decimal = (what: string) =>
	z
		.string()
		.trim()
		.regex(/^-?\d{1,9}(\.\d{1,6})?$/, `Enter the ${what} as a number with a decimal point, e.g. 12.5.`);
const date = (what: string) => z.string().trim().refine(isRealDate, `Enter the ${what} as a date (YYYY-MM-DD).`);
const optionalDate = (what: string) =>
	z
		.string()
		.trim()
		.refine((v) => v === '' || isRealDate(v), `Enter the ${what} as a date (YYYY-MM-DD), or leave it empty.`);
const notInFuture = (v: string) => v <= isoDate();

export const toolSchema = z
	.object({
		assetTag: z
			.string()
			.trim()
			.toUpperCase()
			.regex(/^[A-Z0-9][A-Z0-9-]{1,39}$/, 'Use 2–40 letters, digits and dashes, e.g. TW-014.'),
		kind: z.enum(TOOL_KINDS, 'Choose the kind of tool.'),
		description: z.string().trim().min(2, 'Describe the tool, e.g. “Click wrench 2–12 N·m, 1/4 in drive”.').max(200),
		rangeMin: decimal('lowest value of the range'),
		rangeMax: decimal('highest value of the range'),
		unit: z.enum(TOOL_UNITS, 'Choose the unit of the range.'),
		resolution: decimal('resolution'),
		accuracyPct: decimal('accuracy in percent')
	})
	.refine((v) => Number(v.rangeMax) > Number(v.rangeMin), {
		path: ['rangeMax'],
		message: 'The highest value must be above the lowest.'
	})
	.refine((v) => !v.kind || UNITS_FOR_KIND[v.kind].includes(v.unit), {
		path: ['unit'],
		message: 'This unit does not fit this kind of tool.'
	})
	.refine((v) => Number(v.resolution) > 0, { path: ['resolution'], message: 'The resolution must be above 0.' })
	.refine((v) => Number(v.accuracyPct) > 0 && Number(v.accuracyPct) <= 100, {
		path: ['accuracyPct'],
		message: 'Accuracy is a percentage above 0 and at most 100.'
	});
export type ToolInput = z.infer<typeof toolSchema>;

export const calibrationSchema = z
	.object({
		kind: z.enum(CALIBRATION_KINDS, 'Choose a calibration or an in-house check.'),
		performedOn: date('date of the calibration').refine(notInFuture, 'The calibration cannot be dated in the future.'),
		certificateNo: z.string().trim().max(80).default(''),
		asFound: z.enum(TOLERANCE_RESULTS, 'Choose whether it was found in or out of tolerance.'),
		asLeft: z.enum([...TOLERANCE_RESULTS, '']).default(''),
		nextDueOn: optionalDate('next due date'),
		notes: z.string().trim().max(2000).default('')
	})
	.superRefine((v, ctx) => {
		if (v.kind !== 'calibration') return;
		if (!v.certificateNo)
			ctx.addIssue({ code: 'custom', path: ['certificateNo'], message: 'Enter the certificate number.' });
		if (!v.asLeft) ctx.addIssue({ code: 'custom', path: ['asLeft'], message: 'Choose how the tool was left.' });
		if (!v.nextDueOn) ctx.addIssue({ code: 'custom', path: ['nextDueOn'], message: 'Enter the next due date.' });
		else if (isRealDate(v.performedOn) && v.nextDueOn <= v.performedOn)
			ctx.addIssue({
				code: 'custom',
				path: ['nextDueOn'],
				message: 'The next due date must come after the calibration date.'
			});
	});
export type CalibrationInput = z.infer<typeof calibrationSchema>;

export const qualificationSchema = z
	.object({
		userId: z.uuid('Choose the person.'),
		family: z
			.string()
			.trim()
			.min(2, 'Enter the procedure family or qualification, e.g. “valve-body rebuild”.')
			.max(160),
		trainedBy: z.string().trim().min(2, 'Enter who trained them.').max(120),
		trainedOn: date('training date').refine(notInFuture, 'The training date cannot be in the future.'),
		expiresOn: optionalDate('expiry date'),
		notes: z.string().trim().max(2000).default('')
	})
	.refine((v) => !v.expiresOn || !isRealDate(v.trainedOn) || v.expiresOn > v.trainedOn, {
		path: ['expiresOn'],
		message: 'The expiry must come after the training date.'
	});
export type QualificationInput = z.infer<typeof qualificationSchema>;

export const partSchema = z.object({
	partNumber: z
		.string()
		.trim()
		.toUpperCase()
		.regex(/^[A-Z0-9][A-Z0-9.-]{1,39}$/, 'Use 2–40 letters, digits, dots and dashes, e.g. KL-FLT-7100.'),
	description: z.string().trim().min(2, 'Describe the part.').max(200),
	category: z.enum(PART_CATEGORIES, 'Choose a category.'),
	unit: z.enum(PART_UNITS, 'Choose the unit: pieces or litres.')
});
export type PartInput = z.infer<typeof partSchema>;

export const lotSchema = z.object({
	lotNumber: z
		.string()
		.trim()
		.min(1, 'Enter the lot or serial number.')
		.max(60)
		.regex(/^[\w./-]+$/, 'Use letters, digits, dots, slashes and dashes.'),
	serialised: z.boolean().default(false),
	quantity: decimal('quantity').refine((v) => Number(v) > 0, 'The quantity must be above 0.'),
	receivedOn: date('date received').refine(notInFuture, 'The date received cannot be in the future.'),
	supplier: z.string().trim().max(120).default('')
});
export type LotInput = z.infer<typeof lotSchema>;

/** Fault codes as read at intake: letters, digits and dashes, separated by commas, spaces or new lines. */
export const parseFaultCodes = (text: string) =>
	[...new Set(text.split(/[\s,;]+/).map((c) => c.trim().toUpperCase()))].filter(Boolean);

export const jobSchema = z.object({
	customerName: z.string().trim().min(2, 'Enter the customer’s name.').max(120),
	customerEmail: z
		.string()
		.trim()
		.toLowerCase()
		.max(320)
		.refine(
			(v) => v === '' || z.email().safeParse(v).success,
			'Enter an e-mail address such as name@example.com, or leave it empty.'
		)
		.default(''),
	customerPhone: z
		.string()
		.trim()
		.max(40)
		.regex(/^[+()\d\s./-]*$/, 'Use digits, spaces and + ( ) - / . only.')
		.default(''),
	unitModel: z.string().trim().min(2, 'Enter the unit or vehicle model.').max(120),
	unitSerial: z
		.string()
		.trim()
		.min(3, 'Enter the unit’s serial number.')
		.max(60)
		.regex(/^[\w\s./-]+$/, 'Use letters, digits, spaces, dots, slashes and dashes.'),
	mileage: z
		.string()
		.trim()
		.regex(/^\d{0,7}$/, 'Enter the mileage as a whole number, or leave it empty.')
		.default(''),
	complaint: z.string().trim().min(3, 'Describe what the customer reports.').max(4000),
	faultCodes: z
		.string()
		.max(2000)
		.refine(
			(v) => parseFaultCodes(v).every((c) => /^[A-Z0-9-]{2,12}$/.test(c)),
			'Each fault code is 2–12 letters, digits or dashes, e.g. P17BF; separate them with commas.'
		)
		.default(''),
	receivedOn: date('date received').refine(notInFuture, 'The date received cannot be in the future.'),
	intakeNotes: z.string().trim().max(4000).default('')
});
export type JobInput = z.infer<typeof jobSchema>;

export const stateChangeSchema = z.object({
	to: z.enum(JOB_STATES, 'Choose the new state.'),
	reason: z.string().trim().min(3, 'Say why, in a few words.').max(1000)
});
export type StateChangeInput = z.infer<typeof stateChangeSchema>;

/** Query of the jobs table (GET /api/jobs). */
export const jobsQuerySchema = z.object({
	q: z.string().trim().max(100).default(''),
	state: z.union([z.enum(JOB_STATES), z.literal('open'), z.literal('')]).default(''),
	comebacks: z.enum(['', '1']).default(''),
	limit: z.coerce.number().int().min(1).max(200).default(50),
	offset: z.coerce.number().int().min(0).default(0)
});
export type JobsQuery = z.infer<typeof jobsQuerySchema>;
