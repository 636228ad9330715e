/**
 * One signature on the bench runner, online or not. The record goes to the submit route with the signer's PIN;
 * when the server cannot be reached (no answer at all — a refusal is an answer), the PIN is checked against the
 * verifier this tablet keeps (offline-pin.ts), the record is signed with the device key, marked `signedOffline`
 * with the signer's grant, and put in the outbox together with the run state it changes and its photos, in one
 * IndexedDB transaction. A technician therefore never redoes a signed step because the Wi-Fi was gone.
 *
 * Wrong PINs typed offline are counted on the tablet with the server's policy (`$lib/signing/pin-lockout`: 5, then
 * 15 minutes, doubling), per signer.
 */
import { uuidv7 } from '$lib/ledger/uuid-v7';
import {
	attemptsLeft,
	INITIAL_LOCK_STATE,
	isLocked,
	lockRemainingMs,
	recordFailure,
	recordSuccess,
	type LockState
} from '$lib/signing/pin-lockout';
import type { RecordKind } from '$lib/ledger/record';
import type { RecordAnswer, SendOutcome } from '$lib/components/runner/submit';
import type { DeviceIdentity, SignedRecord } from './device-key';
import { KEYS, type EntryInProgress, type OfflineStore } from './offline-store';
import { checkOfflinePin, rememberSigner } from './offline-pin';
import { enqueue, queuePhotosOfStoredRecord, type OutboxRecord, type PhotoInput } from './outbox';

/** The photo side of the tablet (offline-photo.ts), injected so this module stays testable. */
export interface TabletPhotos {
	/** Which of the named photo ids were taken while the server was unreachable and are kept on this tablet. */
	kept(store: OfflineStore, ids: string[]): Promise<PhotoInput[]>;
	/** Forgets kept photos once a record carries them (they are in the outbox's photo queue by then). */
	drop(store: OfflineStore, ids: string[]): Promise<void>;
}

export interface SignDeps {
	store: OfflineStore;
	/** The submit route (`sendRecord` of the runner's submit.ts). */
	send: (record: OutboxRecord & { signer: { id: string; role: string } }, pin: string) => Promise<SendOutcome>;
	/** Signs with the device key when this tablet is enrolled (`signIfEnrolled`). */
	sign: <T extends OutboxRecord & { signer: { id: string; role: string }; deviceId: string }>(
		record: T
	) => Promise<T | SignedRecord<T>>;
	/** Signs with this identity (`signRecord`); offline signing needs an enrolled tablet. */
	signWith: <T extends OutboxRecord & { signer: { id: string; role: string } }>(
		identity: DeviceIdentity,
		record: T
	) => Promise<SignedRecord<T>>;
	identity: () => Promise<DeviceIdentity | undefined>;
	/** The tablet's local id (`deviceId()` of submit.ts); an enrolled tablet's signature replaces it. */
	deviceId: string;
	photos?: TabletPhotos;
	now?: () => number;
	newId?: () => string;
	/** PBKDF2 iterations of the verifier kept after an online signature (tests lower it). */
	iterations?: number;
}

export interface SignRequest {
	runId: string;
	kind: RecordKind;
	body: Record<string, unknown>;
	signer: { id: string; role: string; name: string };
	pin: string;
	/** The step's id, for the run's `signed` list on this tablet (sign-offs). */
	stepId?: string;
	/** What was typed for the step: cleared after an online signature, kept marked with the record id offline. */
	entries?: EntryInProgress[];
}

export type SignResult =
	/** The server answered (accepted, duplicate or refused). */
	| { where: 'server'; answer: RecordAnswer }
	/** Signed on this tablet and in the outbox, waiting to sync. */
	| { where: 'tablet'; id: string; message: string }
	/** Not signed: the tablet refused (wrong PIN, locked, not enrolled, no grant) with the reason in words. */
	| { where: 'nowhere'; id: string; message: string };

/** Photo ids a record body names: a finding's `photos`, and `entries[].entry.photos`. */
export function photoIdsOf(body: Record<string, unknown>): string[] {
	const ids = new Set<string>();
	const add = (v: unknown) => Array.isArray(v) && v.forEach((x) => typeof x === 'string' && ids.add(x));
	add(body.photos);
	for (const e of Array.isArray(body.entries) ? body.entries : [])
		add((e as { entry?: { photos?: unknown } } | null)?.entry?.photos);
	return [...ids];
}

const minutes = (ms: number) => Math.max(1, Math.ceil(ms / 60_000));

async function readLock(store: OfflineStore, userId: string): Promise<LockState> {
	return (await store.get<LockState>(KEYS.pinLock(userId))) ?? INITIAL_LOCK_STATE;
}

/** Signs one record: online when the server answers, else on the tablet into the outbox. */
export async function signOnTablet(deps: SignDeps, req: SignRequest): Promise<SignResult> {
	const { store } = deps;
	const now = deps.now ?? Date.now;
	const id = (deps.newId ?? uuidv7)();
	const signedAt = now();
	const ids = photoIdsOf(req.body);
	const kept = ids.length > 0 && deps.photos ? await deps.photos.kept(store, ids) : [];
	// The server's photo check: a record naming photos still on this tablet says so at the top of its body.
	const body = kept.length
		? { tabletPhotos: kept.map((p) => ({ id: p.id, sha256: p.sha256 })), ...req.body }
		: req.body;
	const signer = { id: req.signer.id, role: req.signer.role };
	const base = {
		id,
		runId: req.runId,
		kind: req.kind,
		body: body as OutboxRecord['body'],
		signer,
		deviceId: deps.deviceId,
		signedAt
	};
	const online = await deps.sign(base);
	const sent = await deps.send(online, req.pin);
	if (sent.reached) {
		const { answer } = sent;
		if (answer.status !== 'refused') {
			await store.set(KEYS.pinLock(signer.id), recordSuccess(await readLock(store, signer.id)));
			if (answer.offlineGrant)
				await rememberSigner(
					store,
					{ userId: signer.id, name: req.signer.name },
					req.pin,
					answer.offlineGrant,
					deps.iterations
				);
			if (kept.length) {
				await queuePhotosOfStoredRecord(store, online, kept, now());
				await deps.photos?.drop(
					store,
					kept.map((p) => p.id)
				);
			}
			if (req.entries?.length)
				await store.delMany(req.entries.map((e) => KEYS.entry(e.runId, e.stepId, e.checkpointId)));
		}
		return { where: 'server', answer };
	}
	return signOffline(deps, req, base, kept, now);
}

async function signOffline(
	deps: SignDeps,
	req: SignRequest,
	base: OutboxRecord & { signer: { id: string; role: string }; deviceId: string },
	kept: PhotoInput[],
	now: () => number
): Promise<SignResult> {
	const { store } = deps;
	const { id } = base;
	const unreachable = 'The server could not be reached';
	const lock = await readLock(store, req.signer.id);
	if (isLocked(lock, now()))
		return {
			where: 'nowhere',
			id,
			message: `${unreachable}, and signing for ${req.signer.name} is locked on this tablet after wrong PINs for ${minutes(lockRemainingMs(lock, now()))} more minutes. Nothing was stored.`
		};
	const identity = await deps.identity();
	if (!identity)
		return {
			where: 'nowhere',
			id,
			message: `${unreachable}, and this tablet is not enrolled, so it cannot sign while the network is down. Nothing was stored: sign again when the server answers, or ask a lead to enrol the tablet.`
		};
	const check = await checkOfflinePin(store, req.signer.id, req.pin, now());
	if (!check.ok) {
		if (check.reason !== 'wrong')
			return { where: 'nowhere', id, message: `${unreachable}. ${check.message} Nothing was stored.` };
		const next = recordFailure(lock, now());
		await store.set(KEYS.pinLock(req.signer.id), next);
		const left = attemptsLeft(next, now());
		const then = isLocked(next, now())
			? `Signing for ${req.signer.name} is now locked on this tablet for ${minutes(lockRemainingMs(next, now()))} minutes.`
			: `${left} ${left === 1 ? 'try' : 'tries'} left before signing is locked on this tablet.`;
		return { where: 'nowhere', id, message: `${check.message} ${then} Nothing was stored.` };
	}
	await store.set(KEYS.pinLock(req.signer.id), recordSuccess(lock));
	const signed = await deps.signWith(identity, { ...base, signedOffline: true });
	const record: OutboxRecord = { ...signed, offlineGrant: check.grant } as OutboxRecord;
	const stepId = req.kind === 'signoff' ? req.stepId : undefined;
	try {
		await enqueue(store, record, {
			now: now(),
			photos: kept,
			entries: (req.entries ?? []).map((e) => ({ ...e, recordId: id })),
			updateRun: (run) =>
				stepId ? { ...run, signed: [...run.signed, { stepId, recordId: id, signedAt: base.signedAt }] } : run
		});
	} catch (error) {
		const why = error instanceof Error ? error.message : String(error);
		return { where: 'nowhere', id, message: `${unreachable}, and the tablet could not store the record: ${why}` };
	}
	if (kept.length)
		await deps.photos?.drop(
			store,
			kept.map((p) => p.id)
		);
	return {
		where: 'tablet',
		id,
		message:
			'Signed on this tablet and waiting to sync: the server could not be reached. It is sent when the network is back.'
	};
}
