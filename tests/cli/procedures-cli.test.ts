import { execFile } from 'node:child_process';
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';

const root = join(import.meta.dirname, '..', '..');
const tsx = join(root, 'node_modules', 'tsx', 'dist', 'cli.mjs');

async function cli(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
	try {
		const { stdout, stderr } = await promisify(execFile)(
			process.execPath,
			[tsx, 'scripts/procedures-cli.ts', ...args],
			{ cwd: root }
		);
		return { code: 0, stdout, stderr };
	} catch (e) {
		const err = e as { code: number; stdout: string; stderr: string };
		return { code: err.code, stdout: err.stdout, stderr: err.stderr };
	}
}

const BAD = [
	'---',
	'title: Bore check',
	'family: KTX-7',
	'purpose: Test',
	'---',
	'## Measure',
	'',
	'```measure bore-1',
	'nominal: 18 mm',
	'tolerance: H77',
	'```',
	''
].join('\n');
const GOOD = BAD.replace('H77', 'H7');

describe('npm run procedures -- check', () => {
	it('passes the demo procedures with exit 0', async () => {
		const res = await cli(
			'check',
			'procedures/ktx7-valve-body-bore-inspection.md',
			'procedures/ktx7-filters-pan-refill.md',
			'procedures/ktx7-pressure-sensor.md'
		);
		expect(res.code).toBe(0);
	});

	it('prints file:line:col and exits 1 on an error', async () => {
		const dir = await mkdtemp(join(tmpdir(), 'bs-cli-'));
		const file = join(dir, 'bad.md');
		await writeFile(file, BAD);
		const res = await cli('check', file);
		expect(res.code).toBe(1);
		expect(res.stdout + res.stderr).toContain(
			`${file}:10:1 error Step 1, checkpoint bore-1: "H77" is not a tolerance class`
		);
	});

	it('prints computed limits as JSON: 18 H7 → 18.000 / 18.018 mm (ISO 286-2:2010 table 17, from memory)', async () => {
		const dir = await mkdtemp(join(tmpdir(), 'bs-cli-'));
		const file = join(dir, 'good.md');
		await writeFile(file, GOOD);
		const res = await cli('check', '--json', file);
		expect(res.code).toBe(0);
		const out = JSON.parse(res.stdout) as {
			file: string;
			errors: unknown[];
			steps: { checkpoints: { id: string; kind: string; limits: unknown }[] }[];
		}[];
		expect(out[0].errors).toEqual([]);
		expect(out[0].steps[0].checkpoints[0]).toEqual({
			id: 'bore-1',
			kind: 'measure',
			limits: { min: '18', max: '18.018', unit: 'mm' }
		});
	});

	it('exits 2 for a missing file', async () => {
		const res = await cli('check', 'procedures/no-such-file.md');
		expect(res.code).toBe(2);
	});
});
