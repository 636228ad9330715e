import { Migration } from '@mikro-orm/migrations';

export class Migration20261201195122_user_sessions extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create table "user_session" ("id" uuid not null, "user_id" uuid not null, "created_at" timestamptz not null, "expires_at" timestamptz not null, "revoked_at" timestamptz null, "user_agent" varchar(300) null, "address" varchar(64) null, constraint "user_session_pkey" primary key ("id"));`
		);
		this.addSql(`create index "user_session_user_id_index" on "user_session" ("user_id");`);
	}

	override async down(): Promise<void> {
		this.addSql(`drop table if exists "user_session" cascade;`);
	}
}
