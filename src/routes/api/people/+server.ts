import { json } from '@sveltejs/kit';
import { REGISTER_ROLES } from '$lib/registers/access';
import { isoDate } from '$lib/registers/dates';
import { requireRole } from '$lib/server/access';
import * as qualifications from '$lib/server/repositories/qualifications';

/** Active people with their training records (and whether each is in force today). */
export const GET = async (event) => {
	requireRole(event, ...REGISTER_ROLES.readTraining);
	const em = event.locals.em;
	const today = isoDate();
	const records = (await qualifications.listAll(em)).map(qualifications.toRecord);
	const people = (await qualifications.listPeople(em)).filter((p) => p.active);
	return json({
		people: people.map((p) => ({
			id: p.id,
			name: p.name,
			roles: p.roles,
			qualifications: records
				.filter((r) => r.userId === p.id)
				.map(({ userId: _u, userName: _n, ...r }) => ({ ...r, inForce: qualifications.inForce(r, today) }))
		}))
	});
};
