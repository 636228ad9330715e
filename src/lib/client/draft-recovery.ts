/**
 * Unsaved editor text kept in the browser (localStorage), so a closed tab or a lost connection loses nothing.
 * Written on every change, removed once the server has the same text. Browser-only: call from event handlers
 * or effects, never during server rendering.
 */
export interface Recovered {
	source: string;
	/** When the text was typed (ISO). */
	at: string;
	/** The server draft's `updatedAt` the text was based on. */
	baseUpdatedAt: string | null;
}

const key = (procedureId: string) => `benchstamp:procedure-draft:${procedureId}`;

function storage(): Storage | null {
	try {
		return typeof localStorage === 'undefined' ? null : localStorage;
	} catch {
		return null;
	}
}

export function remember(procedureId: string, source: string, baseUpdatedAt: string | null): void {
	const value: Recovered = { source, at: new Date().toISOString(), baseUpdatedAt };
	try {
		storage()?.setItem(key(procedureId), JSON.stringify(value));
	} catch {
		// Storage full or refused: the server autosave still runs; nothing else to do here.
	}
}

export function recall(procedureId: string): Recovered | null {
	const raw = storage()?.getItem(key(procedureId));
	if (!raw) return null;
	try {
		const v = JSON.parse(raw) as Recovered;
		return typeof v.source === 'string' && typeof v.at === 'string' ? v : null;
	} catch {
		return null;
	}
}

export function forget(procedureId: string): void {
	storage()?.removeItem(key(procedureId));
}
