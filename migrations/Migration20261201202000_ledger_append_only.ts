import { Migration } from '@mikro-orm/migrations';

// Hand-written: the ledger is append-only. The app's role may only INSERT and SELECT `ledger_record`, and
// benchstamp_append_only() (from the grants migration) refuses UPDATE, DELETE and TRUNCATE for every role, the owner
// included. Never edit after it lands.
const appRole = () => {
	const role = process.env.BENCHSTAMP_APP_ROLE ?? 'benchstamp_app';
	if (!/^[a-z_][a-z0-9_]*$/.test(role)) throw new Error(`BENCHSTAMP_APP_ROLE=${role} is not a plain role name`);
	return `"${role}"`;
};

export class Migration20261201202000_ledger_append_only extends Migration {
	override async up(): Promise<void> {
		const app = appRole();
		this.addSql(`revoke all on "ledger_record" from ${app};`);
		this.addSql(`grant select, insert on "ledger_record" to ${app};`);
		this.addSql(
			`create trigger ledger_record_append_only before update or delete on "ledger_record" for each row execute function benchstamp_append_only();`
		);
		this.addSql(
			`create trigger ledger_record_no_truncate before truncate on "ledger_record" for each statement execute function benchstamp_append_only();`
		);
	}
}
