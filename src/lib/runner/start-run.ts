import { z } from 'zod';

/** The job page's "start a run" form: the job comes from the page, the rest as `POST /api/runs` takes it. */
export const startRunFormSchema = z.object({
	procedureVersionId: z.uuid({ error: 'Choose a published procedure version.' }),
	contentHash: z.string().regex(/^[0-9a-f]{64}$/, 'Choose a published procedure version.'),
	assignedToId: z.uuid({ error: 'Choose the technician who will do the work.' })
});
export type StartRunFormInput = z.infer<typeof startRunFormSchema>;
