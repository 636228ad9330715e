/** The runner's real dependencies of `signOnTablet`: the submit route, this tablet's device key and kept photos. */
import { deviceId, sendRecord } from './submit';
import { loadIdentity, signIfEnrolled, signRecord } from '$lib/client/device-key';
import { dropKept, keptPhotos } from '$lib/client/offline-photo';
import type { SignDeps } from '$lib/client/offline-sign';
import type { OfflineStore } from '$lib/client/offline-store';

export async function runnerSignDeps(store: OfflineStore): Promise<SignDeps> {
	return {
		store,
		send: (record, pin) => sendRecord(record, pin),
		sign: (record) => signIfEnrolled(record),
		signWith: (identity, record) => signRecord(identity, record),
		identity: () => loadIdentity(),
		deviceId: deviceId(),
		photos: { kept: keptPhotos, drop: dropKept }
	};
}
