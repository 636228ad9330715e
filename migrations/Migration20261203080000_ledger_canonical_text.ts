import { Migration } from '@mikro-orm/migrations';
import { canonicalRecord, type LedgerRecord } from '../src/lib/ledger/record';

// Hand-written: each ledger record keeps the exact RFC 8785 text its hash is over (`canonical`), and `body` becomes a
// column PostgreSQL generates from that text, so what the app shows and what the hash proves cannot differ and verify
// hashes the stored bytes instead of decoding and re-encoding every body. Existing records get their text from the
// envelope as it is stored now (the same `canonicalRecord` that hashed them at signing: a record altered before this
// migration stays altered and verify still reports it). The append-only trigger is held off only while that text is
// written. Never edit after it lands.
const PAGE = 2_000;

interface OldRow {
	id: string;
	run_id: string;
	seq: number;
	kind: LedgerRecord['kind'];
	body: LedgerRecord['body'];
	prev_hash: string | null;
}

export class Migration20261203080000_ledger_canonical_text extends Migration {
	override async up(): Promise<void> {
		await this.execute(`alter table "ledger_record" add column "canonical" text null;`);
		await this.execute(`alter table "ledger_record" disable trigger "ledger_record_append_only";`);
		// Pages by primary key (keyset): a `where canonical is null` page would scan the whole table every time.
		let after = '00000000-0000-0000-0000-000000000000';
		for (;;) {
			const rows = (await this.execute(
				`select "id", "run_id", "seq", "kind", "body", "prev_hash" from "ledger_record" where "id" > ? order by "id" limit ${PAGE}`,
				[after]
			)) as unknown as OldRow[];
			if (rows.length === 0) break;
			after = rows[rows.length - 1].id;
			const texts = rows.map((r) => ({
				id: r.id,
				canonical: canonicalRecord({
					id: r.id,
					runId: r.run_id,
					seq: r.seq,
					kind: r.kind,
					body: r.body,
					prevHash: r.prev_hash
				})
			}));
			await this.execute(
				`update "ledger_record" as l set "canonical" = v."canonical" from jsonb_to_recordset(?::jsonb) as v("id" uuid, "canonical" text) where l."id" = v."id"`,
				[JSON.stringify(texts)]
			);
		}
		await this.execute(`alter table "ledger_record" enable trigger "ledger_record_append_only";`);
		await this.execute(`alter table "ledger_record" alter column "canonical" set not null;`);
		await this.execute(`drop index "ledger_record_body_path_index";`);
		await this.execute(`alter table "ledger_record" drop column "body";`);
		await this.execute(
			`alter table "ledger_record" add column "body" jsonb generated always as (("canonical"::jsonb) -> 'body') stored;`
		);
		await this.execute(
			`create index "ledger_record_body_path_index" on "ledger_record" using gin ("body" jsonb_path_ops);`
		);
	}

	override async down(): Promise<void> {
		await this.execute(`drop index "ledger_record_body_path_index";`);
		await this.execute(`alter table "ledger_record" rename column "body" to "body_generated";`);
		await this.execute(`alter table "ledger_record" add column "body" jsonb null;`);
		await this.execute(`alter table "ledger_record" disable trigger "ledger_record_append_only";`);
		await this.execute(`update "ledger_record" set "body" = "body_generated";`);
		await this.execute(`alter table "ledger_record" enable trigger "ledger_record_append_only";`);
		await this.execute(`alter table "ledger_record" alter column "body" set not null;`);
		await this.execute(`alter table "ledger_record" drop column "body_generated";`);
		await this.execute(`alter table "ledger_record" drop column "canonical";`);
		await this.execute(
			`create index "ledger_record_body_path_index" on "ledger_record" using gin ("body" jsonb_path_ops);`
		);
	}
}
