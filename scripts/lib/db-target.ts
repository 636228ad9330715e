import { join } from 'node:path';
import { clusterUrls } from './postgres';

/** The database scripts work on: DATABASE_URL / OWNER_DATABASE_URL when set, else the repository's own cluster. */
export async function dbTarget(root: string): Promise<{ appUrl: string; ownerUrl: string }> {
	const appUrl = process.env.DATABASE_URL;
	if (appUrl) return { appUrl, ownerUrl: process.env.OWNER_DATABASE_URL || appUrl };
	const local = await clusterUrls(join(root, '.data'), 'benchstamp');
	if (!local) throw new Error('No DATABASE_URL and no local cluster: run `npm run db -- start` first.');
	return { appUrl: local.appUrl, ownerUrl: local.ownerUrl };
}
