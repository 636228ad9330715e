/** Outbox records of the open run drawn like stored ones (the step history and the chain state read them). */
import type { OutboxRecord } from '$lib/client/outbox';

export interface PendingHistoryRecord {
	id: string;
	/** 0: not in the chain yet (the server hands out the position on sync). */
	seq: number;
	kind: string;
	body: unknown;
	signerId: string | null;
	signerRole: string;
	serverTime: string;
	deviceId: string | null;
	deviceTime: string | null;
	signedOffline: boolean;
	prevHash: null;
	hash: string;
	engineVersion: string;
}

export function pendingAsHistory(
	pending: OutboxRecord[],
	people: { id: string; name: string }[]
): PendingHistoryRecord[] {
	return pending.map((r) => {
		const who = (r as { signer?: { id: string; role: string } }).signer;
		const name = people.find((p) => p.id === who?.id)?.name ?? 'this tablet';
		const at = new Date(r.signedAt).toISOString();
		return {
			id: r.id,
			seq: 0,
			kind: r.kind,
			body: { ...(r.body as object), signer: { id: who?.id, name } },
			signerId: who?.id ?? null,
			signerRole: who?.role ?? '',
			serverTime: at,
			deviceId: (r as { deviceId?: string }).deviceId ?? null,
			deviceTime: at,
			signedOffline: r.signedOffline ?? false,
			prevHash: null,
			hash: '',
			engineVersion: ''
		};
	});
}
