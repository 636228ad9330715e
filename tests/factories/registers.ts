import type { EntityManager } from '@mikro-orm/postgresql';
import { addDays, isoDate } from '../../src/lib/registers/dates';
import type { JobInput, ToolInput } from '../../src/lib/registers/schema';
import * as tools from '../../src/lib/server/repositories/tools';

let counter = 0;
const unique = () => `${++counter}${Date.now().toString(36).slice(-4)}`.toUpperCase();

/** A tool input with a unique asset tag (invented values). */
export const toolInput = (over: Partial<ToolInput> = {}): ToolInput => ({
	assetTag: `T-${unique()}`,
	kind: 'torque_click',
	description: 'Click wrench 2–12 N·m (test)',
	rangeMin: '2',
	rangeMax: '12',
	unit: 'N·m',
	resolution: '0.1',
	accuracyPct: '4',
	...over
});

/** A tool straight into the register with one calibration `daysAgo` days back, due `dueInDays` from today. */
export async function makeCalibratedTool(
	em: EntityManager,
	opts: { daysAgo?: number; dueInDays?: number; over?: Partial<ToolInput> } = {}
) {
	const tool = tools.create(em, toolInput(opts.over));
	const today = isoDate();
	tools.addCalibration(
		em,
		tool,
		{ id: crypto.randomUUID(), name: 'Factory' },
		{
			kind: 'calibration',
			performedOn: addDays(today, -(opts.daysAgo ?? 30)),
			certificateNo: `CERT-${unique()}`,
			asFound: 'in',
			asLeft: 'in',
			nextDueOn: addDays(today, opts.dueInDays ?? 300),
			notes: ''
		}
	);
	await em.flush();
	return tool;
}

/** A job intake with a unique serial unless one is given (invented unit). */
export const jobInput = (over: Partial<JobInput> = {}): JobInput => ({
	customerName: 'Test Customer',
	customerEmail: 'customer@example.com',
	customerPhone: '+1 555 0100',
	unitModel: 'KTX-7 (invented)',
	unitSerial: `KTX7-${unique()}`,
	mileage: '84000',
	complaint: 'Harsh 2–3 shift when warm.',
	faultCodes: 'P17BF, P0841',
	receivedOn: isoDate(),
	intakeNotes: '',
	...over
});
