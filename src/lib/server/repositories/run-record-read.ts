/**
 * What the run record (`/quality/runs/[id]`, its PDF and CSV) reads, as plain rows in two queries — the run with its
 * job, version, procedure and technician in one join, and its ledger records in chain order — with no entity
 * hydrated (through `em.execute`, so inside the caller's transaction when there is one): at 40–60 records of a few KB each, hydration was most of the page's time (audit bench, issue 8).
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { JsonValue } from '../../ledger/jcs';
import type { Procedure } from '../../procedure/model';
import type { RunState } from '../db/entities';

export interface RunRecordHead {
	id: string;
	state: RunState;
	jobId: string;
	jobNumber: string;
	unitModel: string;
	unitSerial: string;
	procedure: string;
	version: number;
	model: Procedure;
	technician: string;
}

/** The run and what its record page shows above the records; null when there is no such run. */
export async function findHead(em: EntityManager, runId: string): Promise<RunRecordHead | null> {
	const [row] = await em.execute<
		{
			id: string;
			state: RunState;
			job_id: string;
			job_number: string;
			unit_model: string;
			unit_serial: string;
			procedure: string;
			version: number;
			model: Procedure;
			technician: string;
		}[]
	>(
		`select r.id, r.state, j.id as job_id, j.job_number, j.unit_model, j.unit_serial, p.title as procedure,
			pv.number as version, pv.model, u.name as technician
		from run r
		join job j on j.id = r.job_id
		join procedure_version pv on pv.id = r.procedure_version_id
		join procedure p on p.id = pv.procedure_id
		join app_user u on u.id = r.assigned_to_id
		where r.id = ?`,
		[runId]
	);
	if (!row) return null;
	return {
		id: row.id,
		state: row.state,
		jobId: row.job_id,
		jobNumber: row.job_number,
		unitModel: row.unit_model,
		unitSerial: row.unit_serial,
		procedure: row.procedure,
		version: row.version,
		model: row.model,
		technician: row.technician
	};
}

/** One ledger record as the run record shows it. */
export interface RecordRow {
	id: string;
	seq: number;
	kind: string;
	body: JsonValue;
	hash: string;
	signerRole: string;
	deviceId: string | null;
	deviceTime: Date | null;
	serverTime: Date;
	signedOffline: boolean;
}

/** The run's records in chain order (`ORDER BY seq`). */
export async function listRecords(em: EntityManager, runId: string): Promise<RecordRow[]> {
	const rows = await em.execute<
		{
			id: string;
			seq: number;
			kind: string;
			body: JsonValue;
			hash: string;
			signer_role: string;
			device_id: string | null;
			device_time: Date | null;
			server_time: Date;
			signed_offline: boolean;
		}[]
	>(
		`select id, seq, kind, body, hash, signer_role, device_id, device_time, server_time, signed_offline
		from ledger_record where run_id = ? order by seq`,
		[runId]
	);
	return rows.map((r) => ({
		id: r.id,
		seq: r.seq,
		kind: r.kind,
		body: r.body,
		hash: r.hash,
		signerRole: r.signer_role,
		deviceId: r.device_id,
		deviceTime: r.device_time === null ? null : new Date(r.device_time),
		serverTime: new Date(r.server_time),
		signedOffline: r.signed_offline
	}));
}
