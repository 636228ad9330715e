import { Migration } from '@mikro-orm/migrations';

// Hand-written: grants and triggers that the schema generator does not produce. Never edit after it lands.
const appRole = () => {
	const role = process.env.BENCHSTAMP_APP_ROLE ?? 'benchstamp_app';
	if (!/^[a-z_][a-z0-9_]*$/.test(role)) throw new Error(`BENCHSTAMP_APP_ROLE=${role} is not a plain role name`);
	return `"${role}"`;
};

export class Migration20261201191700_grants_and_append_only extends Migration {
	override async up(): Promise<void> {
		const app = appRole();
		// Tables the owner creates from now on are usable by the app, also on an external server.
		this.addSql(`alter default privileges in schema public grant select, insert, update, delete on tables to ${app};`);
		this.addSql(`alter default privileges in schema public grant usage, select on sequences to ${app};`);
		this.addSql(`grant select, insert, update, delete on "app_user", "one_time_token", "rate_limit" to ${app};`);

		// The app may read which migrations ran (health check) but never record or erase one.
		this.addSql(`revoke all on "mikro_orm_migrations" from ${app};`);
		this.addSql(`grant select on "mikro_orm_migrations" to ${app};`);

		// One refusal function for every append-only table (admin log now, the ledger later).
		this.addSql(`create or replace function benchstamp_append_only() returns trigger language plpgsql as $$
begin
  raise exception '% is append-only: % refused', TG_TABLE_NAME, TG_OP using errcode = '42501';
end
$$;`);
		this.addSql(`revoke all on "admin_log" from ${app};`);
		this.addSql(`grant select, insert on "admin_log" to ${app};`);
		this.addSql(`grant usage on sequence "admin_log_id_seq" to ${app};`);
		this.addSql(
			`create trigger admin_log_append_only before update or delete on "admin_log" for each row execute function benchstamp_append_only();`
		);
		this.addSql(
			`create trigger admin_log_no_truncate before truncate on "admin_log" for each statement execute function benchstamp_append_only();`
		);
	}
}
