import { error } from '@sveltejs/kit';
import QRCode from 'qrcode';
import { z } from 'zod';
import { REGISTER_ROLES } from '$lib/registers/access';
import { requireRole } from '$lib/server/access';
import * as jobService from '$lib/server/services/jobs.service';

/** A printable job card; its QR code opens the job's page (on a shop tablet), drawn here as a PNG data URL. */
export const load = async (event) => {
	requireRole(event, ...REGISTER_ROLES.readJobs);
	const id = z.uuid().safeParse(event.params.id);
	const detail = id.success ? await jobService.jobDetail(event.locals.em, id.data) : undefined;
	if (!detail) error(404, 'No such job.');
	const url = `${event.url.origin}/jobs/${detail.job.id}`;
	const qr = await QRCode.toDataURL(url, { errorCorrectionLevel: 'M', margin: 4, width: 320 });
	return { job: detail.job, url, qr };
};
