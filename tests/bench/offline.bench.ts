/**
 * The offline bench's numbers (issue 7), from one run on the bench cluster (`bench-db.ts`):
 * - a tablet holding `BENCH_OUTBOX` (default 500) records signed offline drains them: the real outbox
 *   (`$lib/client/outbox` on fake-indexeddb) and `syncOnce`, whose `fetchBatch` does what `POST /api/runs/:id/records`
 *   does — JSON in, `submitBatchSchema`, `submitRecords`, JSON out — in this process. Each record carries the
 *   tablet's ECDSA P-256 signature and the offline grant the server sealed when the signer's PIN was checked online,
 *   so the server verifies both per record, as on a real resync. Reported: wall time, records per second, and the
 *   share of it spent in the server call;
 * - device-signature verifications per second (`verifyDeviceSignature`: canonical payload + ECDSA P-256 verify with
 *   node:crypto Web Crypto, key imported once), one at a time as the submit loop does and 16 at a time, against
 *   plain sha256 of the same payload text; and `checkSubmission` (the device looked up in PostgreSQL, then verified).
 */
import 'fake-indexeddb/auto';
import { hash } from '@node-rs/argon2';
import { openOfflineStore } from '../../src/lib/client/offline-store';
import { enqueue, listOutbox, seededRandom, type OutboxRecord } from '../../src/lib/client/outbox';
import { parseBatchReply, syncOnce } from '../../src/lib/client/sync';
import { User, type IUser } from '../../src/lib/server/db/entities';
import { sha256Hex } from '../../src/lib/server/ledger-hash';
import * as devices from '../../src/lib/server/repositories/devices';
import { checkSubmission, verifyDeviceSignature } from '../../src/lib/server/services/devices-signatures';
import { submissionSchema, submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { signingText } from '../../src/lib/signing/device-payload';
import { makeTablet, type TestTablet } from '../factories/devices';
import { boreAttempt, makeRun, PIN, record, viewer } from '../factories/runs';
import { benchDb, type BenchDb } from './bench-db';

export const title = 'offline bench: a tablet draining its outbox, device-signature verifications';

const WAITING = Number(process.env.BENCH_OUTBOX ?? 500);

/** A run with an enrolled tablet whose technician has signed once online (the PIN checked, the grant handed out). */
async function tabletWithGrant({ orm }: BenchDb) {
	const base = await makeRun(orm.em.fork());
	// Cheap argon2 parameters for this signer only: the one online PIN check is not what is measured.
	await orm.em
		.fork()
		.nativeUpdate(User, { id: base.tech.id }, { pinHash: await hash(PIN, { memoryCost: 8, timeCost: 1 }) });
	const tablet = await makeTablet(orm.em.fork(), base.lead, 'Bench tablet 3 (bay by the lift)');
	const first = await tablet.sign({
		...record(base.runId, base.tech, 'attempt', boreAttempt('22.010')),
		signedAt: Date.now()
	});
	const r = await submitRecords(
		orm.em.fork(),
		viewer(base.tech),
		base.runId,
		submitBatchSchema.parse({ records: [first], pins: { [base.tech.id]: PIN } })
	);
	const grant = r.ok ? r.value.answers[0].offlineGrant : undefined;
	if (!grant) throw new Error(`no offline grant: ${JSON.stringify(r)}`);
	return { ...base, tablet, grant };
}

const offlineRecord = (tablet: TestTablet, runId: string, tech: IUser, grant: string, signedAt: number, i: number) =>
	tablet.sign({
		...record(runId, tech, 'attempt', boreAttempt(`22.0${String(i % 20).padStart(2, '0')}`)),
		signedAt,
		signedOffline: true,
		offlineGrant: grant
	});

async function drain(db: BenchDb) {
	const { tech, runId, tablet, grant } = await tabletWithGrant(db);
	const store = await openOfflineStore({ dbName: `benchstamp-bench-outbox-${Date.now()}` });
	for (let i = 0; i < WAITING; i++) {
		const signed = await offlineRecord(tablet, runId, tech, grant.grant, grant.issuedAt + 1000 + i, i);
		await enqueue(store, signed as OutboxRecord, { now: Date.now() });
	}
	let serverMs = 0;
	const fetchBatch = async (records: OutboxRecord[]) => {
		const t = performance.now();
		const body: unknown = JSON.parse(JSON.stringify({ records })); // what crosses the network
		const r = await submitRecords(db.orm.em.fork(), viewer(tech), runId, submitBatchSchema.parse(body));
		if (!r.ok) throw new Error(r.message);
		const reply = parseBatchReply(JSON.parse(JSON.stringify(r.value)));
		serverMs += performance.now() - t;
		return reply;
	};
	const t0 = performance.now();
	const result = await syncOnce({ store, fetchBatch, now: Date.now, random: seededRandom(7), force: true });
	const ms = performance.now() - t0;
	const left = (await listOutbox(store)).length;
	await store.close();
	if (result.accepted !== WAITING || left !== 0)
		throw new Error(`drained ${result.accepted} of ${WAITING} (${left} left): ${JSON.stringify(result)}`);
	return { ms, perS: WAITING / (ms / 1000), serverShare: serverMs / ms };
}

async function verifyRates(db: BenchDb, n = 2000) {
	const { tech, runId, tablet, grant } = await tabletWithGrant(db);
	const device = await devices.findById(db.orm.em.fork(), tablet.device.id);
	if (!device) throw new Error('the bench tablet is not enrolled');
	const s = submissionSchema.parse(await offlineRecord(tablet, runId, tech, grant.grant, grant.issuedAt + 1000, 0));
	const value = s.signature!.value;
	const signable = { ...s, deviceId: s.deviceId! };
	const rate = async (count: number, fn: () => Promise<unknown> | unknown) => {
		await fn();
		const t = performance.now();
		for (let i = 0; i < count; i++) await fn();
		return count / ((performance.now() - t) / 1000);
	};
	const verifyOne = async () => {
		if (!(await verifyDeviceSignature(device, s, value))) throw new Error('the signature did not verify');
	};
	const sequential = await rate(n, verifyOne);
	const parallel = (await rate(n / 16, () => Promise.all(Array.from({ length: 16 }, verifyOne)))) * 16;
	const sha = await rate(n * 10, () => sha256Hex(signingText(signable)));
	const withLookup = await rate(n / 4, async () => {
		const c = await checkSubmission(db.orm.em.fork(), s, s, runId);
		if (!c.ok) throw new Error(c.reason);
	});
	return { sequential, parallel, sha, withLookup };
}

export async function main() {
	const db = await benchDb();
	const d = await drain(db);
	console.log(
		`outbox drain: ${WAITING} records signed offline, 1 tablet, batches of 50 → ${(d.ms / 1000).toFixed(2)} s, ` +
			`${d.perS.toFixed(0)} records/s (${(d.serverShare * 100).toFixed(0)} % of it in the submit route)`
	);
	const v = await verifyRates(db);
	console.log(
		`device signatures (ECDSA P-256): ${v.sequential.toFixed(0)} verifications/s one at a time, ` +
			`${v.parallel.toFixed(0)}/s 16 at a time; plain sha256 of the same payload ${v.sha.toFixed(0)}/s → ratio ` +
			`${(v.sequential / v.sha).toFixed(3)}; checkSubmission with the device read from PostgreSQL ` +
			`${v.withLookup.toFixed(0)}/s`
	);
}
