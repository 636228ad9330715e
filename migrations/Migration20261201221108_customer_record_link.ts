import { Migration } from '@mikro-orm/migrations';

export class Migration20261201221108_customer_record_link extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create table "customer_record_link" ("id" uuid not null, "run_id" uuid not null, "token_hash" varchar(64) not null, "expires_at" timestamptz not null, "created_by_id" uuid not null, "created_at" timestamptz not null, constraint "customer_record_link_pkey" primary key ("id"));`
		);
		this.addSql(`create index "customer_record_link_run_id_index" on "customer_record_link" ("run_id");`);
		this.addSql(
			`alter table "customer_record_link" add constraint "customer_record_link_token_hash_unique" unique ("token_hash");`
		);

		this.addSql(
			`alter table "customer_record_link" add constraint "customer_record_link_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade;`
		);
	}

	override async down(): Promise<void> {
		this.addSql(`drop table if exists "customer_record_link" cascade;`);
	}
}
