import { expect, test, type APIRequestContext, type APIResponse, type Browser, type Page } from '@playwright/test';
import { oneBoreSource } from './bore-procedure';
import { DEMO, ownerQuery, signIn } from './support';

// A newer version published while a run is in progress (issue 4). The procedure is invented for this test.
const source = (title: string, extra = '') => oneBoreSource(title, 'Check bore 1 of the valve body.', extra);

async function asPerson(browser: Browser, email: string): Promise<Page> {
	const page = await (await browser.newContext()).newPage();
	await signIn(page, email);
	await expect(page).not.toHaveURL(/\/signin/);
	return page;
}

async function ok(res: Promise<APIResponse>) {
	const r = await res;
	expect(r.status(), await r.text()).toBeLessThan(300);
	return r;
}

async function publish(lead: APIRequestContext, quality: APIRequestContext, id: string, note: string) {
	await ok(lead.post(`/api/procedures/${id}/submit`));
	await ok(quality.post(`/api/procedures/${id}/approve`, { data: { changeNote: note } }));
}

test('a lead sees the newer version on a run in progress and moves the run to it', async ({ browser }) => {
	test.setTimeout(90_000);
	const title = `Bore check ${Date.now().toString(36)}`;
	const lead = await asPerson(browser, DEMO.lead.email);
	const quality = await asPerson(browser, DEMO.quality.email);
	const created = await ok(lead.request.post('/api/procedures', { data: { source: source(title) } }));
	const { id } = (await created.json()) as { id: string };
	await publish(lead.request, quality.request, id, 'First issue.');

	const [job] = await ownerQuery<{ id: string }>(`select id from job where complaint = $1`, ['Harsh 2–3 upshift.']);
	await lead.goto(`/jobs/${job.id}`);
	await lead.getByLabel('Procedure (published version)').selectOption({ label: `${title} · version 1` });
	await lead.getByLabel('Assign to').selectOption({ label: 'Tomas Reyna' });
	await lead.getByRole('button', { name: 'Start run' }).click();
	await expect(lead).toHaveURL(/\/runs\/[0-9a-f-]{36}$/);
	const oldRun = lead.url();
	await expect(lead.getByText('A newer version was published')).toHaveCount(0);

	await ok(
		lead.request.post(`/api/procedures/${id}/draft`, {
			data: { source: source(title, '\nWipe the bore with a lint-free cloth first.\n') }
		})
	);
	await publish(lead.request, quality.request, id, 'Clean the bore before measuring.');
	await lead.reload();
	await expect(
		lead.getByText(
			/Version 2 of this procedure was published on \d{4}-\d{2}-\d{2} at \d{2}:\d{2} UTC \(change note: Clean the bore before measuring\.\)\. This run stays on version 1 until a lead decides\./
		)
	).toBeVisible();
	await expect(lead.getByRole('button', { name: 'Continue on v1' })).toBeVisible();
	// The quality lead reads the notice but does not decide.
	await quality.goto(oldRun);
	await expect(quality.getByText(/This run stays on version 1 until a lead decides/)).toBeVisible();
	await expect(quality.getByRole('button', { name: 'Move to v2' })).toHaveCount(0);

	await lead.getByRole('button', { name: 'Move to v2' }).click();
	await expect(lead).not.toHaveURL(oldRun);
	await expect(lead).toHaveURL(/\/runs\/[0-9a-f-]{36}$/);
	await expect(lead.getByText(/Version 2$/)).toBeVisible();
	const newRun = lead.url().split('/').at(-1)!;
	await lead.goto(oldRun);
	const moved = lead.getByRole('paragraph').filter({ hasText: 'moved this run to version 2 on' });
	await expect(moved).toContainText('no more records can be made on it.');
	await expect(lead.getByRole('link', { name: `Moved to run ${newRun.slice(0, 8)}` })).toHaveAttribute(
		'href',
		`/runs/${newRun}`
	);
	await expect(lead.getByRole('button', { name: 'Sign this step' })).toHaveCount(0);
	await lead.goto(`/jobs/${job.id}`);
	await expect(lead.locator('li', { has: lead.locator(`a[href="/runs/${oldRun.split('/').at(-1)}"]`) })).toContainText(
		'moved to version 2'
	);
});
