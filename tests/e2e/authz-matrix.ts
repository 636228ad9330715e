/**
 * The authorization matrix: every page, form action and JSON route × anonymous and each role → expected outcome.
 * tests/e2e/authz-matrix.spec.ts fails when a route in src/routes is missing here, then calls each as each role.
 *   ok        2xx
 *   allowed   reached the route's own logic (2xx, a redirect elsewhere than sign-in, 400 or 410 for empty input)
 *   signin    redirected to sign-in (pages and actions) · unauth: 401 (JSON routes)
 *   forbidden 403 · notfound 404
 * Add a row when you add a route; say in DEVELOPERS.md what each new role may do.
 */
export type Outcome = 'ok' | 'allowed' | 'signin' | 'unauth' | 'forbidden' | 'notfound';
export type Who = 'anonymous' | 'technician' | 'lead' | 'quality' | 'admin';

export interface MatrixRow {
	/** Route id as in src/routes, e.g. '/admin/people/[id]'. */
	route: string;
	/** 'GET' for a page, 'POST ?/name' for a form action ('POST ?/default' for the default), or a JSON method. */
	call: string;
	expect: Record<Who, Outcome>;
}

const everyone = (o: Outcome): Record<Who, Outcome> => ({ anonymous: o, technician: o, lead: o, quality: o, admin: o });
const signedIn = (
	roles: Partial<Record<Exclude<Who, 'anonymous'>, Outcome>>,
	other: Outcome = 'forbidden'
): Record<Who, Outcome> => ({
	anonymous: 'signin',
	technician: roles.technician ?? other,
	lead: roles.lead ?? other,
	quality: roles.quality ?? other,
	admin: roles.admin ?? other
});
const adminOnly = (o: Outcome) => signedIn({ admin: o });

export const MATRIX: MatrixRow[] = [
	{
		route: '/',
		call: 'GET',
		expect: signedIn({ technician: 'allowed', lead: 'allowed', quality: 'allowed', admin: 'allowed' })
	},
	{ route: '/signin', call: 'GET', expect: { ...everyone('allowed'), anonymous: 'ok' } },
	{ route: '/signin', call: 'POST ?/default', expect: everyone('allowed') },
	{ route: '/signout', call: 'GET', expect: everyone('allowed') },
	{ route: '/signout', call: 'POST ?/default', expect: { ...everyone('allowed'), anonymous: 'signin' } },
	{ route: '/welcome/[token]', call: 'GET', expect: everyone('ok') },
	{ route: '/welcome/[token]', call: 'POST ?/default', expect: everyone('allowed') },
	{ route: '/reset/[token]', call: 'GET', expect: everyone('ok') },
	{ route: '/reset/[token]', call: 'POST ?/password', expect: everyone('allowed') },
	{ route: '/reset/[token]', call: 'POST ?/pin', expect: everyone('allowed') },
	{ route: '/api/health', call: 'GET', expect: everyone('ok') },
	{ route: '/account', call: 'GET', expect: signedIn({ technician: 'ok', lead: 'ok', quality: 'ok', admin: 'ok' }) },
	{
		route: '/account',
		call: 'POST ?/pin',
		expect: signedIn({ technician: 'allowed', lead: 'allowed', quality: 'allowed', admin: 'allowed' })
	},
	{ route: '/bench', call: 'GET', expect: signedIn({ technician: 'ok', lead: 'ok' }) },
	{ route: '/library', call: 'GET', expect: signedIn({ lead: 'ok', quality: 'ok', admin: 'ok' }) },
	{ route: '/quality', call: 'GET', expect: signedIn({ quality: 'ok' }) },
	{ route: '/admin/people', call: 'GET', expect: adminOnly('ok') },
	{ route: '/admin/people', call: 'POST ?/invite', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'GET', expect: adminOnly('ok') },
	{ route: '/admin/people/[id]', call: 'POST ?/roles', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'POST ?/deactivate', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'POST ?/reactivate', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'POST ?/resetPassword', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'POST ?/resetPin', expect: adminOnly('allowed') },
	{ route: '/admin/log', call: 'GET', expect: adminOnly('ok') },
	{ route: '/dev/outbox', call: 'GET', expect: adminOnly('ok') }
];

/** Auth.js's own endpoints are closed to the network: sign-in goes only through the rate-limited action. */
export const CLOSED_PATHS = [
	'/auth/signin',
	'/auth/callback/credentials',
	'/auth/session',
	'/auth/csrf',
	'/auth/providers'
];
