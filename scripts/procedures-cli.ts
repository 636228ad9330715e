/**
 * Procedure linter.
 *
 *   npm run procedures -- check <file.md ...> [--json]
 *
 * Prints `file:line:col error|warning message` per problem; exit 1 when any file has errors,
 * 2 for a usage problem or a file that cannot be read, 0 otherwise. `--json` prints
 * `[{ file, errors, warnings, steps: [{ title, checkpoints: [{ id, kind, limits }] }] }]`
 * where limits are `{ min, max, unit }` as decimal strings in the spec's unit ("25.021", "mm").
 */
import { readFileSync } from 'node:fs';
import { parse } from '../src/lib/procedure/parse';
import type { Checkpoint, LimitsJson } from '../src/lib/procedure/model';

interface JsonLimits {
	min: string | null;
	max: string | null;
	unit: string;
}

/** The limits the CLI reports per checkpoint kind (null when the kind has none). */
function limitsOf(cp: Checkpoint): JsonLimits | null {
	const j = (l: LimitsJson): JsonLimits => ({ min: l.min ?? null, max: l.max ?? null, unit: l.unit });
	switch (cp.kind) {
		case 'torque':
		case 'clearance':
			return j(cp.limits);
		case 'measure':
			return j(cp.stages[0].limits);
		case 'fluid':
			return cp.amount ? j(cp.amount) : cp.level?.temperature ? j(cp.level.temperature) : null;
		case 'test':
			return cp.value ? j(cp.value) : null;
		default:
			return null;
	}
}

function usage(message: string): never {
	process.stderr.write(`${message}\nUsage: npm run procedures -- check <file.md ...> [--json]\n`);
	process.exit(2);
}

function main(argv: string[]): number {
	const json = argv.includes('--json');
	const args = argv.filter((a) => a !== '--json');
	const [command, ...files] = args;
	if (command !== 'check') usage(command ? `Unknown command "${command}".` : 'No command given.');
	if (files.length === 0) usage('No files given.');

	let anyErrors = false;
	let unreadable = false;
	const report: unknown[] = [];
	for (const file of files) {
		let source: string;
		try {
			source = readFileSync(file, 'utf8');
		} catch (e) {
			const code = (e as NodeJS.ErrnoException).code;
			process.stderr.write(
				`${file}: ${code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a file' : `cannot be read (${code ?? String(e)})`}\n`
			);
			unreadable = true;
			continue;
		}
		const r = parse(source);
		if (r.errors.length) anyErrors = true;
		if (json) {
			report.push({
				file,
				errors: r.errors.map(({ line, column, message }) => ({ line, column, message })),
				warnings: r.warnings.map(({ line, column, message }) => ({ line, column, message })),
				steps: (r.procedure?.steps ?? []).map((s) => ({
					title: s.title,
					checkpoints: s.checkpoints.map((c) => ({ id: c.id, kind: c.kind, limits: limitsOf(c) }))
				}))
			});
		} else {
			for (const p of r.errors) process.stdout.write(`${file}:${p.line}:${p.column} error ${p.message}\n`);
			for (const p of r.warnings) process.stdout.write(`${file}:${p.line}:${p.column} warning ${p.message}\n`);
			if (!r.errors.length && !r.warnings.length) {
				const n = r.procedure?.steps.reduce((a, s) => a + s.checkpoints.length, 0) ?? 0;
				process.stdout.write(`${file}: ok (${r.procedure?.steps.length ?? 0} steps, ${n} checkpoints)\n`);
			}
		}
	}
	if (json) process.stdout.write(JSON.stringify(report, null, 2) + '\n');
	if (unreadable) return 2;
	return anyErrors ? 1 : 0;
}

process.exitCode = main(process.argv.slice(2));
