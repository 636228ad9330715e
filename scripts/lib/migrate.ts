import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../../mikro-orm.config';

/**
 * Applies pending migrations as the owner role. Hand-written migrations grant to the app's role, whose name they
 * read from BENCHSTAMP_APP_ROLE, so it is set from the app's URL first.
 */
export async function migrate(
	ownerUrl: string,
	appUrl: string,
	log: (m: string) => void = () => {},
	opts: { to?: string } = {}
): Promise<string[]> {
	process.env.BENCHSTAMP_APP_ROLE = decodeURIComponent(new URL(appUrl).username);
	const orm = await MikroORM.init(ormOptions(ownerUrl));
	try {
		const applied = await orm.getMigrator().up(opts.to ? { to: opts.to } : undefined);
		for (const m of applied) log(`migrated ${m.name}`);
		return applied.map((m) => m.name);
	} finally {
		await orm.close(true);
	}
}

/** Reverts the last applied migration (its `down`), as the owner role; the name reverted, or null when none is. */
export async function migrateDown(
	ownerUrl: string,
	appUrl: string,
	log: (m: string) => void = () => {}
): Promise<string | null> {
	process.env.BENCHSTAMP_APP_ROLE = decodeURIComponent(new URL(appUrl).username);
	const orm = await MikroORM.init(ormOptions(ownerUrl));
	try {
		const [reverted] = await orm.getMigrator().down();
		if (reverted) log(`reverted ${reverted.name}`);
		return reverted?.name ?? null;
	} finally {
		await orm.close(true);
	}
}

/** Whether the entities differ from what the migrations built: the SQL a new migration would contain. */
export async function schemaDrift(ownerUrl: string): Promise<string> {
	const orm = await MikroORM.init(ormOptions(ownerUrl));
	try {
		return (await orm.getSchemaGenerator().getUpdateSchemaSQL({ wrap: false, safe: false, dropTables: true })).trim();
	} finally {
		await orm.close(true);
	}
}
