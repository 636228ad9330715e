import { z } from 'zod';
import { approveSchema } from '$lib/server/services/procedures.schema';

export { approveSchema };
export const retireFormSchema = z.object({
	number: z.coerce.number().int().positive('Choose the version to retire.'),
	reason: z.string().trim().max(500, 'Keep the reason under 500 characters.').default('')
});
