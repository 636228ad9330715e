import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { expect, request as newRequest, test, type APIRequestContext, type APIResponse } from '@playwright/test';
import { CLOSED_PATHS, MATRIX, type Outcome, type Who } from './authz-matrix';
import { DEMO, DEMO_PASSWORD, makePerson } from './support';

const routesDir = join(import.meta.dirname, '..', '..', 'src', 'routes');

/** Every page, form action and JSON method that src/routes defines, as `route call` strings. */
function definedCalls(): string[] {
	const calls: string[] = [];
	const walk = (dir: string) => {
		for (const name of readdirSync(dir)) {
			const path = join(dir, name);
			if (statSync(path).isDirectory()) walk(path);
			else {
				const route = '/' + relative(routesDir, dir).split('\\').join('/');
				const id = route === '/' ? '/' : route.replace(/\/$/, '');
				const src = readFileSync(path, 'utf8');
				if (name === '+page.svelte') calls.push(`${id} GET`);
				if (name === '+server.ts')
					for (const m of src.matchAll(/export const (GET|POST|PUT|PATCH|DELETE)\b/g)) calls.push(`${id} ${m[1]}`);
				if (name === '+page.server.ts') {
					const block = src.match(/export const actions = \{([\s\S]*?)\n\};/);
					if (block) for (const m of block[1].matchAll(/^\t(\w+): /gm)) calls.push(`${id} POST ?/${m[1]}`);
					if (/export const load/.test(src) && !existsPage(dir)) calls.push(`${id} GET`);
				}
			}
		}
	};
	const existsPage = (dir: string) => readdirSync(dir).includes('+page.svelte');
	walk(routesDir);
	return [...new Set(calls)].sort();
}

test('every route, form action and JSON method is in the authorization matrix', () => {
	const listed = new Set(MATRIX.map((r) => `${r.route} ${r.call}`));
	const missing = definedCalls().filter((c) => !listed.has(c));
	expect(missing, 'add these to tests/e2e/authz-matrix.ts').toEqual([]);
	const stale = [...listed].filter((c) => !definedCalls().includes(c));
	expect(stale, 'these rows name routes that no longer exist').toEqual([]);
});

function classify(res: APIResponse): Outcome | `status ${number}` {
	const status = res.status();
	const location = res.headers()['location'] ?? '';
	if (status === 401) return 'unauth';
	if (status === 403) return 'forbidden';
	if (status === 404) return 'notfound';
	if (status >= 300 && status < 400 && location.startsWith('/signin')) return 'signin';
	if (status >= 200 && status < 300) return 'ok';
	if ((status >= 300 && status < 400) || status === 400 || status === 410) return 'allowed';
	return `status ${status}`;
}

const matches = (got: ReturnType<typeof classify>, want: Outcome) =>
	got === want || (want === 'allowed' && got === 'ok');

test.describe('each call as each role', () => {
	const contexts = new Map<Who, APIRequestContext>();
	let params: Record<string, string>;

	test.beforeAll(async ({ baseURL }) => {
		const target = await makePerson(['technician']);
		params = { '[id]': target.id, '[token]': 'no-such-token-0000000000000000000000000000' };
		contexts.set('anonymous', await newRequest.newContext({ baseURL }));
		for (const [role, who] of Object.entries(DEMO)) {
			const ctx = await newRequest.newContext({ baseURL });
			const res = await ctx.post('/signin', {
				form: { email: who.email, password: DEMO_PASSWORD, redirectTo: '/' },
				headers: { origin: baseURL!, accept: 'text/html' },
				maxRedirects: 0
			});
			expect(res.status(), `${role} signs in`).toBe(302);
			contexts.set(role as Who, ctx);
		}
	});
	test.afterAll(async () => {
		for (const ctx of contexts.values()) await ctx.dispose();
	});

	for (const row of MATRIX) {
		test(`${row.call} ${row.route}`, async ({ baseURL }) => {
			const path = row.route.replace(/\[\w+\]/g, (p) => params[p]);
			const wrong: string[] = [];
			for (const [who, want] of Object.entries(row.expect) as [Who, Outcome][]) {
				// signout would end the shared session of this role; it gets a context of its own.
				const ctx =
					row.route === '/signout' && who !== 'anonymous' ? await freshSession(baseURL!, who) : contexts.get(who)!;
				const res =
					row.call === 'GET'
						? await ctx.get(path, { maxRedirects: 0 })
						: ['PUT', 'PATCH', 'DELETE'].includes(row.call)
							? await ctx.fetch(path, { method: row.call, data: '', headers: { origin: baseURL! }, maxRedirects: 0 })
							: await ctx.post(row.call === 'POST ?/default' ? path : `${path}${row.call.slice(5)}`, {
									form: {},
									headers: { origin: baseURL!, accept: 'text/html' },
									maxRedirects: 0
								});
				const got = classify(res);
				if (!matches(got, want)) wrong.push(`${who}: expected ${want}, got ${got}`);
			}
			expect(wrong).toEqual([]);
		});
	}

	test('Auth.js endpoints are closed to everyone', async ({ baseURL }) => {
		for (const [who, ctx] of contexts) {
			for (const path of CLOSED_PATHS) {
				expect((await ctx.get(path, { maxRedirects: 0 })).status(), `${who} GET ${path}`).toBe(404);
				expect(
					(
						await ctx.post(path, { form: {}, headers: { origin: baseURL!, accept: 'text/html' }, maxRedirects: 0 })
					).status(),
					`${who} POST ${path}`
				).toBe(404);
			}
		}
	});
});

async function freshSession(baseURL: string, who: Exclude<Who, 'anonymous'>): Promise<APIRequestContext> {
	const ctx = await newRequest.newContext({ baseURL });
	await ctx.post('/signin', {
		form: { email: DEMO[who].email, password: DEMO_PASSWORD, redirectTo: '/' },
		headers: { origin: baseURL, accept: 'text/html' },
		maxRedirects: 0
	});
	return ctx;
}
