/**
 * Database URLs for integration tests, provided by tests/integration/global-setup.ts (a throwaway cluster, or the
 * one the top-level test orchestrator passed in through TEST_DATABASE_URL / TEST_OWNER_DATABASE_URL).
 */
import { inject } from 'vitest';

declare module 'vitest' {
	export interface ProvidedContext {
		/** App role (DML only). */
		TEST_DATABASE_URL: string;
		/** Owner role (owns the database; run migrations with it). */
		TEST_OWNER_DATABASE_URL: string;
		/** Superuser, only when global-setup started the cluster itself (or TEST_SUPERUSER_DATABASE_URL was set). */
		TEST_SUPERUSER_DATABASE_URL: string | null;
	}
}

export interface TestDbUrls {
	appUrl: string;
	ownerUrl: string;
	superuserUrl: string | null;
}

export function testDbUrls(): TestDbUrls {
	const appUrl = inject('TEST_DATABASE_URL') || process.env.TEST_DATABASE_URL;
	const ownerUrl = inject('TEST_OWNER_DATABASE_URL') || process.env.TEST_OWNER_DATABASE_URL;
	if (!appUrl || !ownerUrl) {
		throw new Error('no test database: run integration tests through vitest --project integration (global-setup)');
	}
	const superuserUrl = inject('TEST_SUPERUSER_DATABASE_URL') ?? process.env.TEST_SUPERUSER_DATABASE_URL ?? null;
	return { appUrl, ownerUrl, superuserUrl: superuserUrl || null };
}
