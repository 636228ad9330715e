import { Migration } from '@mikro-orm/migrations';

export class Migration20261201191626 extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create table "admin_log" ("id" bigserial primary key, "at" timestamptz not null default now(), "actor_id" uuid null, "actor_name" varchar(120) null, "action" varchar(64) not null, "subject_type" varchar(32) not null, "subject_id" varchar(64) not null, "detail" jsonb not null default '{}');`
		);

		this.addSql(
			`create table "rate_limit" ("key" varchar(255) not null, "points" int not null default 0, "expire" bigint null, constraint "rate_limit_pkey" primary key ("key"));`
		);

		this.addSql(
			`create table "app_user" ("id" uuid not null, "email" varchar(320) not null, "name" varchar(120) not null, "roles" text[] not null, "password_hash" text null, "pin_hash" text null, "active" boolean not null default true, "session_version" int not null default 1, "pin_changed_at" timestamptz null, "created_at" timestamptz not null, "updated_at" timestamptz not null, constraint "app_user_pkey" primary key ("id"));`
		);
		this.addSql(`alter table "app_user" add constraint "app_user_email_unique" unique ("email");`);

		this.addSql(
			`create table "one_time_token" ("id" uuid not null, "user_id" uuid not null, "purpose" text check ("purpose" in ('invite', 'password_reset', 'pin_reset')) not null, "token_hash" varchar(64) not null, "expires_at" timestamptz not null, "used_at" timestamptz null, "created_at" timestamptz not null, constraint "one_time_token_pkey" primary key ("id"));`
		);
		this.addSql(
			`alter table "one_time_token" add constraint "one_time_token_token_hash_unique" unique ("token_hash");`
		);

		this.addSql(
			`alter table "one_time_token" add constraint "one_time_token_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade on delete cascade;`
		);
	}
}
