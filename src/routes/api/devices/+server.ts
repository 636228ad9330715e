import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { DEVICE_LIST_ROLES, list } from '$lib/server/services/devices.service';

/** `GET /api/devices` → `{ devices: DeviceView[] }`: enrolled tablets, active first (leads, quality, admins). */
export const GET = async (event) => {
	requireRole(event, ...DEVICE_LIST_ROLES);
	return json({ devices: await list(event.locals.em) }, { headers: { 'cache-control': 'no-store' } });
};
