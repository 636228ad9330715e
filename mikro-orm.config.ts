// Read by the MikroORM CLI (outside Vite) and by the app: relative imports and process.env only.
import { defineConfig } from '@mikro-orm/postgresql';
import { Migrator } from '@mikro-orm/migrations';
import { entities } from './src/lib/server/db/entities/index';

/** Options shared by the app, the CLI and the tests; the connection URL is supplied per use. */
export function ormOptions(clientUrl: string) {
	return defineConfig({
		clientUrl,
		entities,
		extensions: [Migrator],
		migrations: {
			path: './migrations',
			pathTs: './migrations',
			tableName: 'mikro_orm_migrations',
			transactional: true,
			allOrNothing: true,
			snapshot: false,
			emit: 'ts'
		},
		discovery: { warnWhenNoEntities: true },
		forceUtcTimezone: true,
		debug: false,
		allowGlobalContext: false
	});
}

// The CLI runs migrations as the owner role; the app connects as its own, lesser role.
export default ormOptions(
	process.env.OWNER_DATABASE_URL ?? process.env.DATABASE_URL ?? 'postgres://127.0.0.1:54329/benchstamp'
);
