import { Migration } from '@mikro-orm/migrations';

// Hand-written: a published procedure version is immutable (ISO 9001:2015 §7.5.3, controlled documented information).
// Only retirement may be recorded, once; nobody — not even the owner role — may change or delete the text.
// Never edit after it lands.
const appRole = () => {
	const role = process.env.BENCHSTAMP_APP_ROLE ?? 'benchstamp_app';
	if (!/^[a-z_][a-z0-9_]*$/.test(role)) throw new Error(`BENCHSTAMP_APP_ROLE=${role} is not a plain role name`);
	return `"${role}"`;
};

export class Migration20261201194900_procedure_version_immutable extends Migration {
	override async up(): Promise<void> {
		const app = appRole();
		this.addSql(`create or replace function benchstamp_procedure_version_guard() returns trigger language plpgsql as $$
begin
  if TG_OP <> 'UPDATE' then
    raise exception 'procedure_version is immutable: % refused', TG_OP using errcode = '42501';
  end if;
  if (to_jsonb(NEW) - 'retired_at' - 'retired_by_id') is distinct from (to_jsonb(OLD) - 'retired_at' - 'retired_by_id') then
    raise exception 'procedure_version is immutable: only retired_at and retired_by may be set' using errcode = '42501';
  end if;
  if OLD.retired_at is not null
     and (NEW.retired_at is distinct from OLD.retired_at or NEW.retired_by_id is distinct from OLD.retired_by_id) then
    raise exception 'procedure_version % is already retired', OLD.id using errcode = '42501';
  end if;
  if NEW.retired_at is null and NEW.retired_by_id is not null then
    raise exception 'procedure_version: retired_by needs retired_at' using errcode = '42501';
  end if;
  return NEW;
end
$$;`);
		this.addSql(
			`create trigger procedure_version_immutable before update or delete on "procedure_version" for each row execute function benchstamp_procedure_version_guard();`
		);
		this.addSql(
			`create trigger procedure_version_no_truncate before truncate on "procedure_version" for each statement execute function benchstamp_procedure_version_guard();`
		);
		this.addSql(`revoke delete, truncate on "procedure_version" from ${app};`);
	}
}
