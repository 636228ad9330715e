import { join } from 'node:path';
import { runDemoSeed } from './demo-seed';
import { migrate } from './migrate';
import { startCluster } from './postgres';
import { fileSecret } from './secrets';

export interface Prepared {
	mode: 'demo' | 'production';
	env: NodeJS.ProcessEnv;
}

/**
 * What `npm start` and `npm run dev` share: PostgreSQL (the project cluster in .data/ unless DATABASE_URL is
 * given), migrations, the demo seed in demo mode, and the generated AUTH_SECRET. Returns the app's environment.
 */
export async function prepare(root: string, log: (m: string) => void): Promise<Prepared> {
	const dataDir = join(root, '.data');
	const mode = process.env.BENCHSTAMP_MODE === 'production' ? 'production' : 'demo';
	let appUrl = process.env.DATABASE_URL;
	let ownerUrl = process.env.OWNER_DATABASE_URL ?? appUrl;
	if (!appUrl) {
		const port = Number(process.env.BENCHSTAMP_PG_PORT ?? 54329);
		const urls = await startCluster({ baseDir: dataDir, port, database: 'benchstamp', log });
		appUrl = urls.appUrl;
		ownerUrl = urls.ownerUrl;
		log(`PostgreSQL on 127.0.0.1:${urls.port} (data in .data/postgres)`);
	} else {
		log('using the PostgreSQL server in DATABASE_URL');
	}
	await migrate(ownerUrl!, appUrl, log);
	if (mode === 'demo') {
		const { created } = await runDemoSeed(appUrl);
		log(created ? `seeded ${created} demo people` : 'demo scenario already seeded');
	}
	return {
		mode,
		env: {
			BENCHSTAMP_MODE: mode,
			DATABASE_URL: appUrl,
			AUTH_SECRET: process.env.AUTH_SECRET ?? (await fileSecret(join(dataDir, 'auth-secret'))),
			MAIL_DIR: process.env.MAIL_DIR ?? join(dataDir, 'mail'),
			// adapter-node refuses bodies over 512 KB by default; a tablet photo is larger (images are capped at 10 MiB).
			BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT ?? '11M'
		}
	};
}
