import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { diffQuerySchema } from '$lib/server/services/procedures.schema';

/** Diff between any two versions (or a version and the draft): lead, quality, admin. */
export const load = async (event) => {
	const user = requireRole(event, ...svc.DRAFT_READ_ROLES);
	const r = await svc.get(event.locals.em, user, event.params.id);
	if (!r.ok) error(r.status, r.message);
	const numbers = r.value.versions.map((v) => v.number);
	const last = numbers.at(-1);
	const q = diffQuerySchema.safeParse({
		from: event.url.searchParams.get('from') ?? (last && last > 1 ? last - 1 : (last ?? 'draft')),
		to: event.url.searchParams.get('to') ?? (r.value.draft ? 'draft' : (last ?? 'draft'))
	});
	if (!q.success) error(400, 'Choose two versions to compare.');
	const d = await svc.diff(event.locals.em, user, r.value.id, q.data.from, q.data.to);
	return {
		procedure: { id: r.value.id, title: r.value.title },
		choices: [...numbers.map(String), ...(r.value.draft ? ['draft'] : [])],
		from: String(q.data.from),
		to: String(q.data.to),
		diff: d.ok ? d.value : null,
		problem: d.ok ? null : d.message
	};
};
