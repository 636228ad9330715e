import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import type { MikroORM } from '@mikro-orm/postgresql';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IUser } from '../../src/lib/server/db/entities';
import * as anchors from '../../src/lib/server/repositories/anchors';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { verifyRun } from '../../src/lib/server/services/audit.service';
import { exportRunCsv, exportRunPdf } from '../../src/lib/server/services/exports.service';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { makePerson } from '../factories/people';
import { boreAttempt, makeRun, PIN, record } from '../factories/runs';
import { migratedAppOrm } from './support/orm';

const run = promisify(execFile);
const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

/** Text of a PDF as Debian's poppler-utils extracts it. */
async function pdfText(bytes: Uint8Array): Promise<string> {
	const dir = await mkdtemp(join(tmpdir(), 'q3-pdf-'));
	try {
		await writeFile(join(dir, 'r.pdf'), bytes);
		return (await run('/usr/bin/pdftotext', ['-layout', join(dir, 'r.pdf'), '-'])).stdout;
	} finally {
		await rm(dir, { recursive: true, force: true });
	}
}

describe('exports of the run record', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	/** 22 mm H7 = 22.000–22.021 mm (ISO 286-2: IT7 for 18–30 mm is 21 µm, EI = 0): 22.010 passes, 22.030 fails. */
	async function runWith(findingText: string) {
		const made = await makeRun(orm.em.fork());
		const batch = submitBatchSchema.parse({
			records: [
				record(made.runId, made.tech, 'attempt', boreAttempt('22.010')),
				record(made.runId, made.tech, 'attempt', boreAttempt('22.030', 'fail')),
				record(made.runId, made.tech, 'finding', { stepIndex: 0, text: findingText })
			],
			pins: { [made.tech.id]: PIN }
		});
		const r = await submitRecords(orm.em.fork(), viewer(made.tech), made.runId, batch);
		if (!r.ok) throw new Error(r.message);
		expect(r.value.answers.map((a) => a.status)).toEqual(['accepted', 'accepted', 'accepted']);
		return made;
	}

	it('the PDF shows signers, readings against limits and the chain head; its sha256 is in an export record', async () => {
		const made = await runWith('Light scoring in bore 1.');
		const quality = await makePerson(orm.em.fork(), { roles: ['quality'], name: 'Quinn Auditor' });
		const before = await ledger.listForRun(orm.em.fork(), made.runId);
		const head = before.at(-1)!.hash;

		const result = await exportRunPdf(orm.em.fork(), quality, made.runId, new Date('2026-12-02T08:00:00Z'));
		if (!result.ok) throw new Error(result.message);
		const text = await pdfText(result.value.bytes);
		expect(text).toContain('Test Technician (technician)');
		expect(text).toContain('22.01 mm');
		expect(text).toContain('22.03 mm');
		expect(text).toContain('22.03 mm · limits 22 to 22.021 mm · fail');
		expect(text).toContain('Light scoring in bore 1.');
		expect(text).toContain('Chain head after 3 records');
		expect(text).toContain(head);
		expect(result.value).toMatchObject({ head, count: 3 });

		const after = await ledger.listForRun(orm.em.fork(), made.runId);
		expect(after).toHaveLength(4);
		const exp = after[3];
		expect(exp.kind).toBe('export');
		expect(exp.id).toBe(result.value.recordId);
		expect(exp.prevHash).toBe(head);
		const body = exp.body as { sha256: string; head: string; count: number; format: string };
		expect(body).toMatchObject({ format: 'pdf', head, count: 3 });
		expect(body.sha256).toBe(createHash('sha256').update(result.value.bytes).digest('hex'));

		const anchored = await anchors.listForRun(orm.em.fork(), made.runId);
		expect(anchored.map((a) => [a.recordedIn, a.head, a.count])).toEqual([['manual', head, 3]]);
		expect(await verifyRun(orm.em.fork(), made.runId)).toMatchObject({ ok: true, count: 4, anchors: 1 });
	});

	it('a run with no records is refused with the reason, and nothing is appended', async () => {
		const made = await makeRun(orm.em.fork());
		const quality = await makePerson(orm.em.fork(), { roles: ['quality'] });
		const result = await exportRunPdf(orm.em.fork(), quality, made.runId);
		expect(result).toMatchObject({ ok: false, status: 409, message: expect.stringMatching(/no records/) });
		expect(await ledger.listForRun(orm.em.fork(), made.runId)).toHaveLength(0);
		expect(await exportRunPdf(orm.em.fork(), quality, crypto.randomUUID())).toMatchObject({ status: 404 });
	});

	it('the CSV lists each reading and neutralises text starting with =, +, - or @', async () => {
		const made = await runWith('=HYPERLINK("http://example.com","x")');
		const second = await submitRecords(
			orm.em.fork(),
			viewer(made.tech),
			made.runId,
			submitBatchSchema.parse({
				records: ['+1+1', '-2+3', '@SUM(A1)'].map((text) =>
					record(made.runId, made.tech, 'finding', { stepIndex: 0, text })
				),
				pins: { [made.tech.id]: PIN }
			})
		);
		expect(second.ok && second.value.answers.every((a) => a.status === 'accepted')).toBe(true);

		const result = await exportRunCsv(orm.em.fork(), made.runId);
		if (!result.ok) throw new Error(result.message);
		const parsed = Papa.parse<Record<string, string>>(result.value.csv, { header: true, skipEmptyLines: true });
		const texts = parsed.data.filter((r) => r.kind === 'finding').map((r) => r.text);
		// papaparse 5.7 escapeFormulae: a leading =, +, -, @ gets a ' in front (OWASP "CSV Injection" advice).
		expect(texts).toEqual(['\'=HYPERLINK("http://example.com","x")', "'+1+1", "'-2+3", "'@SUM(A1)"]);
		const readings = parsed.data.filter((r) => r.checkpoint === 'bore-1').map((r) => [r.value, r.reading_status]);
		expect(readings).toEqual([
			['22.01 mm', 'pass'],
			['22.03 mm', 'fail']
		]);
		expect(parsed.data[0].signer).toBe('Test Technician');
	});
});
