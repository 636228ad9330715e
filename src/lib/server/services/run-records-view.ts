/** What the runner's N/A, handover, correction and unlock panels need beside the runner view. Plain objects. */
import type { EntityManager } from '@mikro-orm/postgresql';
import * as users from '../repositories/users';
import { latestHandover, type HandoverView } from './run-records';
import type { RunView } from './runs.service';

export interface RunRecordsView {
	/** Active people holding lead: who may approve an N/A, correct anyone's record, unlock a PIN. */
	leads: { id: string; name: string }[];
	/** Active technicians and leads: who a run may be handed over to. */
	workers: { id: string; name: string }[];
	/** The run's latest handover, with who took it up (null when there was none). */
	handover: HandoverView | null;
}

export async function runRecordsView(em: EntityManager, run: RunView): Promise<RunRecordsView> {
	const people = (await users.listAll(em)).filter((u) => u.active).sort((a, b) => a.name.localeCompare(b.name));
	const plain = (u: { id: string; name: string }) => ({ id: u.id, name: u.name });
	return {
		leads: people.filter((u) => u.roles.includes('lead')).map(plain),
		workers: people.filter((u) => u.roles.includes('lead') || u.roles.includes('technician')).map(plain),
		handover: latestHandover(run.records)
	};
}
