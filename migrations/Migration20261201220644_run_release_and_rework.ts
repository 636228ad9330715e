import { Migration } from '@mikro-orm/migrations';

export class Migration20261201220644_run_release_and_rework extends Migration {
	override async up(): Promise<void> {
		this.addSql(`alter table "run" drop constraint if exists "run_state_check";`);

		this.addSql(
			`alter table "run" add column "rework_of_id" uuid null, add column "rework_steps" jsonb null, add column "rework_finding_id" uuid null;`
		);
		this.addSql(
			`alter table "run" add constraint "run_rework_of_id_foreign" foreign key ("rework_of_id") references "run" ("id") on update cascade on delete set null;`
		);
		this.addSql(
			`alter table "run" add constraint "run_state_check" check("state" in ('in_progress', 'paused', 'awaiting_review', 'released'));`
		);
		this.addSql(`create index "run_rework_of_id_index" on "run" ("rework_of_id");`);
	}

	override async down(): Promise<void> {
		this.addSql(`alter table "run" drop constraint if exists "run_state_check";`);

		this.addSql(`alter table "run" drop constraint "run_rework_of_id_foreign";`);

		this.addSql(`drop index "run_rework_of_id_index";`);
		this.addSql(
			`alter table "run" drop column "rework_of_id", drop column "rework_steps", drop column "rework_finding_id";`
		);

		this.addSql(
			`alter table "run" add constraint "run_state_check" check("state" in ('in_progress', 'paused', 'awaiting_review'));`
		);
	}
}
