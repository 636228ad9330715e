import { Migration } from '@mikro-orm/migrations';

// The submit path asks "is this entry already logged?" for a subject on every record it appends, and a subject's
// history page lists its entries: without this index both read the whole log, which only grows.
export class Migration20261202060000_admin_log_subject_index extends Migration {
	override async up(): Promise<void> {
		this.addSql(`create index "admin_log_subject_index" on "admin_log" ("subject_type", "subject_id", "action");`);
	}

	override async down(): Promise<void> {
		this.addSql(`drop index "admin_log_subject_index";`);
	}
}
