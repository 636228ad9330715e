/** Test-data factory for the client store tests: unique databases, records, runs and a scriptable fake server. */
import { doc, mustParse } from '$lib/procedure/test-helpers';
import { contentHash } from '$lib/procedure';
import type { OfflineRunnerView } from '$lib/server/services/offline.service';
import type { OfflineRun } from './offline-store';
import type { OutboxRecord, RecordAnswer } from './outbox';
import type { BatchReply } from './sync';
import type { RecordKind } from '$lib/ledger/record';
import { createUuidV7 } from '$lib/ledger/uuid-v7';
import { seededRandom } from './backoff';

let dbCounter = 0;

/** A database name no other test uses (fake-indexeddb is process-wide). */
export function freshDbName(label = 'test'): string {
	return `benchstamp-test-${label}-${++dbCounter}-${Date.now()}`;
}

/** A seeded byte source for the ledger's uuid v7 generator. */
export function seededFill(seed: number): (bytes: Uint8Array<ArrayBuffer>) => void {
	const random = seededRandom(seed);
	return (bytes) => {
		for (let i = 0; i < bytes.length; i++) bytes[i] = Math.floor(random() * 256);
	};
}

/** A run of the invented demo scenario, with a one-step procedure. */
export function makeRun(runId = 'run-1', overrides: Partial<OfflineRun> = {}): OfflineRun {
	const source = doc('Torque the separator plate bolts to the invented value on the job card.', 'Separator plate');
	return {
		runId,
		jobNumber: 'KL-24-0117',
		procedureVersionId: 'pv-1',
		contentHash: contentHash(source),
		source,
		model: mustParse(source),
		images: [],
		takenAt: Date.UTC(2026, 11, 1, 7, 0),
		signed: [],
		...overrides
	};
}

/** Makes records with repeatable uuid v7 ids (the ledger's generator, seeded), increasing in creation order. */
export function recordMaker(seed = 1) {
	let clock = 0;
	const next = createUuidV7({ now: () => clock, random: seededFill(seed) });
	return (
		runId: string,
		signedAt: number,
		kind: RecordKind = 'signoff',
		body: OutboxRecord['body'] = {}
	): OutboxRecord => {
		clock = signedAt;
		return { id: next(), runId, kind, signedAt, body };
	};
}

/** How the fake server treats one batch. */
export type ServerMode =
	| 'down' // the request never reaches the server
	| 'ok'
	| { partial: number } // stores and answers only the first n records
	| 'lose-answer'; // stores everything, then the answer is lost on the way back

/**
 * A stand-in for `POST /api/runs/:id/records`: stores each record id once, answers `duplicate` for an id it
 * already has, refuses records of `refuseKinds`, and records every id it received and any id that arrived while
 * the same id was still being handled (a concurrent double send).
 */
export function fakeServer(options: { refuseKinds?: string[]; clock?: () => number; skewMs?: number } = {}) {
	const stored: string[] = [];
	const received: string[] = [];
	const duplicates: string[] = [];
	const concurrentDoubles: string[] = [];
	const handling = new Set<string>();
	const script: ServerMode[] = [];
	let gate: Promise<void> | null = null;
	const refuse = new Set(options.refuseKinds ?? []);
	return {
		stored,
		received,
		duplicates,
		concurrentDoubles,
		/** Queues the modes of the next batches (then 'ok'). */
		then(...modes: ServerMode[]) {
			script.push(...modes);
			return this;
		},
		/** Holds every request until the returned function is called. */
		hold(): () => void {
			let open!: () => void;
			gate = new Promise((r) => (open = r));
			return () => {
				gate = null;
				open();
			};
		},
		fetchBatch: async (records: OutboxRecord[]): Promise<BatchReply> => {
			const mode = script.shift() ?? 'ok';
			if (mode === 'down') throw new TypeError('Failed to fetch');
			for (const r of records) {
				received.push(r.id);
				if (handling.has(r.id)) concurrentDoubles.push(r.id);
				handling.add(r.id);
			}
			try {
				if (gate) await gate;
				const n = typeof mode === 'object' ? mode.partial : records.length;
				const answers: RecordAnswer[] = records.slice(0, n).map((r) => {
					if (refuse.has(r.kind)) return { id: r.id, status: 'refused', reason: `Kind ${r.kind} is not allowed here.` };
					if (stored.includes(r.id)) {
						duplicates.push(r.id);
						return { id: r.id, status: 'duplicate' };
					}
					stored.push(r.id);
					return { id: r.id, status: 'accepted' };
				});
				if (mode === 'lose-answer') throw new TypeError('The connection dropped before the answer arrived');
				const now = options.clock?.();
				return now === undefined ? { answers } : { answers, serverTime: now + (options.skewMs ?? 0) };
			} finally {
				for (const r of records) handling.delete(r.id);
			}
		}
	};
}

/** Counts of each id in a list (a multiset). */
export function tally(ids: string[]): Record<string, number> {
	const out: Record<string, number> = {};
	for (const id of ids) out[id] = (out[id] ?? 0) + 1;
	return out;
}

/** A runner view as `GET /api/runs/:id/runner` answers it, for `makeRun(runId)`'s procedure; `run` overrides its run. */
export function runnerViewFor(
	runId: string,
	overrides: Partial<OfflineRunnerView> = {},
	run: Partial<OfflineRunnerView['run']> = {}
): OfflineRunnerView {
	const base = makeRun(runId);
	return {
		run: {
			id: runId,
			state: 'in_progress',
			jobId: 'job-1',
			jobNumber: base.jobNumber,
			procedureVersionId: base.procedureVersionId,
			procedureId: 'proc-1',
			versionNumber: 1,
			contentHash: base.contentHash,
			assignedTo: { id: 'u-1', name: 'Rowan Tech' },
			startedBy: { id: 'u-2', name: 'Sam Lead' },
			headHash: null,
			recordCount: 0,
			createdAt: '2026-12-01T07:00:00.000Z',
			records: [],
			...run
		},
		title: base.model.meta.title,
		family: base.model.meta.family,
		model: base.model,
		stepHtml: [],
		tools: [],
		toolChoices: {},
		signers: [],
		verifiers: [],
		versionNotice: null,
		canSign: true,
		entryContext: { torqueTools: {}, lots: {} },
		records: { leads: [], workers: [], handover: null },
		source: base.source,
		images: [],
		serverTime: 1_800_000_000_000,
		...overrides
	};
}
