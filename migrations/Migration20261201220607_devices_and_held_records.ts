import { Migration } from '@mikro-orm/migrations';

export class Migration20261201220607_devices_and_held_records extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create table "device" ("id" uuid not null, "label" varchar(80) not null, "public_key" jsonb not null, "key_thumbprint" varchar(64) not null, "enrolled_at" timestamptz not null, "enrolled_by_id" uuid not null, "enrolled_by_name" varchar(120) not null, "revoked_at" timestamptz null, "revoked_by_id" uuid null, "revoked_by_name" varchar(120) null, "revoke_reason" varchar(500) null, constraint "device_pkey" primary key ("id"));`
		);
		this.addSql(`alter table "device" add constraint "device_key_thumbprint_unique" unique ("key_thumbprint");`);

		this.addSql(
			`create table "held_record" ("id" uuid not null, "record_id" varchar(64) not null, "run_id" uuid null, "device_id" varchar(64) null, "signer_id" uuid null, "submission" jsonb not null, "submission_hash" varchar(64) not null, "reason" text check ("reason" in ('device_revoked', 'bad_signature', 'unknown_device', 'after_release', 'other')) not null, "message" varchar(1000) not null, "sent_by_id" uuid null, "sent_by_name" varchar(120) null, "held_at" timestamptz not null default now(), constraint "held_record_pkey" primary key ("id"));`
		);
		this.addSql(`create index "held_record_record_id_index" on "held_record" ("record_id");`);
		this.addSql(`create index "held_record_run_id_index" on "held_record" ("run_id");`);
		this.addSql(
			`alter table "held_record" add constraint "held_record_record_id_submission_hash_unique" unique ("record_id", "submission_hash");`
		);

		this.addSql(
			`create table "held_record_resolution" ("id" uuid not null, "held_record_id" uuid not null, "outcome" text check ("outcome" in ('dismissed', 'dealt_with')) not null, "note" varchar(1000) not null, "resolved_by_id" uuid not null, "resolved_by_name" varchar(120) not null, "resolved_at" timestamptz not null default now(), constraint "held_record_resolution_pkey" primary key ("id"));`
		);
		this.addSql(
			`alter table "held_record_resolution" add constraint "held_record_resolution_held_record_id_unique" unique ("held_record_id");`
		);

		this.addSql(
			`alter table "held_record" add constraint "held_record_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade on delete set null;`
		);

		this.addSql(
			`alter table "held_record_resolution" add constraint "held_record_resolution_held_record_id_foreign" foreign key ("held_record_id") references "held_record" ("id") on update cascade;`
		);
	}

	override async down(): Promise<void> {
		this.addSql(
			`alter table "held_record_resolution" drop constraint "held_record_resolution_held_record_id_foreign";`
		);

		this.addSql(`drop table if exists "device" cascade;`);

		this.addSql(`drop table if exists "held_record" cascade;`);

		this.addSql(`drop table if exists "held_record_resolution" cascade;`);
	}
}
