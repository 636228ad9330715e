import { Migration } from '@mikro-orm/migrations';

export class Migration20261201195041_registers extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create table "job" ("id" uuid not null, "job_number" varchar(20) not null, "customer_name" varchar(120) not null, "customer_email" varchar(320) not null default '', "customer_phone" varchar(40) not null default '', "unit_model" varchar(120) not null, "unit_serial" varchar(60) not null, "serial_key" varchar(60) not null, "mileage" int null, "complaint" text not null, "fault_codes" text[] not null, "received_on" date not null, "intake_notes" text not null default '', "state" text check ("state" in ('received', 'in_work', 'on_hold', 'awaiting_parts', 'awaiting_review', 'released', 'scrapped')) not null, "previous_job_id" uuid null, "created_by_id" uuid null, "created_by_name" varchar(120) null, "created_at" timestamptz not null, "updated_at" timestamptz not null, constraint "job_pkey" primary key ("id"));`
		);
		this.addSql(`alter table "job" add constraint "job_job_number_unique" unique ("job_number");`);
		this.addSql(`create index "job_serial_key_index" on "job" ("serial_key");`);

		this.addSql(
			`create table "job_photo" ("job_id" uuid not null, "image_id" varchar(64) not null, "added_by_id" uuid null, "added_by_name" varchar(120) null, "added_at" timestamptz not null, constraint "job_photo_pkey" primary key ("job_id", "image_id"));`
		);

		this.addSql(
			`create table "job_state_change" ("id" bigserial primary key, "job_id" uuid not null, "from_state" text check ("from_state" in ('received', 'in_work', 'on_hold', 'awaiting_parts', 'awaiting_review', 'released', 'scrapped')) null, "to_state" text check ("to_state" in ('received', 'in_work', 'on_hold', 'awaiting_parts', 'awaiting_review', 'released', 'scrapped')) not null, "reason" text not null, "actor_id" uuid null, "actor_name" varchar(120) null, "at" timestamptz not null default now());`
		);
		this.addSql(`create index "job_state_change_job_id_index" on "job_state_change" ("job_id");`);

		this.addSql(
			`create table "part" ("id" uuid not null, "part_number" varchar(40) not null, "description" varchar(200) not null, "category" text check ("category" in ('filter', 'gasket', 'seal', 'sensor', 'fluid', 'fastener', 'other')) not null, "unit" varchar(8) not null, "created_at" timestamptz not null, constraint "part_pkey" primary key ("id"));`
		);
		this.addSql(`alter table "part" add constraint "part_part_number_unique" unique ("part_number");`);

		this.addSql(
			`create table "part_lot" ("id" uuid not null, "part_id" uuid not null, "lot_number" varchar(60) not null, "serialised" boolean not null default false, "quantity" varchar(24) not null, "received_on" date not null, "supplier" varchar(120) not null default '', "recorded_by_id" uuid null, "recorded_by_name" varchar(120) null, "recorded_at" timestamptz not null, constraint "part_lot_pkey" primary key ("id"));`
		);
		this.addSql(
			`alter table "part_lot" add constraint "part_lot_part_id_lot_number_unique" unique ("part_id", "lot_number");`
		);

		this.addSql(
			`create table "tool" ("id" uuid not null, "asset_tag" varchar(40) not null, "kind" text check ("kind" in ('torque_click', 'torque_indicating', 'bore_gauge', 'micrometer', 'caliper', 'thermometer')) not null, "description" varchar(200) not null, "range_min" varchar(24) not null, "range_max" varchar(24) not null, "unit" text check ("unit" in ('N·m', 'lbf·ft', 'lbf·in', 'mm', 'µm', 'in', '°C', '°F')) not null, "resolution" varchar(24) not null, "accuracy_pct" varchar(24) not null, "active" boolean not null default true, "created_at" timestamptz not null, "updated_at" timestamptz not null, constraint "tool_pkey" primary key ("id"));`
		);
		this.addSql(`alter table "tool" add constraint "tool_asset_tag_unique" unique ("asset_tag");`);

		this.addSql(
			`create table "calibration" ("id" uuid not null, "tool_id" uuid not null, "kind" text check ("kind" in ('calibration', 'check')) not null, "performed_on" date not null, "certificate_no" varchar(80) null, "as_found" text check ("as_found" in ('in', 'out')) not null, "as_left" text check ("as_left" in ('in', 'out')) null, "next_due_on" date null, "notes" text not null default '', "recorded_by_id" uuid null, "recorded_by_name" varchar(120) null, "recorded_at" timestamptz not null, constraint "calibration_pkey" primary key ("id"));`
		);
		this.addSql(`create index "calibration_tool_id_index" on "calibration" ("tool_id");`);

		this.addSql(
			`create table "qualification" ("id" uuid not null, "user_id" uuid not null, "family" varchar(160) not null, "family_key" varchar(160) not null, "trained_by" varchar(120) not null, "trained_on" date not null, "expires_on" date null, "notes" text not null default '', "revoked_at" timestamptz null, "recorded_by_id" uuid null, "recorded_by_name" varchar(120) null, "recorded_at" timestamptz not null, constraint "qualification_pkey" primary key ("id"));`
		);
		this.addSql(`create index "qualification_user_id_index" on "qualification" ("user_id");`);
		this.addSql(`create index "qualification_family_key_index" on "qualification" ("family_key");`);

		this.addSql(
			`alter table "job" add constraint "job_previous_job_id_foreign" foreign key ("previous_job_id") references "job" ("id") on update cascade on delete set null;`
		);

		this.addSql(
			`alter table "job_photo" add constraint "job_photo_job_id_foreign" foreign key ("job_id") references "job" ("id") on update cascade on delete cascade;`
		);

		this.addSql(
			`alter table "job_state_change" add constraint "job_state_change_job_id_foreign" foreign key ("job_id") references "job" ("id") on update cascade on delete no action;`
		);

		this.addSql(
			`alter table "part_lot" add constraint "part_lot_part_id_foreign" foreign key ("part_id") references "part" ("id") on update cascade on delete cascade;`
		);

		this.addSql(
			`alter table "calibration" add constraint "calibration_tool_id_foreign" foreign key ("tool_id") references "tool" ("id") on update cascade on delete cascade;`
		);

		this.addSql(
			`alter table "qualification" add constraint "qualification_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade on delete cascade;`
		);
	}

	override async down(): Promise<void> {
		this.addSql(`alter table "job" drop constraint "job_previous_job_id_foreign";`);

		this.addSql(`alter table "job_photo" drop constraint "job_photo_job_id_foreign";`);

		this.addSql(`alter table "job_state_change" drop constraint "job_state_change_job_id_foreign";`);

		this.addSql(`alter table "part_lot" drop constraint "part_lot_part_id_foreign";`);

		this.addSql(`alter table "calibration" drop constraint "calibration_tool_id_foreign";`);

		this.addSql(`drop table if exists "job" cascade;`);

		this.addSql(`drop table if exists "job_photo" cascade;`);

		this.addSql(`drop table if exists "job_state_change" cascade;`);

		this.addSql(`drop table if exists "part" cascade;`);

		this.addSql(`drop table if exists "part_lot" cascade;`);

		this.addSql(`drop table if exists "tool" cascade;`);

		this.addSql(`drop table if exists "calibration" cascade;`);

		this.addSql(`drop table if exists "qualification" cascade;`);
	}
}
