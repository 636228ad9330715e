import { Migration } from '@mikro-orm/migrations';

export class Migration20261201220753_audit_search_indexes extends Migration {
	override async up(): Promise<void> {
		this.addSql(`create index "ledger_record_signer_time_index" on "ledger_record" ("signer_id", "server_time");`);
		this.addSql(`create index "ledger_record_server_time_index" on "ledger_record" ("server_time");`);
		this.addSql(`create index "ledger_record_body_path_index" on "ledger_record" using gin ("body" jsonb_path_ops);`);
	}

	override async down(): Promise<void> {
		this.addSql(`drop index "ledger_record_signer_time_index";`);
		this.addSql(`drop index "ledger_record_server_time_index";`);
		this.addSql(`drop index "ledger_record_body_path_index";`);
	}
}
