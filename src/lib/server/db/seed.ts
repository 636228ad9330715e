// Run by scripts (outside Vite): relative imports only.
import type { EntityManager } from '@mikro-orm/postgresql';
import { User, type Role } from './entities';
import { mailSettled } from '../mail';
import { hashSecret } from '../passwords';
import { seedDemoProcedures } from '../procedures-seed';
import { seedRegisters } from '../registers-seed';
import { seedHistory } from '../history-seed';
import { seedQualityDemo } from '../quality-seed';

/** The invented demo shop's people. Demo/dev only: a production start never runs this. */
export const DEMO_PASSWORD = 'bench-demo';
export const DEMO_PEOPLE: { email: string; name: string; roles: Role[]; pin: string }[] = [
	{ email: 'tech@example.com', name: 'Tomas Reyna', roles: ['technician'], pin: '111111' },
	{ email: 'tech2@example.com', name: 'Wren Okafor', roles: ['technician'], pin: '555555' },
	{ email: 'lead@example.com', name: 'Lena Marsh', roles: ['lead'], pin: '222222' },
	{ email: 'quality@example.com', name: 'Priya Castell', roles: ['quality'], pin: '333333' },
	{ email: 'admin@example.com', name: 'Sam Adeyemi', roles: ['admin'], pin: '444444' }
];

/** Idempotent: creates the demo people that are missing and leaves existing ones (and their changes) alone. */
export async function seedDemo(em: EntityManager): Promise<{ created: number }> {
	let created = 0;
	const passwordHash = await hashSecret(DEMO_PASSWORD);
	for (const person of DEMO_PEOPLE) {
		if (await em.findOne(User, { email: person.email })) continue;
		em.create(User, {
			id: crypto.randomUUID(),
			email: person.email,
			name: person.name,
			roles: person.roles,
			passwordHash,
			pinHash: await hashSecret(person.pin),
			pinChangedAt: new Date(),
			active: true,
			sessionVersion: 1
		});
		created++;
	}
	await em.flush();
	await seedDemoProcedures(em);
	await seedRegisters(em);
	// Eight weeks of signed history for search, lot trace, suspect tool and trends (Q2, issue 8).
	await seedHistory(em);
	// A run awaiting review with an open finding on an out-of-tolerance bore (Q1, issue 8).
	await seedQualityDemo(em);
	// Submitting the seeded records starts review mail after each commit; let it finish before callers close the ORM.
	await mailSettled();
	return { created };
}
