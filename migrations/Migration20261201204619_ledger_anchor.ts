import { Migration } from '@mikro-orm/migrations';

export class Migration20261201204619_ledger_anchor extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create table "ledger_anchor" ("id" uuid not null, "run_id" uuid null, "head" varchar(64) not null, "count" int not null, "recorded_at" timestamptz not null, "recorded_in" text check ("recorded_in" in ('release_pdf', 'daily_digest', 'manual')) not null, constraint "ledger_anchor_pkey" primary key ("id"));`
		);
		this.addSql(`create index "ledger_anchor_run_id_index" on "ledger_anchor" ("run_id");`);

		this.addSql(
			`alter table "ledger_anchor" add constraint "ledger_anchor_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade on delete set null;`
		);
	}

	override async down(): Promise<void> {
		this.addSql(`drop table if exists "ledger_anchor" cascade;`);
	}
}
