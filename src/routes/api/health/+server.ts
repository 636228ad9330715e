import { json } from '@sveltejs/kit';
import { getRuntime } from '$lib/server/runtime';
import { migrationState } from '$lib/server/db/migration-state';

/** Liveness and readiness for a load balancer or a person: 200 when the database answers, 503 when it does not. */
export const GET = async () => {
	try {
		// A down database must answer quickly, not after the pool's own minute-long acquire timeout.
		const state = await Promise.race([
			migrationState(getRuntime().orm),
			new Promise<never>((_, reject) => setTimeout(() => reject(new Error('database did not answer within 3 s')), 3000))
		]);
		return json({ status: 'ok', db: 'ok', migrations: state }, { headers: { 'cache-control': 'no-store' } });
	} catch (e) {
		return json(
			{ status: 'degraded', db: 'unreachable', error: e instanceof Error ? e.message.split('\n')[0] : 'unknown' },
			{ status: 503, headers: { 'cache-control': 'no-store' } }
		);
	}
};
