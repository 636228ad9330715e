import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { expect, type Page } from '@playwright/test';
import { withClient } from '../../scripts/lib/postgres';
import { hashSecret } from '../../src/lib/server/passwords';

export const DEMO_PASSWORD = 'bench-demo';
export const REFUSED = /did not sign you in/;

/** The demo people and where each lands: invented people of the invented demo shop (src/lib/server/db/seed.ts). */
export const DEMO = {
	technician: {
		email: 'tech@example.com',
		home: '/bench',
		nav: ['Bench', 'Procedures', 'Jobs', 'Tools', 'My account']
	},
	lead: {
		email: 'lead@example.com',
		home: '/library',
		nav: ['Bench', 'Procedures', 'Jobs', 'Tools', 'Parts', 'Training', 'Tablets', 'My account']
	},
	quality: {
		email: 'quality@example.com',
		home: '/quality',
		nav: ['Procedures', 'Jobs', 'Tools', 'Parts', 'Training', 'Quality', 'Held records', 'My account']
	},
	admin: {
		email: 'admin@example.com',
		home: '/admin/people',
		nav: ['Procedures', 'Jobs', 'Tools', 'Parts', 'Training', 'People', 'Admin log', 'Outbox', 'My account']
	}
} as const;

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD, from = '/signin') {
	await page.goto(from);
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password', { exact: true }).fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
}

export async function navLabels(page: Page): Promise<string[]> {
	const nav = page.getByRole('navigation', { name: 'Main' });
	await expect(nav).toBeVisible();
	return (await nav.getByRole('link').allInnerTexts()).map((t) => t.trim());
}

const ownerUrl = () => {
	const url = process.env.E2E_OWNER_DATABASE_URL;
	if (!url) throw new Error('E2E_OWNER_DATABASE_URL is not set: run the browser tests through `npm test`.');
	return url;
};

let made = 0;
/** A person of our own, straight into the database, for tests that lock or deactivate someone. */
export async function makePerson(
	roles: string[],
	password = 'a test password'
): Promise<{ id: string; email: string; password: string }> {
	made += 1;
	const id = crypto.randomUUID();
	const email = `e2e-${made}-${Date.now().toString(36)}@shop.example`;
	const hash = await hashSecret(password);
	await withClient(ownerUrl(), (c) =>
		c.query(
			`insert into app_user (id, email, name, roles, password_hash, pin_hash, active, session_version, created_at, updated_at)
			 values ($1, $2, $3, $4, $5, $5, true, 1, now(), now())`,
			// Unique across spec files (each has its own counter), so a name picks one person in any list.
			[id, email, `E2E Person ${made}-${id.slice(0, 4)}`, roles, hash]
		)
	);
	return { id, email, password };
}

export function ownerQuery<R>(sql: string, values: unknown[] = []): Promise<R[]> {
	return withClient(ownerUrl(), async (c) => (await c.query<R>(sql, values)).rows);
}

/** Mail captured by the app's stand-in SMTP server, newest first, waiting up to `timeoutMs` for a match. */
export async function waitForMail(to: string, timeoutMs = 10_000): Promise<{ subject: string; text: string }> {
	const dir = process.env.E2E_MAIL_DIR;
	if (!dir) throw new Error('E2E_MAIL_DIR is not set');
	const until = Date.now() + timeoutMs;
	while (Date.now() < until) {
		const names = await readdir(dir).catch(() => [] as string[]);
		for (const n of names.filter((x) => x.endsWith('.json'))) {
			const mail = JSON.parse(await readFile(join(dir, n), 'utf8')) as { to: string[]; subject: string; text: string };
			if (mail.to.includes(to)) return mail;
		}
		await new Promise((r) => setTimeout(r, 200));
	}
	throw new Error(`no mail to ${to} within ${timeoutMs} ms`);
}

export const linkIn = (text: string, path: string) => {
	const m = text.match(new RegExp(`https?://[^\\s]+${path}/[A-Za-z0-9_-]+`));
	if (!m) throw new Error(`no ${path} link in: ${text}`);
	return m[0];
};
