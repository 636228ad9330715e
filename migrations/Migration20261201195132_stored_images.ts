import { Migration } from '@mikro-orm/migrations';

export class Migration20261201195132_stored_images extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create table "stored_image" ("id" uuid not null, "storage_key" varchar(200) not null, "content_type" varchar(64) not null, "byte_size" int not null, "width" int not null, "height" int not null, "sha256" varchar(64) not null, "purpose" text check ("purpose" in ('procedure', 'intake', 'finding')) not null, "original_name" varchar(200) not null, "uploaded_by_id" uuid not null, "created_at" timestamptz not null, constraint "stored_image_pkey" primary key ("id"));`
		);
		this.addSql(`alter table "stored_image" add constraint "stored_image_storage_key_unique" unique ("storage_key");`);

		this.addSql(
			`alter table "stored_image" add constraint "stored_image_uploaded_by_id_foreign" foreign key ("uploaded_by_id") references "app_user" ("id") on update cascade;`
		);
	}

	override async down(): Promise<void> {
		this.addSql(`drop table if exists "stored_image" cascade;`);
	}
}
