import { Migration } from '@mikro-orm/migrations';

// Hand-written: the job number sequence, and the histories the app may add to but never change — job state
// changes and calibration records. Reuses benchstamp_append_only() from the grants migration. Never edit after it lands.
const appRole = () => {
	const role = process.env.BENCHSTAMP_APP_ROLE ?? 'benchstamp_app';
	if (!/^[a-z_][a-z0-9_]*$/.test(role)) throw new Error(`BENCHSTAMP_APP_ROLE=${role} is not a plain role name`);
	return `"${role}"`;
};

export class Migration20261201195100_registers_append_only extends Migration {
	override async up(): Promise<void> {
		const app = appRole();
		// Job numbers (KL-26-0042): nextval is atomic, so two intakes at once never get the same number.
		this.addSql(`create sequence if not exists "job_number_seq" start 1;`);
		this.addSql(`grant usage, select on sequence "job_number_seq" to ${app};`);

		for (const table of ['job_state_change', 'calibration']) {
			this.addSql(`revoke all on "${table}" from ${app};`);
			this.addSql(`grant select, insert on "${table}" to ${app};`);
			this.addSql(
				`create trigger ${table}_append_only before update or delete on "${table}" for each row execute function benchstamp_append_only();`
			);
			this.addSql(
				`create trigger ${table}_no_truncate before truncate on "${table}" for each statement execute function benchstamp_append_only();`
			);
		}
		this.addSql(`grant usage on sequence "job_state_change_id_seq" to ${app};`);
	}
}
