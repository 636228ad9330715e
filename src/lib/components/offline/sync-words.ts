/**
 * The sync indicator's words, as a pure function of the outbox state: the tablet shows them in text and icon,
 * never colour alone. Times are the tablet's clock.
 */
import type { SyncState } from '$lib/client/outbox';
import { plural } from '$lib/utils/plural';

export type SyncTone = 'pass' | 'warn' | 'fail' | 'info';

export interface SyncWords {
	tone: SyncTone;
	/** Short, always visible: "All synced", "5 waiting", "2 refused". */
	headline: string;
	/** Longer lines for the open panel. */
	lines: string[];
}

/** "just now", "4 min ago", "3 h 10 min ago", or a date for anything older than a day. */
export function ago(at: number, now: number): string {
	const minutes = Math.floor((now - at) / 60_000);
	if (minutes < 1) return 'just now';
	if (minutes < 60) return `${minutes} min ago`;
	const hours = Math.floor(minutes / 60);
	if (hours < 24) return `${hours} h ${minutes % 60} min ago`;
	return `on ${new Date(at).toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

export function syncWords(s: SyncState, now: number, online: boolean): SyncWords {
	const lines: string[] = [];
	lines.push(s.lastSuccessAt === null ? 'Never synced on this tablet.' : `Last synced ${ago(s.lastSuccessAt, now)}.`);
	if (!online) lines.push('The network is down: signing goes on, records wait here.');
	if (s.photosWaiting) lines.push(`${plural(s.photosWaiting, 'photo')} waiting to upload.`);
	if (s.staleWarning && s.oldestWaitingAt !== null)
		lines.push(`Records have waited since ${ago(s.oldestWaitingAt, now)} — more than 8 hours. Get this tablet online.`);
	if (s.clockOffsetMs !== null && Math.abs(s.clockOffsetMs) > 5 * 60_000)
		lines.push(
			`This tablet's clock is ${Math.round(Math.abs(s.clockOffsetMs) / 60_000)} min off the server's; records are flagged.`
		);
	if (s.lastError && s.waiting) lines.push(`Last try: ${s.lastError}`);
	if (s.refused)
		return {
			tone: 'fail',
			headline: `${plural(s.refused, 'record')} refused`,
			lines: ['The server refused some records: each is listed with its reason. Tell a lead.', ...lines]
		};
	if (s.staleWarning) return { tone: 'warn', headline: `${s.waiting + s.photosWaiting} waiting over 8 h`, lines };
	const waiting = s.waiting + s.photosWaiting;
	if (waiting) return { tone: online ? 'info' : 'warn', headline: `${waiting} waiting`, lines };
	return { tone: 'pass', headline: online ? 'All synced' : 'Offline · nothing waiting', lines };
}
