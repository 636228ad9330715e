/**
 * A CPU profile of the submit route's timed phase only (not the cluster start or the migrations):
 * `BENCH_RECORDS=4000 npx tsx tests/bench/profile-submit.ts` writes `PROF_OUT` (default /tmp/submit.cpuprofile),
 * to open in Chromium's DevTools (Performance → load profile). Not part of `npm run bench`.
 */
import { writeFileSync } from 'node:fs';
import { Session } from 'node:inspector/promises';
import { benchDb, closeBenchDb } from './bench-db';
import { submitThroughput } from './runner.bench';

const out = process.env.PROF_OUT ?? '/tmp/submit.cpuprofile';
const session = new Session();
session.connect();
await session.post('Profiler.enable');
await session.post('Profiler.setSamplingInterval', { interval: 200 });
try {
	const t = await submitThroughput(await benchDb(), Number(process.env.BENCH_RECORDS ?? 4000), async (phase) => {
		if (phase === 'submit') await session.post('Profiler.start');
		else writeFileSync(out, JSON.stringify((await session.post('Profiler.stop')).profile));
	});
	console.log(`${t.submitPerS.toFixed(0)} records/s vs ${t.insertPerS.toFixed(0)} INSERT/s; profile in ${out}`);
} finally {
	session.disconnect();
	await closeBenchDb();
}
