import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { HELD_ROLES, listHeld } from '$lib/server/services/devices-held';

const query = z.object({ open: z.enum(['1', '0']).optional(), run: z.uuid().optional() });

/** `GET /api/audit/held[?open=1][&run=<id>]` → `{ held: HeldView[] }`, newest first (quality leads). */
export const GET = async (event) => {
	requireRole(event, ...HELD_ROLES);
	const q = query.safeParse(Object.fromEntries(event.url.searchParams));
	if (!q.success) return json({ message: 'open is 1 or 0; run is a run id.' }, { status: 400 });
	const held = await listHeld(event.locals.em, { open: q.data.open === '1', runId: q.data.run });
	return json({ held }, { headers: { 'cache-control': 'no-store' } });
};
