import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';

/** The editor (lead, admin). With no open draft it starts from the latest version; the first save opens the draft. */
export const load = async (event) => {
	const user = requireRole(event, ...svc.EDIT_ROLES);
	const r = await svc.get(event.locals.em, user, event.params.id);
	if (!r.ok) error(r.status, r.message);
	const latest = r.value.versions.at(-1);
	const base = !r.value.draft && latest ? await svc.getVersion(event.locals.em, r.value.id, latest.number) : null;
	return {
		id: r.value.id,
		title: r.value.title,
		source: r.value.draft?.source ?? (base?.ok ? base.value.source : ''),
		updatedAt: r.value.draft?.updatedAt ?? null,
		submitted: !!r.value.draft?.submittedAt,
		basedOn: r.value.draft ? null : (latest?.number ?? null)
	};
};
