/**
 * A screen over every run's chain at once, fed records in whatever order the table gives them (PostgreSQL's heap
 * order: reading in `(run_id, seq)` order through the index costs verify-all more than twice the time, measured in
 * the audit bench). It answers one question per run — is this chain certainly intact? — and keeps only each run's
 * last link, plus the few records that arrive ahead of their predecessor.
 *
 * It never explains a failure: a run it does not pass is checked again, in order, by `verifyChain` /
 * `verifyAgainstAnchors`, which name the first record that does not match and why. So the one property that matters
 * is that it passes no chain those would fail: every seq from 1 to n exactly once, seq 1 with no previous hash,
 * every other record's previous hash the hash of the record before it, every record's recomputed hash equal to its
 * stored one (the caller's `hashOk`), and no record id twice. Ids are remembered as 32-bit FNV-1a keys, not strings
 * (a million ids would hold ≈ 75 MB as strings): two different ids with one key only send the run to the ordered
 * check, which tells them apart.
 */
import type { ChainLink } from './record';

/** What the screen says of one run's chain. */
export type ScreenResult =
	| {
			intact: true;
			/** Records in the chain. */
			count: number;
			/** Hash of the last record, null when there are none. */
			head: string | null;
			/** The stored hash after each anchored count (what `anchorsOf` asked to keep) that the chain reaches. */
			heads: ReadonlyMap<number, string>;
	  }
	| { intact: false; count: number };

interface RunState {
	/** The seq the next in-order record must have. */
	next: number;
	/** Hash of record `next − 1`; null before the first. */
	last: string | null;
	count: number;
	broken: boolean;
	/** Records that came before their predecessor, by seq. */
	ahead: Map<number, { prevHash: string | null; hash: string }> | null;
	heads: Map<number, string>;
	anchored: ReadonlySet<number> | null;
	ids: Set<number>;
}

/** 32-bit FNV-1a of the string's UTF-16 code units: offset basis 2166136261, prime 16777619 (FNV-1a as in IETF draft-eastlake-fnv, from memory). */
function idKey(id: string): number {
	let h = 0x811c9dc5;
	for (let i = 0; i < id.length; i++) h = Math.imul(h ^ id.charCodeAt(i), 0x01000193);
	return h >>> 0;
}

export class ChainScreen {
	private readonly runs = new Map<string, RunState>();
	private waiting = 0;
	private overflowed = false;

	/**
	 * @param anchorsOf the counts at which a run was anchored, whose heads {@link result} must report
	 * @param maxAhead how many out-of-order records may wait at once before the screen gives up (memory bound); then
	 *   {@link gaveUp} is true and every result is "not intact", so the caller checks every run in order
	 */
	constructor(
		private readonly anchorsOf: (runId: string) => ReadonlySet<number> | undefined,
		private readonly maxAhead = 100_000
	) {}

	/** Whether more records came out of order than `maxAhead`. */
	get gaveUp(): boolean {
		return this.overflowed;
	}

	/** One stored record, and whether its recomputed hash equals its stored `hash`. */
	add(link: ChainLink, hashOk: boolean): void {
		let run = this.runs.get(link.runId);
		if (!run) {
			run = {
				next: 1,
				last: null,
				count: 0,
				broken: false,
				ahead: null,
				heads: new Map(),
				anchored: this.anchorsOf(link.runId) ?? null,
				ids: new Set()
			};
			this.runs.set(link.runId, run);
		}
		run.count += 1;
		if (run.broken || this.overflowed) return;
		const key = idKey(link.id);
		if (!hashOk || !Number.isInteger(link.seq) || link.seq < run.next || run.ids.has(key)) {
			this.break(run); // a bad hash, a seq already taken, or (perhaps) an id seen before
			return;
		}
		run.ids.add(key);
		if (link.seq > run.next) {
			run.ahead ??= new Map();
			if (run.ahead.has(link.seq) || this.waiting >= this.maxAhead) {
				if (!run.ahead.has(link.seq)) this.overflowed = true;
				this.break(run);
				return;
			}
			run.ahead.set(link.seq, { prevHash: link.prevHash, hash: link.hash });
			this.waiting += 1;
			return;
		}
		this.advance(run, link.prevHash, link.hash);
		while (!run.broken && run.ahead?.size) {
			const waiting = run.ahead.get(run.next);
			if (!waiting) break;
			run.ahead.delete(run.next);
			this.waiting -= 1;
			this.advance(run, waiting.prevHash, waiting.hash);
		}
	}

	/** The verdict on `runId`'s chain (a run with no records is intact and empty, unless the screen gave up). */
	result(runId: string): ScreenResult {
		const run = this.runs.get(runId);
		if (this.overflowed) return { intact: false, count: run?.count ?? 0 };
		if (!run) return { intact: true, count: 0, head: null, heads: new Map() };
		if (run.broken || run.ahead?.size) return { intact: false, count: run.count };
		return { intact: true, count: run.count, head: run.last, heads: run.heads };
	}

	private advance(run: RunState, prevHash: string | null, hash: string): void {
		if (prevHash !== run.last) {
			this.break(run);
			return;
		}
		if (run.anchored?.has(run.next)) run.heads.set(run.next, hash);
		run.last = hash;
		run.next += 1;
	}

	private break(run: RunState): void {
		run.broken = true;
		run.ids.clear();
		if (run.ahead) {
			this.waiting -= run.ahead.size;
			run.ahead = null;
		}
	}
}
