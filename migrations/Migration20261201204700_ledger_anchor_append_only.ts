import { Migration } from '@mikro-orm/migrations';

// Hand-written: the chain anchors are append-only like the ledger. The app's role may only INSERT and SELECT
// `ledger_anchor`, and benchstamp_append_only() refuses UPDATE, DELETE and TRUNCATE for every role, the owner
// included. Never edit after it lands.
const appRole = () => {
	const role = process.env.BENCHSTAMP_APP_ROLE ?? 'benchstamp_app';
	if (!/^[a-z_][a-z0-9_]*$/.test(role)) throw new Error(`BENCHSTAMP_APP_ROLE=${role} is not a plain role name`);
	return `"${role}"`;
};

export class Migration20261201204700_ledger_anchor_append_only extends Migration {
	override async up(): Promise<void> {
		const app = appRole();
		this.addSql(`revoke all on "ledger_anchor" from ${app};`);
		this.addSql(`grant select, insert on "ledger_anchor" to ${app};`);
		this.addSql(
			`create trigger ledger_anchor_append_only before update or delete on "ledger_anchor" for each row execute function benchstamp_append_only();`
		);
		this.addSql(
			`create trigger ledger_anchor_no_truncate before truncate on "ledger_anchor" for each statement execute function benchstamp_append_only();`
		);
	}
}
