import { requireUser } from '$lib/server/access';
import * as svc from '$lib/server/services/procedures.service';
import { respond, versionNumber } from '../../../../respond';

/** Export: the version's Markdown source as a `.md` download. */
export const GET = async (event) => {
	requireUser(event);
	const r = await svc.getVersion(event.locals.em, event.params.id, versionNumber(event.params.number));
	if (!r.ok) return respond(r);
	return new Response(r.value.source, {
		headers: {
			'content-type': 'text/markdown; charset=utf-8',
			'content-disposition': `attachment; filename="${r.value.slug}-v${r.value.number}.md"`,
			'x-content-hash': r.value.contentHash,
			'cache-control': 'no-store'
		}
	});
};
