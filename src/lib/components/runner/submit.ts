/** The runner's side of the one submit route (`POST /api/runs/:id/records`). */
import { uuidv7 } from '$lib/ledger/uuid-v7';
import { signIfEnrolled } from '$lib/client/device-key';

export interface RecordAnswer {
	id: string;
	status: 'accepted' | 'duplicate' | 'refused';
	reason?: string;
	seq?: number;
	findings?: string[];
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

/** Sends one record signed by `signer` with their PIN; answers the server's verdict, or a refusal in words. */
export async function submitOne(
	runId: string,
	kind: 'attempt' | 'signoff' | 'finding' | 'verification' | 'na_approval' | 'handover' | 'supersession',
	body: Record<string, unknown>,
	signer: { id: string; role: string },
	pin: string
): Promise<RecordAnswer> {
	const id = uuidv7();
	// An enrolled tablet signs with its device key (and sends its enrolled id); any other browser sends it unsigned.
	const record = await signIfEnrolled({ id, runId, kind, body, signer, deviceId: deviceId(), signedAt: Date.now() });
	try {
		const res = await fetch(`/api/runs/${runId}/records`, {
			method: 'POST',
			headers: { 'content-type': 'application/json' },
			body: JSON.stringify({ records: [record], pins: { [signer.id]: pin } })
		});
		if (!res.ok) {
			const text = ((await res.json().catch(() => null)) as { message?: string } | null)?.message;
			return { id, status: 'refused', reason: text ?? `The server answered ${res.status}.` };
		}
		return ((await res.json()) as { answers: RecordAnswer[] }).answers[0];
	} catch {
		return { id, status: 'refused', reason: 'The server could not be reached; nothing was stored.' };
	}
}
