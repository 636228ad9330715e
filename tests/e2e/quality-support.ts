/**
 * Helpers shared by the quality desk's browser tests (quality*.spec.ts). Demo data: the invented Kestrel Lane shop
 * and its invented KTX-7 procedures (procedures/*.md; not service data). Tomas Reyna (tech@example.com, demo PIN
 * 111111) holds the training the bore step needs.
 */
import { expect, type Browser, type Page } from '@playwright/test';
import { uuidv7 } from '../../src/lib/ledger/uuid-v7';
import { DEMO, ownerQuery, signIn } from './support';

export const TECH_NAME = 'Tomas Reyna';
export const TECH_PIN = '111111';

/** A fresh browser context signed in as `email`. */
export async function as(browser: Browser, email: string, viewport?: { width: number; height: number }): Promise<Page> {
	const page = await (await browser.newContext(viewport ? { viewport } : {})).newPage();
	await signIn(page, email);
	await expect(page).not.toHaveURL(/\/signin/);
	return page;
}

export interface BoreRun {
	runId: string;
	jobId: string;
	jobNumber: string;
	techId: string;
}

/** Through the API: the lead starts a bore-inspection run on the demo job "Harsh 2–3 upshift." for the technician. */
export async function startBoreRun(browser: Browser): Promise<BoreRun> {
	const [job] = await ownerQuery<{ id: string; job_number: string }>(
		`select id, job_number from job where complaint = $1`,
		['Harsh 2–3 upshift.']
	);
	const [version] = await ownerQuery<{ id: string; content_hash: string }>(
		`select v.id, v.content_hash from procedure_version v join procedure p on p.id = v.procedure_id
		 where p.title ilike '%shift-piston bore inspection%' and v.retired_at is null order by v.number desc limit 1`
	);
	const [tech] = await ownerQuery<{ id: string }>(`select id from app_user where email = $1`, [DEMO.technician.email]);
	const lead = await as(browser, DEMO.lead.email);
	const started = await lead.request.post('/api/runs', {
		data: { jobId: job.id, procedureVersionId: version.id, contentHash: version.content_hash, assignedToId: tech.id }
	});
	expect(started.status(), await started.text()).toBe(201);
	const runId = ((await started.json()) as { id: string }).id;
	await lead.context().close();
	return { runId, jobId: job.id, jobNumber: job.job_number, techId: tech.id };
}

/** Through the API: the technician signs one record (`kind` + `body`) on the run; the server must accept it. */
export async function recordAsTechnician(
	browser: Browser,
	run: BoreRun,
	record: { id?: string; kind: string; body: Record<string, unknown>; deviceId: string }
): Promise<void> {
	const bench = await as(browser, DEMO.technician.email);
	const sent = await bench.request.post(`/api/runs/${run.runId}/records`, {
		data: {
			records: [
				{
					id: record.id ?? uuidv7(),
					runId: run.runId,
					kind: record.kind,
					body: record.body,
					signer: { id: run.techId, role: 'technician' },
					deviceId: record.deviceId
				}
			],
			pins: { [run.techId]: TECH_PIN }
		}
	});
	const answers = (await sent.json()) as { answers?: { status: string; reason?: string }[] };
	expect(answers.answers?.[0], JSON.stringify(answers)).toMatchObject({ status: 'accepted' });
	await bench.context().close();
}

/**
 * A run under way with one bore attempt inside the limits: bore 1 is 22 mm H7 = 22.000–22.021 mm (ISO 286-2: IT7 for
 * 18–30 mm is 21 µm, H puts EI at 0), so 22.013 mm is inside.
 */
export async function runWithBoreAttempt(browser: Browser, deviceId: string): Promise<BoreRun> {
	const run = await startBoreRun(browser);
	await recordAsTechnician(browser, run, {
		kind: 'attempt',
		body: {
			stepIndex: 2,
			entries: [
				{
					checkpointId: 'bore-1',
					entry: { stage: 'standard', zeroed: true, readings: ['22.013', '22.012', '22.011', '22.012'] }
				}
			]
		},
		deviceId
	});
	return run;
}
