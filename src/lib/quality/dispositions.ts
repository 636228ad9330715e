import { z } from 'zod';

/** What a quality lead may decide about a finding (issue 8). */
export const DECISIONS = ['rework', 'replace', 'use_as_is', 'scrap'] as const;
export type Decision = (typeof DECISIONS)[number];

export const DECISION_LABELS: Record<Decision, string> = {
	rework: 'Rework the affected steps',
	replace: 'Replace the part',
	use_as_is: 'Use as is',
	scrap: 'Scrap the unit'
};

/** Shortest justification accepted for "use as is": a sentence, not a shrug. */
export const MIN_JUSTIFICATION = 20;

/**
 * A disposition, from the finding page's form and from `POST /api/findings/:id/disposition`. `steps` are step
 * numbers as people see them (1-based); a rework names at least one and the technician who will do it.
 */
export const dispositionSchema = z
	.object({
		decision: z.enum(DECISIONS, { error: 'Choose what happens to the unit.' }),
		justification: z.string().trim().max(4000, 'Keep the justification under 4000 characters.').default(''),
		steps: z.array(z.int().min(1, 'Step numbers start at 1.')).max(500).default([]),
		assignedToId: z.union([z.uuid(), z.literal('')]).default(''),
		pin: z.string().regex(/^\d{6,8}$/, 'Your PIN is 6 to 8 digits.')
	})
	.superRefine((v, ctx) => {
		if (v.decision === 'use_as_is' && v.justification.length < MIN_JUSTIFICATION)
			ctx.addIssue({
				code: 'custom',
				path: ['justification'],
				message: `Write why the unit may be used as it is (at least ${MIN_JUSTIFICATION} characters): it goes on the record.`
			});
		if (v.decision === 'rework' && v.steps.length === 0)
			ctx.addIssue({ code: 'custom', path: ['steps'], message: 'Choose the steps to work again.' });
		if (v.decision === 'rework' && !v.assignedToId)
			ctx.addIssue({ code: 'custom', path: ['assignedToId'], message: 'Choose who does the rework.' });
	});
export type DispositionInput = z.infer<typeof dispositionSchema>;

/** `GET /api/findings?status=open|all`. */
export const findingsQuerySchema = z.object({
	status: z.enum(['open', 'all'], { error: 'status is open or all.' }).default('open')
});
