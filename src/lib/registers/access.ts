import type { RoleName } from '../accounts/schema';

/** Who may do what in the registers (issue 5). The server checks these in every load, action and JSON route. */
export const REGISTER_ROLES = {
	/** Read work orders and the tool register. */
	readJobs: ['technician', 'lead', 'quality', 'admin'],
	readTools: ['technician', 'lead', 'quality', 'admin'],
	/** Read parts, lots and training records. */
	readParts: ['technician', 'lead', 'quality', 'admin'],
	readPartsPages: ['lead', 'quality', 'admin'],
	readTraining: ['lead', 'quality', 'admin'],
	/** Create jobs; edit tools, calibrations, parts, lots and training records. */
	edit: ['lead', 'admin'],
	/** Move a job between states (release itself is quality's or admin's: see RELEASE_ROLES). */
	changeState: ['lead', 'quality', 'admin']
} as const satisfies Record<string, readonly RoleName[]>;
