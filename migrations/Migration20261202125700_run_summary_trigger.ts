import { Migration } from '@mikro-orm/migrations';

// Hand-written: `run_summary` and `run_signer_day` are kept by the database. One statement trigger on `ledger_record`
// folds every appended batch into them (a multi-row INSERT from one flush costs one pass over its rows, not one per
// row), so the audit search reads a run's first/last time, its finding count and the days each person signed it
// without reading the run's records. The function runs as its owner (security definer), so the app's role needs, and
// gets, nothing but SELECT on both tables: no code path of the app can write a stale summary. Existing records are
// folded in once here. Never edit after it lands.
const appRole = () => {
	const role = process.env.BENCHSTAMP_APP_ROLE ?? 'benchstamp_app';
	if (!/^[a-z_][a-z0-9_]*$/.test(role)) throw new Error(`BENCHSTAMP_APP_ROLE=${role} is not a plain role name`);
	return `"${role}"`;
};

export class Migration20261202125700_run_summary_trigger extends Migration {
	override async up(): Promise<void> {
		const app = appRole();
		for (const table of ['run_summary', 'run_signer_day']) {
			this.addSql(`revoke all on "${table}" from ${app};`);
			this.addSql(`grant select on "${table}" to ${app};`);
		}
		this.addSql(`
create function benchstamp_run_summary() returns trigger
language plpgsql security definer set search_path = public, pg_temp as $$
begin
	insert into run_summary (run_id, first_at, last_at, finding_count)
		select run_id, min(server_time), max(server_time), count(*) filter (where kind = 'finding')
		from appended group by run_id
	on conflict (run_id) do update set
		first_at = least(run_summary.first_at, excluded.first_at),
		last_at = greatest(run_summary.last_at, excluded.last_at),
		finding_count = run_summary.finding_count + excluded.finding_count;
	insert into run_signer_day (signer_id, day, run_id)
		select distinct signer_id, (server_time at time zone 'UTC')::date, run_id from appended where signer_id is not null
	on conflict do nothing;
	return null;
end $$;`);
		this.addSql(`revoke all on function benchstamp_run_summary() from public;`);
		this.addSql(
			`create trigger ledger_record_run_summary after insert on "ledger_record" referencing new table as appended for each statement execute function benchstamp_run_summary();`
		);
		this.addSql(`
insert into run_summary (run_id, first_at, last_at, finding_count)
	select run_id, min(server_time), max(server_time), count(*) filter (where kind = 'finding')
	from ledger_record group by run_id;`);
		this.addSql(`
insert into run_signer_day (signer_id, day, run_id)
	select distinct signer_id, (server_time at time zone 'UTC')::date, run_id from ledger_record where signer_id is not null;`);
	}

	override async down(): Promise<void> {
		this.addSql(`drop trigger if exists ledger_record_run_summary on "ledger_record";`);
		this.addSql(`drop function if exists benchstamp_run_summary();`);
		this.addSql(`truncate run_summary, run_signer_day;`);
	}
}
