// Run by the demo seed (outside Vite): relative imports only.
import { readdir, readFile } from 'node:fs/promises';
import { fileURLToPath } from 'node:url';
import type { EntityManager } from '@mikro-orm/postgresql';
import { User, type IUser } from './db/entities';
import * as procedures from './repositories/procedures';
import { publishInitial } from './services/procedures.service';

const DEMO_DIR = fileURLToPath(new URL('../../../procedures/', import.meta.url));
const NOTE = 'Demo library: published from procedures/*.md at first start (invented procedures, not service data).';

/**
 * When the library is empty, publishes each demo file in procedures/ (FORMAT.md excepted) as version 1, written
 * by the demo lead and approved by the demo quality lead. Does nothing once any procedure exists.
 */
export async function seedDemoProcedures(
	em: EntityManager,
	people = { author: 'lead@example.com', approver: 'quality@example.com' },
	dir = DEMO_DIR
): Promise<{ published: number; skipped: string[] }> {
	if ((await procedures.count(em)) > 0) return { published: 0, skipped: [] };
	const author = await em.findOne(User, { email: people.author });
	const approver = await em.findOne(User, { email: people.approver });
	if (!author || !approver) return { published: 0, skipped: ['(demo lead or quality person missing)'] };
	const ref = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });
	const names = (await readdir(dir)).filter((n) => n.endsWith('.md') && n !== 'FORMAT.md').sort();
	let published = 0;
	const skipped: string[] = [];
	for (const name of names) {
		const source = await readFile(`${dir}${name}`, 'utf8');
		const r = await publishInitial(em, source, { author: ref(author), approver: ref(approver), changeNote: NOTE });
		if (r.ok) published++;
		else skipped.push(name);
	}
	return { published, skipped };
}
