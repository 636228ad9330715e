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
/** A JSON route: anonymous gets 401 instead of a sign-in redirect. */
const api = (roles: Parameters<typeof signedIn>[0], other?: Outcome) => ({
	...signedIn(roles, other),
	anonymous: 'unauth' as Outcome
});

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
	// Empty form: every role may upload for some purpose, so the missing purpose is a 400 before the per-purpose check.
	{
		route: '/api/images',
		call: 'POST',
		expect: {
			...signedIn({ technician: 'allowed', lead: 'allowed', quality: 'allowed', admin: 'allowed' }),
			anonymous: 'unauth'
		}
	},
	// [id] is a person's uuid here, never an image: signed-in people get 404, anonymous ones sign-in.
	{
		route: '/images/[id]',
		call: 'GET',
		expect: signedIn({ technician: 'notfound', lead: 'notfound', quality: 'notfound', admin: 'notfound' })
	},
	{ route: '/account', call: 'GET', expect: signedIn({ technician: 'ok', lead: 'ok', quality: 'ok', admin: 'ok' }) },
	{
		route: '/account',
		call: 'POST ?/pin',
		expect: signedIn({ technician: 'allowed', lead: 'allowed', quality: 'allowed', admin: 'allowed' })
	},
	{ route: '/bench', call: 'GET', expect: signedIn({ technician: 'ok', lead: 'ok' }) },
	// Enrolled tablets and the held-records queue (offline issue, O). Empty forms are 400 (allowed).
	{ route: '/bench/devices', call: 'GET', expect: signedIn({ lead: 'ok' }) },
	{ route: '/bench/devices', call: 'POST ?/enrol', expect: signedIn({ lead: 'allowed' }) },
	{ route: '/bench/devices', call: 'POST ?/revoke', expect: signedIn({ lead: 'allowed' }) },
	{ route: '/api/devices', call: 'GET', expect: api({ lead: 'ok', quality: 'ok', admin: 'ok' }) },
	{ route: '/quality/held', call: 'GET', expect: signedIn({ quality: 'ok' }) },
	{ route: '/quality/held', call: 'POST ?/resolve', expect: signedIn({ quality: 'allowed' }) },
	{ route: '/api/audit/held', call: 'GET', expect: api({ quality: 'ok' }) },
	// The shop CA and its install steps are public; the certificate itself exists only while HTTPS uses a generated CA.
	{ route: '/tls', call: 'GET', expect: everyone('ok') },
	{ route: '/tls/ca.crt', call: 'GET', expect: everyone('notfound') },
	{ route: '/library', call: 'GET', expect: signedIn({ technician: 'ok', lead: 'ok', quality: 'ok', admin: 'ok' }) },
	// Procedure library (issue 4). `[id]` is a person's id here, so no such procedure: allowed roles get 404.
	{ route: '/library', call: 'POST ?/importDemo', expect: signedIn({ lead: 'allowed', admin: 'allowed' }) },
	{ route: '/library/[id]', call: 'GET', expect: signedIn({}, 'notfound') },
	{ route: '/library/[id]', call: 'POST ?/submit', expect: signedIn({ lead: 'notfound', admin: 'notfound' }) },
	{ route: '/library/[id]', call: 'POST ?/approve', expect: signedIn({ lead: 'notfound', quality: 'notfound' }) },
	{
		route: '/library/[id]',
		call: 'POST ?/retire',
		expect: signedIn({ lead: 'notfound', quality: 'notfound', admin: 'notfound' })
	},
	{ route: '/library/[id]/edit', call: 'GET', expect: signedIn({ lead: 'notfound', admin: 'notfound' }) },
	{
		route: '/library/[id]/diff',
		call: 'GET',
		expect: signedIn({ lead: 'notfound', quality: 'notfound', admin: 'notfound' })
	},
	{ route: '/library/[id]/v/[number]/traveler', call: 'GET', expect: signedIn({}, 'notfound') },
	{ route: '/api/procedures', call: 'GET', expect: { ...signedIn({}, 'ok'), anonymous: 'unauth' } },
	{ route: '/api/procedures', call: 'POST', expect: api({ lead: 'allowed', admin: 'allowed' }) },
	{
		route: '/api/procedures/validate',
		call: 'POST',
		expect: api({ lead: 'allowed', quality: 'allowed', admin: 'allowed' })
	},
	{ route: '/api/procedures/import', call: 'POST', expect: api({ lead: 'allowed', admin: 'allowed' }) },
	{ route: '/api/procedures/[id]', call: 'GET', expect: api({}, 'notfound') },
	{
		route: '/api/procedures/[id]/draft',
		call: 'GET',
		expect: api({ lead: 'notfound', quality: 'notfound', admin: 'notfound' })
	},
	{ route: '/api/procedures/[id]/draft', call: 'POST', expect: api({ lead: 'allowed', admin: 'allowed' }) },
	{ route: '/api/procedures/[id]/submit', call: 'POST', expect: api({ lead: 'notfound', admin: 'notfound' }) },
	{ route: '/api/procedures/[id]/approve', call: 'POST', expect: api({ lead: 'allowed', quality: 'allowed' }) },
	{ route: '/api/procedures/[id]/versions', call: 'GET', expect: api({}, 'notfound') },
	{ route: '/api/procedures/[id]/versions/[number]', call: 'GET', expect: api({}, 'notfound') },
	{ route: '/api/procedures/[id]/versions/[number]/source', call: 'GET', expect: api({}, 'notfound') },
	{
		route: '/api/procedures/[id]/versions/[number]/retire',
		call: 'POST',
		expect: api({ lead: 'notfound', quality: 'notfound', admin: 'notfound' })
	},
	{
		route: '/api/procedures/[id]/diff',
		call: 'GET',
		expect: api({ lead: 'allowed', quality: 'allowed', admin: 'allowed' })
	},
	{ route: '/quality', call: 'GET', expect: signedIn({ quality: 'ok' }) },
	// Quality audit (issue 8). `[id]` is a person's id, so no such run: quality gets 404 on the run record, and quality
	// and admins get 404 from verify; verifying every run answers 200 with the counts.
	{ route: '/quality/runs/[id]', call: 'GET', expect: signedIn({ quality: 'notfound' }) },
	{ route: '/api/runs/[id]/verify', call: 'POST', expect: api({ quality: 'notfound', admin: 'notfound' }) },
	{ route: '/api/ledger/verify', call: 'POST', expect: api({ quality: 'ok', admin: 'ok' }) },
	// Findings, dispositions and release (issue 8, Q1): quality only. `[id]` is a person's id, so no such finding,
	// run or job: the pages and their form actions answer 404 (an action's refusal re-renders the page, whose load
	// finds nothing); the JSON routes check the body first, so an empty one is a 400. Per-record cases (a quality lead
	// deciding a finding they raised or worked on, releasing a run they signed in) are tests/integration/release.test.ts
	// and quality-release.spec.ts.
	{ route: '/quality/findings/[id]', call: 'GET', expect: signedIn({ quality: 'notfound' }) },
	{ route: '/quality/findings/[id]', call: 'POST ?/dispose', expect: signedIn({ quality: 'notfound' }) },
	{ route: '/quality/runs/[id]', call: 'POST ?/releaseRun', expect: signedIn({ quality: 'notfound' }) },
	{ route: '/quality/runs/[id]', call: 'POST ?/releaseJob', expect: signedIn({ quality: 'notfound' }) },
	{ route: '/api/findings', call: 'GET', expect: api({ quality: 'ok' }) },
	{ route: '/api/findings/[id]/disposition', call: 'POST', expect: api({ quality: 'allowed' }) },
	{ route: '/api/audit/runs/[id]/release', call: 'POST', expect: api({ quality: 'allowed' }) },
	{ route: '/api/audit/jobs/[id]/release', call: 'POST', expect: api({ quality: 'allowed' }) },
	// Search across runs, suspect tool and trends (issue 8, Q2): quality only. `[id]` is a person's id, so no such tool
	// (404); the JSON routes without their required parameter answer 400 (allowed), the search with none answers 200.
	{ route: '/quality/search', call: 'GET', expect: signedIn({ quality: 'ok' }) },
	{ route: '/quality/search/tool/[id]', call: 'GET', expect: signedIn({ quality: 'notfound' }) },
	{ route: '/quality/trends', call: 'GET', expect: signedIn({ quality: 'ok' }) },
	{ route: '/api/audit/runs', call: 'GET', expect: api({ quality: 'ok' }) },
	{ route: '/api/audit/suspect-tool', call: 'GET', expect: api({ quality: 'allowed' }) },
	{ route: '/api/audit/trends', call: 'GET', expect: api({ quality: 'allowed' }) },
	// Exports (issue 8, Q3): quality only; `[id]` is a person's id, so no such run. The customer's record is public:
	// an unknown token shows the "link does not work" page (200); its photo route answers 404.
	{ route: '/api/exports/runs/[id]/pdf', call: 'GET', expect: api({ quality: 'notfound' }) },
	{ route: '/api/exports/runs/[id]/csv', call: 'GET', expect: api({ quality: 'notfound' }) },
	{ route: '/quality/runs/[id]', call: 'POST ?/sendRecord', expect: signedIn({ quality: 'notfound' }) },
	{ route: '/record/[token]', call: 'GET', expect: everyone('ok') },
	{ route: '/record/[token]/photos/[id]', call: 'GET', expect: everyone('notfound') },
	{ route: '/admin/people', call: 'GET', expect: adminOnly('ok') },
	{ route: '/admin/people', call: 'POST ?/invite', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'GET', expect: adminOnly('ok') },
	{ route: '/admin/people/[id]', call: 'POST ?/roles', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'POST ?/deactivate', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'POST ?/reactivate', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'POST ?/resetPassword', expect: adminOnly('allowed') },
	{ route: '/admin/people/[id]', call: 'POST ?/resetPin', expect: adminOnly('allowed') },
	{ route: '/admin/log', call: 'GET', expect: adminOnly('ok') },
	{ route: '/dev/outbox', call: 'GET', expect: adminOnly('ok') },
	// Registers (issue 5): everyone reads jobs and tools; lead and admin edit; quality also moves job states.
	// `[id]` is a person's id here, so no such job/tool/part: readers get 404, also after an action on it (the page
	// re-renders and its load answers 404); an empty form elsewhere is a 400 (allowed).
	...registerRows(),
	// Runs and the ledger (issue 6). Empty body → 400 for the roles allowed; `[id]` is a person's id, so no such run.
	{ route: '/api/runs', call: 'POST', expect: api({ technician: 'allowed', lead: 'allowed', admin: 'allowed' }) },
	// R2: the run list (technicians their own runs), and a lead's PIN unlock from the runner (empty body → 400).
	{ route: '/api/runs', call: 'GET', expect: api({ technician: 'ok', lead: 'ok', quality: 'ok', admin: 'ok' }) },
	{
		route: '/api/runs/[id]/unlock',
		call: 'POST',
		expect: api({ technician: 'allowed', lead: 'allowed', quality: 'allowed' })
	},
	{ route: '/api/runs/[id]', call: 'GET', expect: api({}, 'notfound') },
	{ route: '/api/runs/[id]/runner', call: 'GET', expect: api({}, 'notfound') },
	{
		route: '/api/runs/[id]/records',
		call: 'POST',
		expect: api({ technician: 'allowed', lead: 'allowed', quality: 'allowed' })
	},
	// Photos offline (issue 7): a tablet's photo after its record; who may send records, on their runs — no such run.
	{
		route: '/api/runs/[id]/photos/[photoId]',
		call: 'PUT',
		expect: api({ technician: 'notfound', lead: 'notfound', quality: 'notfound' })
	},
	// The bench runner page: `[id]` is a person's id, so every reader gets 404.
	{ route: '/runs/[id]', call: 'GET', expect: signedIn({}, 'notfound') },
	// A lead's decision about a newer version (issue 4): only leads and admins, who then find no such run.
	{ route: '/runs/[id]', call: 'POST ?/continueOn', expect: signedIn({ lead: 'notfound', admin: 'notfound' }) },
	{ route: '/runs/[id]', call: 'POST ?/move', expect: signedIn({ lead: 'notfound', admin: 'notfound' }) },
	// Starting a run from the job page: technicians (for themselves), leads and admins; the made-up job id → 404.
	{
		route: '/jobs/[id]',
		call: 'POST ?/startRun',
		expect: signedIn({ technician: 'notfound', lead: 'notfound', admin: 'notfound' })
	}
];

function registerRows(): MatrixRow[] {
	const all = (o: Outcome) => ({ technician: o, lead: o, quality: o, admin: o });
	const editors = (o: Outcome) => ({ lead: o, admin: o });
	const office = (o: Outcome) => ({ lead: o, quality: o, admin: o });
	return [
		{ route: '/jobs', call: 'GET', expect: signedIn(all('ok')) },
		{ route: '/jobs/new', call: 'GET', expect: signedIn(editors('ok')) },
		{ route: '/jobs/new', call: 'POST ?/default', expect: signedIn(editors('allowed')) },
		{ route: '/jobs/[id]', call: 'GET', expect: signedIn(all('notfound')) },
		{ route: '/jobs/[id]', call: 'POST ?/state', expect: signedIn(office('notfound')) },
		{ route: '/jobs/[id]', call: 'POST ?/photos', expect: signedIn(editors('notfound')) },
		{ route: '/jobs/[id]/card', call: 'GET', expect: signedIn(all('notfound')) },
		{ route: '/tools', call: 'GET', expect: signedIn(all('ok')) },
		{ route: '/tools', call: 'POST ?/create', expect: signedIn(editors('allowed')) },
		{ route: '/tools/[id]', call: 'GET', expect: signedIn(all('notfound')) },
		{ route: '/tools/[id]', call: 'POST ?/calibration', expect: signedIn(editors('notfound')) },
		{ route: '/tools/[id]', call: 'POST ?/retire', expect: signedIn(editors('notfound')) },
		{ route: '/tools/[id]', call: 'POST ?/details', expect: signedIn(editors('notfound')) },
		{ route: '/parts', call: 'GET', expect: signedIn(office('ok')) },
		{ route: '/parts', call: 'POST ?/create', expect: signedIn(editors('allowed')) },
		{ route: '/parts/[id]', call: 'GET', expect: signedIn(office('notfound')) },
		{ route: '/parts/[id]', call: 'POST ?/lot', expect: signedIn(editors('notfound')) },
		{ route: '/qualifications', call: 'GET', expect: signedIn(office('ok')) },
		{ route: '/qualifications', call: 'POST ?/record', expect: signedIn(editors('allowed')) },
		{ route: '/qualifications', call: 'POST ?/revoke', expect: signedIn(editors('allowed')) },
		{ route: '/api/jobs', call: 'GET', expect: api(all('ok')) },
		{ route: '/api/jobs', call: 'POST', expect: api(editors('allowed')) },
		{ route: '/api/jobs/[id]', call: 'GET', expect: api(all('notfound')) },
		{ route: '/api/jobs/[id]/state', call: 'POST', expect: api(office('allowed')) },
		{ route: '/api/tools', call: 'GET', expect: api(all('ok')) },
		{ route: '/api/tools', call: 'POST', expect: api(editors('allowed')) },
		{ route: '/api/tools/[id]', call: 'GET', expect: api(all('notfound')) },
		{ route: '/api/tools/[id]/calibrations', call: 'POST', expect: api(editors('allowed')) },
		// Technicians read parts and lots here: part and fluid checkpoints pick a lot.
		{ route: '/api/parts', call: 'GET', expect: api(all('ok')) },
		{ route: '/api/parts', call: 'POST', expect: api(editors('allowed')) },
		{ route: '/api/people', call: 'GET', expect: api(office('ok')) }
	];
}

/** Auth.js's own endpoints are closed to the network: sign-in goes only through the rate-limited action. */
export const CLOSED_PATHS = [
	'/auth/signin',
	'/auth/callback/credentials',
	'/auth/session',
	'/auth/csrf',
	'/auth/providers'
];
