import { RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible';
import type { MikroORM } from '@mikro-orm/postgresql';

/**
 * Failed sign-ins counted in PostgreSQL so every app process sees the same counters.
 * Per account: 5 failures in 15 minutes lock it for 15 minutes (OWASP Authentication Cheat Sheet, account lockout).
 * Per client address: 30 failures in 15 minutes, which still lets a shop behind one NAT sign in (common practice, no source).
 */
export interface SignInLimits {
	isBlocked(email: string, address: string): Promise<boolean>;
	recordFailure(email: string, address: string): Promise<void>;
	recordSuccess(email: string): Promise<void>;
}

export function createSignInLimits(orm: MikroORM): SignInLimits {
	const knex = orm.em.getConnection().getKnex();
	const common = { storeClient: knex, storeType: 'knex', tableName: 'rate_limit', tableCreated: true } as const;
	const perAccount = new RateLimiterPostgres({
		...common,
		keyPrefix: 'signin_account',
		points: 5,
		duration: 900,
		blockDuration: 900
	});
	const perAddress = new RateLimiterPostgres({
		...common,
		keyPrefix: 'signin_address',
		points: 30,
		duration: 900,
		blockDuration: 900
	});
	const accountKey = (email: string) => email.trim().toLowerCase();

	const exhausted = (res: RateLimiterRes | null, max: number) => res !== null && res.consumedPoints >= max;

	return {
		async isBlocked(email, address) {
			const [a, b] = await Promise.all([perAccount.get(accountKey(email)), perAddress.get(address)]);
			return exhausted(a, 5) || exhausted(b, 30);
		},
		async recordFailure(email, address) {
			await Promise.all([
				perAccount.consume(accountKey(email)).catch(ignoreLimitReached),
				perAddress.consume(address).catch(ignoreLimitReached)
			]);
		},
		async recordSuccess(email) {
			await perAccount.delete(accountKey(email));
		}
	};
}

function ignoreLimitReached(e: unknown) {
	if (e instanceof RateLimiterRes) return;
	throw e;
}
