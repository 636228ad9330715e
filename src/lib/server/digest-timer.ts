import type { MikroORM } from '@mikro-orm/postgresql';
import { digestSentOn, runDailyDigest } from './services/digest.service';

const CHECK_EVERY_MS = 15 * 60_000;

/**
 * Sends the daily digest once per UTC day, at or after `hourUtc`: checked every 15 minutes (and a minute after start),
 * so a server that was down at that hour sends it when it is back. The admin log says whether today's went, so two
 * app processes send at most one each in a race, never one per check. Returns a stop function.
 */
export function startDigestTimer(orm: MikroORM, hourUtc: number): () => void {
	let busy = false;
	const tick = async () => {
		const now = new Date();
		if (busy || now.getUTCHours() < hourUtc) return;
		busy = true;
		try {
			const em = orm.em.fork();
			if (!(await digestSentOn(em, now.toISOString().slice(0, 10)))) await runDailyDigest(em, now);
		} catch (e) {
			console.warn(`daily digest not sent: ${e instanceof Error ? e.message : String(e)}`);
		} finally {
			busy = false;
		}
	};
	const first = setTimeout(tick, 60_000);
	const every = setInterval(tick, CHECK_EVERY_MS);
	first.unref();
	every.unref();
	return () => {
		clearTimeout(first);
		clearInterval(every);
	};
}
