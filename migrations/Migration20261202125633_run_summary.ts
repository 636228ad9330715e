import { Migration } from '@mikro-orm/migrations';

export class Migration20261202125633_run_summary extends Migration {
	override async up(): Promise<void> {
		// Replaced by run_signer_day's primary key for "runs a person signed on these days"; one index fewer per append.
		this.addSql(`drop index "ledger_record_signer_time_run_index";`);
		this.addSql(
			`create table "run_summary" ("run_id" uuid not null, "first_at" timestamptz not null, "last_at" timestamptz not null, "finding_count" int not null, constraint "run_summary_pkey" primary key ("run_id"));`
		);
		this.addSql(`create index "run_summary_last_at_index" on "run_summary" ("last_at");`);

		this.addSql(
			`create table "run_signer_day" ("signer_id" uuid not null, "day" date not null, "run_id" uuid not null, constraint "run_signer_day_pkey" primary key ("signer_id", "day", "run_id"));`
		);

		this.addSql(
			`alter table "run_summary" add constraint "run_summary_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade on delete cascade;`
		);

		this.addSql(
			`alter table "run_signer_day" add constraint "run_signer_day_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade;`
		);
	}

	override async down(): Promise<void> {
		this.addSql(
			`create index "ledger_record_signer_time_run_index" on "ledger_record" ("signer_id", "server_time") include ("run_id");`
		);
		this.addSql(`drop table if exists "run_summary" cascade;`);

		this.addSql(`drop table if exists "run_signer_day" cascade;`);
	}
}
