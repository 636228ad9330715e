/**
 * Photos a tablet declared in a record (`body.tabletPhotos = [{ id, sha256 }]`) before it could upload them: who
 * declared which photo in which run, and which of them are not stored yet. Read through the GIN `jsonb_path_ops`
 * index on `ledger_record.body` (containment, bound parameters only).
 */
import type { EntityManager } from '@mikro-orm/postgresql';

/** One record's declaration of a photo. */
export interface Declaration {
	recordId: string;
	seq: number;
	kind: string;
	signerId: string | null;
	sha256: string;
}

/** The records of `runId` that declare `photoId`, in chain order. */
export async function declarationsOf(em: EntityManager, runId: string, photoId: string): Promise<Declaration[]> {
	const rows = await em
		.getConnection()
		.execute<{ id: string; seq: number; kind: string; signer_id: string | null; sha256: string | null }[]>(
			`select l."id", l."seq", l."kind", l."signer_id", t."sha256"
		from "ledger_record" l
		cross join lateral jsonb_to_recordset(l."body"->'tabletPhotos') as t("id" text, "sha256" text)
		where l."run_id" = ? and l."body" @> ?::jsonb and t."id" = ?
		order by l."seq"`,
			[runId, JSON.stringify({ tabletPhotos: [{ id: photoId }] }), photoId]
		);
	return rows.map((r) => ({
		recordId: r.id,
		seq: r.seq,
		kind: r.kind,
		signerId: r.signer_id,
		sha256: r.sha256 ?? ''
	}));
}

/** A declared photo no stored image has yet. */
export interface PendingPhoto {
	runId: string;
	photoId: string;
	recordId: string;
	seq: number;
	kind: string;
	signerName: string | null;
}

/** Photos declared by records of these runs and not stored yet, in run then chain order. */
export async function pendingForRuns(em: EntityManager, runIds: readonly string[]): Promise<PendingPhoto[]> {
	if (runIds.length === 0) return [];
	const rows = await em
		.getConnection()
		.execute<{ run_id: string; photo_id: string; id: string; seq: number; kind: string; name: string | null }[]>(
			`select l."run_id", t."id" as "photo_id", l."id", l."seq", l."kind", u."name"
		from "ledger_record" l
		cross join lateral jsonb_to_recordset(l."body"->'tabletPhotos') as t("id" text, "sha256" text)
		left join "app_user" u on u."id" = l."signer_id"
		where l."run_id" in (${runIds.map(() => '?').join(', ')}) and l."body" @> '{"tabletPhotos":[]}'::jsonb
			and not exists (select 1 from "stored_image" i where i."id"::text = t."id")
		order by l."run_id", l."seq", t."id"`,
			[...runIds]
		);
	return rows.map((r) => ({
		runId: r.run_id,
		photoId: r.photo_id,
		recordId: r.id,
		seq: r.seq,
		kind: r.kind,
		signerName: r.name
	}));
}
