import { requireUser } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { respond, versionNumber } from '../../../respond';

/** One published version with its source and parsed model (every signed-in role). */
export const GET = async (event) => {
	requireUser(event);
	return respond(await svc.getVersion(event.locals.em, event.params.id, versionNumber(event.params.number)));
};
