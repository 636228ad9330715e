/**
 * Benchmark runner: `npm run bench`. Imports each bench module and runs its cases in this one
 * process, printing the median of several timed runs. Not a test: it reports, it does not fail.
 * To add a bench, write `tests/bench/<name>.bench.ts` exporting `title` and `main(medianMs)`,
 * and list it in `modules` below. Benches that need PostgreSQL share one cluster (`bench-db.ts`).
 */
import { onInterrupt, signalExitCode } from '../../scripts/lib/interrupt';
import * as audit from './audit.bench';
import { closeBenchDb } from './bench-db';
import * as offline from './offline.bench';
import * as procedure from './procedure.bench';
import * as runner from './runner.bench';

export interface BenchModule {
	title: string;
	main(measure: typeof medianMs): Promise<void> | void;
}

/** Median wall time in ms of `runs` calls of `fn`, after `warmup` untimed calls. */
export async function medianMs(fn: () => unknown, runs = 7, warmup = 2): Promise<number> {
	for (let i = 0; i < warmup; i++) await fn();
	const times: number[] = [];
	for (let i = 0; i < runs; i++) {
		const t0 = performance.now();
		await fn();
		times.push(performance.now() - t0);
	}
	times.sort((a, b) => a - b);
	return times[Math.floor(times.length / 2)];
}

const modules: BenchModule[] = [procedure, runner, offline, audit];
/** `BENCH_ONLY=runner` (comma-separated words) runs only the modules whose title has one of them (iterating). */
const only = process.env.BENCH_ONLY?.split(',').map((w) => w.trim().toLowerCase());

// Ctrl-C or `kill` in the middle of a bench (a 1M-record load takes minutes): stop the shared cluster, then exit.
onInterrupt((signal) => {
	console.error(`\n${signal}: stopping the bench cluster…`);
	// Stopping the cluster fails the queries in flight; their errors must not end the process before it is deleted.
	process.on('uncaughtException', () => undefined).on('unhandledRejection', () => undefined);
	void closeBenchDb().finally(() => process.exit(signalExitCode(signal)));
});

try {
	for (const m of modules.filter((x) => !only || only.some((w) => x.title.toLowerCase().includes(w)))) {
		console.log(`\n== ${m.title}`);
		await m.main(medianMs);
	}
} finally {
	await closeBenchDb(); // the PostgreSQL cluster the database benches share
}
