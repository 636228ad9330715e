/**
 * A CPU profile of the submit route's timed phase only (not the cluster start or the migrations):
 * `BENCH_RECORDS=4000 npx tsx tests/bench/profile-submit.ts` writes `PROF_OUT` (default /tmp/submit.cpuprofile),
 * to open in Chromium's DevTools (Performance → load profile). Not part of `npm run bench`. It also prints the Node
 * CPU time per record over that phase; `PROF_OUT=` (empty) measures that without the profiler's own cost.
 */
import { writeFileSync } from 'node:fs';
import { Session } from 'node:inspector/promises';
import { benchDb, closeBenchDb } from './bench-db';
import { submitThroughput } from './runner.bench';

const out = process.env.PROF_OUT ?? '/tmp/submit.cpuprofile';
const profiling = out !== '';
const session = new Session();
session.connect();
await session.post('Profiler.enable');
await session.post('Profiler.setSamplingInterval', { interval: 200 });
try {
	let cpu0: NodeJS.CpuUsage | undefined;
	let cpu: NodeJS.CpuUsage | undefined;
	const t = await submitThroughput(await benchDb(), Number(process.env.BENCH_RECORDS ?? 4000), async (phase) => {
		if (phase === 'submit') {
			if (profiling) await session.post('Profiler.start');
			cpu0 = process.cpuUsage();
		} else {
			cpu = process.cpuUsage(cpu0);
			if (profiling) writeFileSync(out, JSON.stringify((await session.post('Profiler.stop')).profile));
		}
	});
	// Node CPU per stored record over the submit phase (the profiler's own sampling cost included).
	const us = (n: number) => (n / t.stored).toFixed(0);
	console.log(
		`${t.submitPerS.toFixed(0)} records/s vs ${t.ledgerInsertPerS.toFixed(0)} INSERT/s into ledger_record ` +
			`(ratio ${(t.submitPerS / t.ledgerInsertPerS).toFixed(3)}; bare copy ${t.insertPerS.toFixed(0)}/s, ` +
			`${(t.submitPerS / t.insertPerS).toFixed(3)}); Node CPU per record ${us(cpu!.user)} µs user + ` +
			`${us(cpu!.system)} µs system${profiling ? `; profile in ${out}` : ''}`
	);
} finally {
	session.disconnect();
	await closeBenchDb();
}
