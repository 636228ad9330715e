/** The runner's side of the one submit route (`POST /api/runs/:id/records`). */
import { uuidv7 } from '$lib/ledger/uuid-v7';

export interface RecordAnswer {
	id: string;
	status: 'accepted' | 'duplicate' | 'refused';
	reason?: string;
	seq?: number;
	/** On an accepted record: its hash and the server's time in it. */
	hash?: string;
	serverTime?: string;
	findings?: string[];
	/** On an accepted record from an enrolled tablet: what lets this signer sign offline here for 12 h. */
	offlineGrant?: { grant: string; issuedAt: number; epoch?: string };
}

/** The record kinds the runner sends. */
export type RunnerKind =
	'attempt' | 'signoff' | 'finding' | 'verification' | 'na_approval' | 'handover' | 'supersession';

/** How long the runner waits for the submit route before it treats the server as unreachable (a dead Wi-Fi hangs). */
export const SUBMIT_TIMEOUT_MS = 15_000;

/** The server's verdict, or `unreachable` when no answer came (network error, timeout, a gateway's 502/503/504). */
export type SendOutcome = { reached: true; answer: RecordAnswer } | { reached: false };

/** Sends one signed record with its signer's PIN; tells a refusal by the server from a server it could not reach. */
export async function sendRecord(
	record: { id: string; runId: string; signer: { id: string } },
	pin: string,
	fetchFn: typeof fetch = fetch,
	timeoutMs = SUBMIT_TIMEOUT_MS
): Promise<SendOutcome> {
	let res: Response;
	try {
		res = await fetchFn(`/api/runs/${record.runId}/records`, {
			method: 'POST',
			headers: { 'content-type': 'application/json' },
			body: JSON.stringify({ records: [record], pins: { [record.signer.id]: pin } }),
			signal: AbortSignal.timeout(timeoutMs)
		});
	} catch {
		return { reached: false };
	}
	if ([502, 503, 504].includes(res.status)) return { reached: false };
	if (!res.ok) {
		const text = ((await res.json().catch(() => null)) as { message?: string } | null)?.message;
		return {
			reached: true,
			answer: { id: record.id, status: 'refused', reason: text ?? `The server answered ${res.status}.` }
		};
	}
	const answers = ((await res.json().catch(() => null)) as { answers?: RecordAnswer[] } | null)?.answers;
	if (!answers?.[0]) return { reached: false };
	return { reached: true, answer: answers[0] };
}

const DEVICE_KEY = 'benchstamp.deviceId';

/** This tablet's id (locks on wrong PINs are per person per tablet), made once and kept in local storage. */
export function deviceId(): string {
	let id = localStorage.getItem(DEVICE_KEY);
	if (!id) {
		id = `tablet-${uuidv7()}`;
		localStorage.setItem(DEVICE_KEY, id);
	}
	return id;
}
