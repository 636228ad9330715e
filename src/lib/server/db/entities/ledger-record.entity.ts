import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import type { JsonValue } from '../../../ledger/jcs';
import { Run } from './run.entity';

/**
 * One ledger record: a fact that is never edited. Append-only at the database: the app's role may only INSERT and
 * SELECT, and `benchstamp_append_only()` refuses UPDATE, DELETE and TRUNCATE (migration `…_ledger_append_only`).
 *
 * `hash` = `recordHash({ id, runId, seq, kind, body, prevHash })`. Everything the record asserts — signer, device,
 * server time, the server's evaluation — is inside `body`, so it is covered by the hash; the other columns repeat
 * parts of it for queries. `submissionHash` is the sha256 of what the client sent (for idempotent replays).
 * Unique `(run, seq)` and unique `(run, prev_hash)`: two records can never follow the same one, even past a bug.
 */
export const LedgerRecord = defineEntity({
	name: 'LedgerRecord',
	tableName: 'ledger_record',
	uniques: [
		{ properties: ['run', 'seq'], name: 'ledger_record_run_seq_unique' },
		{ properties: ['run', 'prevHash'], name: 'ledger_record_run_prev_hash_unique' }
	],
	// Audit search (issue 8): records by signer and time, and `body @> …` containment for lot trace and suspect tool.
	indexes: [
		// Index-only at scale (migration `…_audit_scale_indexes`): the runs with a record in a date range, a run's
		// first/last time, its findings. The runs a person signed on given days are in `run_signer_day`.
		{
			name: 'ledger_record_server_time_run_index',
			expression:
				'create index "ledger_record_server_time_run_index" on "ledger_record" ("server_time") include ("run_id")'
		},
		{ properties: ['run', 'serverTime'], name: 'ledger_record_run_time_index' },
		{
			name: 'ledger_record_finding_index',
			expression: `create index "ledger_record_finding_index" on "ledger_record" ("run_id") where "kind" = 'finding'`
		},
		{
			name: 'ledger_record_body_path_index',
			expression: 'create index "ledger_record_body_path_index" on "ledger_record" using gin ("body" jsonb_path_ops)'
		}
	],
	properties: {
		id: p.uuid().primary(),
		run: () => p.manyToOne(Run),
		seq: p.integer(),
		kind: p.string().length(32),
		body: p.json<JsonValue>(),
		prevHash: p.string().length(64).nullable(),
		hash: p.string().length(64).unique(),
		submissionHash: p.string().length(64),
		/** Null for records the server makes itself (a finding opened because the tablet's verdict was wrong). */
		signerId: p.uuid().nullable().index(),
		signerRole: p.string().length(16),
		deviceId: p.string().length(64).nullable(),
		deviceTime: p.datetime().nullable(),
		serverTime: p.datetime(),
		engineVersion: p.string().length(64),
		signedOffline: p.boolean().default(false)
	}
});
export type ILedgerRecord = InferEntity<typeof LedgerRecord>;
