import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { runRecord } from '$lib/server/services/audit.service';
import { photosOnTheirWay } from '$lib/server/services/tablet-photos.service';
import { customerRecordForm, sendRecordAction } from './customer-record.server';
import { releaseJobAction, releaseLoad, releaseRunAction } from './release.server';

/** The run record: every ledger record of the run in chain order, for audit and print. */
export const load = async (event) => {
	requireRole(event, 'quality');
	const id = z.uuid().safeParse(event.params.id);
	const record = id.success ? await runRecord(event.locals.em, id.data) : null;
	if (!record) error(404, 'No such run.');
	return {
		record,
		photosOnTheirWay: await photosOnTheirWay(event.locals.em, [record.id]),
		customerForm: await customerRecordForm(),
		...(await releaseLoad(event, record.id))
	};
};

export const actions = {
	sendRecord: sendRecordAction,
	releaseRun: releaseRunAction,
	releaseJob: releaseJobAction
};
