/**
 * Appends a record a quality lead signs at the desk (a disposition, a release) to a run's chain: the same envelope,
 * hash and columns as the submit path (`ledger.insert` under the run's row lock), with the signer inside the hashed
 * body. Call inside a transaction that holds `runs.lockForAppend` on `run`.
 */
import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { canonicalize, type JsonValue } from '../../ledger/jcs';
import type { RecordKind, StoredRecord } from '../../ledger/record';
import { uuidv7 } from '../../ledger/uuid-v7';
import { ENGINE_VERSION } from '../../procedure/version';
import type { IRun } from '../db/entities';
import { sealNext } from '../ledger-hash';
import * as ledger from '../repositories/ledger';

export interface DeskSigner {
	id: string;
	name: string;
	role: 'quality';
}

export function appendDeskRecord(
	tx: EntityManager,
	run: IRun,
	kind: RecordKind,
	what: Record<string, JsonValue>,
	signer: DeskSigner,
	serverTime: Date
): StoredRecord {
	const body = JSON.parse(
		JSON.stringify({
			...what,
			signer,
			device: { id: null, time: null },
			serverTime: serverTime.toISOString(),
			engine: ENGINE_VERSION
		})
	) as JsonValue;
	const head = run.headHash ? { runId: run.id, seq: run.recordCount, hash: run.headHash } : null;
	const stored = sealNext(head, { id: uuidv7(), runId: run.id, kind, body });
	ledger.insert(tx, run, stored, {
		submissionHash: createHash('sha256').update(canonicalize(body), 'utf8').digest('hex'),
		signerId: signer.id,
		signerRole: signer.role,
		deviceId: null,
		deviceTime: null,
		serverTime,
		engineVersion: ENGINE_VERSION,
		signedOffline: false
	});
	return stored;
}
