/**
 * `npm run admin:create -- --email you@shop.example --name "Your Name"`: the first administrator of an installation
 * (production has no demo people). Creates the account with the admin role and prints a single-use welcome link,
 * valid 72 hours, where that person chooses their own password and PIN. Uses DATABASE_URL or the local cluster.
 */
import { dirname, join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { fileURLToPath } from 'node:url';
import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../mikro-orm.config';
import * as adminLog from '../src/lib/server/repositories/admin-log';
import * as tokens from '../src/lib/server/repositories/one-time-tokens';
import * as users from '../src/lib/server/repositories/users';
import { newLinkToken } from '../src/lib/server/tokens';
import { clusterUrls } from './lib/postgres';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

async function main() {
	const { values } = parseArgs({ options: { email: { type: 'string' }, name: { type: 'string' } } });
	if (
		!values.email ||
		!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(values.email) ||
		!values.name ||
		values.name.trim().length < 2
	) {
		throw new Error('usage: npm run admin:create -- --email you@shop.example --name "Your Name"');
	}
	const appUrl = process.env.DATABASE_URL ?? (await clusterUrls(join(root, '.data'), 'benchstamp'))?.appUrl;
	if (!appUrl) throw new Error('No DATABASE_URL and no local cluster: run `npm start` once, or set DATABASE_URL.');
	const orm = await MikroORM.init(ormOptions(appUrl));
	try {
		const em = orm.em.fork();
		if (await users.findByEmail(em, values.email)) throw new Error(`${values.email} already has an account.`);
		const user = users.create(em, { email: values.email, name: values.name, roles: ['admin'] });
		const link = newLinkToken();
		tokens.create(em, user, 'invite', link.hash, 72 * 3600_000);
		adminLog.append(em, null, {
			action: 'user.invited',
			subjectType: 'user',
			subjectId: user.id,
			detail: { email: user.email, roles: ['admin'], via: 'admin:create' }
		});
		await em.flush();
		const origin = process.env.ORIGIN ?? `http://localhost:${process.env.PORT ?? 3000}`;
		console.log(
			`Administrator ${user.email} created. Open this link once, within 72 hours, to choose a password and PIN:`
		);
		console.log(`${origin}/welcome/${link.token}`);
	} finally {
		await orm.close(true);
	}
}

main().catch((e: unknown) => {
	console.error(e instanceof Error ? e.message : String(e));
	process.exit(1);
});
