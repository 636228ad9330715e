import { Migration } from '@mikro-orm/migrations';

export class Migration20261201194858_procedures extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create table "procedure" ("id" uuid not null, "slug" varchar(64) not null, "title" varchar(200) not null, "family" varchar(200) not null, "created_by_id" uuid not null, "created_at" timestamptz not null, "changed_at" timestamptz not null, "changed_by_id" uuid null, constraint "procedure_pkey" primary key ("id"));`
		);
		this.addSql(`alter table "procedure" add constraint "procedure_slug_unique" unique ("slug");`);

		this.addSql(
			`create table "procedure_version" ("id" uuid not null, "procedure_id" uuid not null, "number" int not null, "source" text not null, "model" jsonb not null, "content_hash" varchar(64) not null, "engine_version" varchar(64) not null, "change_note" text not null, "author_id" uuid not null, "approver_id" uuid not null, "published_at" timestamptz not null, "retired_at" timestamptz null, "retired_by_id" uuid null, constraint "procedure_version_pkey" primary key ("id"));`
		);
		this.addSql(
			`alter table "procedure_version" add constraint "procedure_version_procedure_number_unique" unique ("procedure_id", "number");`
		);

		this.addSql(
			`create table "procedure_draft" ("id" uuid not null, "procedure_id" uuid not null, "source" text not null, "author_id" uuid not null, "contributors" text[] not null, "created_at" timestamptz not null, "updated_at" timestamptz not null, "updated_by_id" uuid not null, "submitted_at" timestamptz null, "submitted_by_id" uuid null, constraint "procedure_draft_pkey" primary key ("id"));`
		);
		this.addSql(
			`alter table "procedure_draft" add constraint "procedure_draft_procedure_id_unique" unique ("procedure_id");`
		);

		this.addSql(
			`alter table "procedure" add constraint "procedure_created_by_id_foreign" foreign key ("created_by_id") references "app_user" ("id") on update cascade;`
		);
		this.addSql(
			`alter table "procedure" add constraint "procedure_changed_by_id_foreign" foreign key ("changed_by_id") references "app_user" ("id") on update cascade on delete set null;`
		);

		this.addSql(
			`alter table "procedure_version" add constraint "procedure_version_procedure_id_foreign" foreign key ("procedure_id") references "procedure" ("id") on update cascade;`
		);
		this.addSql(
			`alter table "procedure_version" add constraint "procedure_version_author_id_foreign" foreign key ("author_id") references "app_user" ("id") on update cascade;`
		);
		this.addSql(
			`alter table "procedure_version" add constraint "procedure_version_approver_id_foreign" foreign key ("approver_id") references "app_user" ("id") on update cascade;`
		);
		this.addSql(
			`alter table "procedure_version" add constraint "procedure_version_retired_by_id_foreign" foreign key ("retired_by_id") references "app_user" ("id") on update cascade on delete set null;`
		);

		this.addSql(
			`alter table "procedure_draft" add constraint "procedure_draft_procedure_id_foreign" foreign key ("procedure_id") references "procedure" ("id") on update cascade on delete cascade;`
		);
		this.addSql(
			`alter table "procedure_draft" add constraint "procedure_draft_author_id_foreign" foreign key ("author_id") references "app_user" ("id") on update cascade;`
		);
		this.addSql(
			`alter table "procedure_draft" add constraint "procedure_draft_updated_by_id_foreign" foreign key ("updated_by_id") references "app_user" ("id") on update cascade;`
		);
		this.addSql(
			`alter table "procedure_draft" add constraint "procedure_draft_submitted_by_id_foreign" foreign key ("submitted_by_id") references "app_user" ("id") on update cascade on delete set null;`
		);
	}

	override async down(): Promise<void> {
		this.addSql(`alter table "procedure_version" drop constraint "procedure_version_procedure_id_foreign";`);

		this.addSql(`alter table "procedure_draft" drop constraint "procedure_draft_procedure_id_foreign";`);

		this.addSql(`drop table if exists "procedure" cascade;`);

		this.addSql(`drop table if exists "procedure_version" cascade;`);

		this.addSql(`drop table if exists "procedure_draft" cascade;`);
	}
}
