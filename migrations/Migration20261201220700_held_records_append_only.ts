import { Migration } from '@mikro-orm/migrations';

// Hand-written: the holding queue is append-only. The app's role may only INSERT and SELECT `held_record` and
// `held_record_resolution`, and benchstamp_append_only() refuses UPDATE, DELETE and TRUNCATE for every role, the owner
// included. A held submission stays exactly as it was sent; a decision about it is a new resolution row. Never edit
// after it lands.
const appRole = () => {
	const role = process.env.BENCHSTAMP_APP_ROLE ?? 'benchstamp_app';
	if (!/^[a-z_][a-z0-9_]*$/.test(role)) throw new Error(`BENCHSTAMP_APP_ROLE=${role} is not a plain role name`);
	return `"${role}"`;
};

export class Migration20261201220700_held_records_append_only extends Migration {
	override async up(): Promise<void> {
		const app = appRole();
		for (const table of ['held_record', 'held_record_resolution']) {
			this.addSql(`revoke all on "${table}" from ${app};`);
			this.addSql(`grant select, insert on "${table}" to ${app};`);
			this.addSql(
				`create trigger ${table}_append_only before update or delete on "${table}" for each row execute function benchstamp_append_only();`
			);
			this.addSql(
				`create trigger ${table}_no_truncate before truncate on "${table}" for each statement execute function benchstamp_append_only();`
			);
		}
	}
}
