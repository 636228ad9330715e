import { Migration } from '@mikro-orm/migrations';

// Hand-written (issue 8, audit at 1,000,000 records): the search's signer/date question answered index-only, and a
// run's first/last time and findings by index probes instead of reading all its records. The two plain indexes of
// `…_audit_search_indexes` are replaced by covering ones with the same keys.
export class Migration20261202050900_audit_scale_indexes extends Migration {
	override async up(): Promise<void> {
		this.addSql(
			`create index "ledger_record_signer_time_run_index" on "ledger_record" ("signer_id", "server_time") include ("run_id");`
		);
		this.addSql(`drop index "ledger_record_signer_time_index";`);
		this.addSql(
			`create index "ledger_record_server_time_run_index" on "ledger_record" ("server_time") include ("run_id");`
		);
		this.addSql(`drop index "ledger_record_server_time_index";`);
		this.addSql(`create index "ledger_record_run_time_index" on "ledger_record" ("run_id", "server_time");`);
		this.addSql(`create index "ledger_record_finding_index" on "ledger_record" ("run_id") where "kind" = 'finding';`);
	}

	override async down(): Promise<void> {
		this.addSql(`drop index "ledger_record_finding_index";`);
		this.addSql(`drop index "ledger_record_run_time_index";`);
		this.addSql(`create index "ledger_record_server_time_index" on "ledger_record" ("server_time");`);
		this.addSql(`drop index "ledger_record_server_time_run_index";`);
		this.addSql(`create index "ledger_record_signer_time_index" on "ledger_record" ("signer_id", "server_time");`);
		this.addSql(`drop index "ledger_record_signer_time_run_index";`);
	}
}
