import { Migration } from '@mikro-orm/migrations';

export class Migration20261201201958_runs_and_ledger extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create table "pin_lock" ("user_id" uuid not null, "device_id" varchar(64) not null, "failures" int not null default 0, "locked_until" timestamptz null, "lockouts" int not null default 0, "last_failure_at" timestamptz null, "updated_at" timestamptz not null, constraint "pin_lock_pkey" primary key ("user_id", "device_id"));`
		);

		this.addSql(
			`create table "run" ("id" uuid not null, "job_id" uuid not null, "procedure_version_id" uuid not null, "content_hash" varchar(64) not null, "assigned_to_id" uuid not null, "started_by_id" uuid not null, "state" text check ("state" in ('in_progress', 'paused', 'awaiting_review')) not null, "head_hash" varchar(64) null, "record_count" int not null default 0, "created_at" timestamptz not null, "updated_at" timestamptz not null, constraint "run_pkey" primary key ("id"));`
		);
		this.addSql(`create index "run_job_id_index" on "run" ("job_id");`);
		this.addSql(`create index "run_procedure_version_id_index" on "run" ("procedure_version_id");`);
		this.addSql(`create index "run_assigned_to_id_index" on "run" ("assigned_to_id");`);

		this.addSql(
			`create table "ledger_record" ("id" uuid not null, "run_id" uuid not null, "seq" int not null, "kind" varchar(32) not null, "body" jsonb not null, "prev_hash" varchar(64) null, "hash" varchar(64) not null, "submission_hash" varchar(64) not null, "signer_id" uuid null, "signer_role" varchar(16) not null, "device_id" varchar(64) null, "device_time" timestamptz null, "server_time" timestamptz not null, "engine_version" varchar(64) not null, "signed_offline" boolean not null default false, constraint "ledger_record_pkey" primary key ("id"));`
		);
		this.addSql(`alter table "ledger_record" add constraint "ledger_record_hash_unique" unique ("hash");`);
		this.addSql(`create index "ledger_record_signer_id_index" on "ledger_record" ("signer_id");`);
		this.addSql(`alter table "ledger_record" add constraint "ledger_record_run_seq_unique" unique ("run_id", "seq");`);
		this.addSql(
			`alter table "ledger_record" add constraint "ledger_record_run_prev_hash_unique" unique ("run_id", "prev_hash");`
		);

		this.addSql(
			`alter table "run" add constraint "run_job_id_foreign" foreign key ("job_id") references "job" ("id") on update cascade;`
		);
		this.addSql(
			`alter table "run" add constraint "run_procedure_version_id_foreign" foreign key ("procedure_version_id") references "procedure_version" ("id") on update cascade;`
		);
		this.addSql(
			`alter table "run" add constraint "run_assigned_to_id_foreign" foreign key ("assigned_to_id") references "app_user" ("id") on update cascade;`
		);
		this.addSql(
			`alter table "run" add constraint "run_started_by_id_foreign" foreign key ("started_by_id") references "app_user" ("id") on update cascade;`
		);

		this.addSql(
			`alter table "ledger_record" add constraint "ledger_record_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade;`
		);
	}

	override async down(): Promise<void> {
		this.addSql(`alter table "ledger_record" drop constraint "ledger_record_run_id_foreign";`);

		this.addSql(`drop table if exists "pin_lock" cascade;`);

		this.addSql(`drop table if exists "run" cascade;`);

		this.addSql(`drop table if exists "ledger_record" cascade;`);
	}
}
