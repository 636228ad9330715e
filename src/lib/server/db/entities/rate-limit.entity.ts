import { defineEntity, p } from '@mikro-orm/core';

/** Counters of rate-limiter-flexible's PostgreSQL store, declared here so migrations own the table. */
export const RateLimit = defineEntity({
	name: 'RateLimit',
	tableName: 'rate_limit',
	properties: {
		key: p.string().length(255).primary(),
		points: p.integer().default(0),
		expire: p.bigint('string').nullable()
	}
});
