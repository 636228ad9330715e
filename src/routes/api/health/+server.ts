import { json } from '@sveltejs/kit';
import { getRuntime } from '$lib/server/runtime';
import { migrationState } from '$lib/server/db/migration-state';

/** Liveness and readiness for a load balancer or a person: 200 when the database answers, 503 when it does not. */
export const GET = async () => {
	try {
		const state = await migrationState(getRuntime().orm);
		return json({ status: 'ok', db: 'ok', migrations: state }, { headers: { 'cache-control': 'no-store' } });
	} catch (e) {
		return json(
			{ status: 'degraded', db: 'unreachable', error: e instanceof Error ? e.message.split('\n')[0] : 'unknown' },
			{ status: 503, headers: { 'cache-control': 'no-store' } }
		);
	}
};
