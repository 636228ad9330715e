import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Run } from './run.entity';

/**
 * What the audit search shows and filters on for a run without reading its records: first and last server time and
 * how many findings it holds. Kept by the database, never by the app: a statement trigger on `ledger_record` adds
 * each appended batch (migration `…_run_summary`), and the app's role may only SELECT it. A run with no record yet
 * has no row.
 */
export const RunSummary = defineEntity({
	name: 'RunSummary',
	tableName: 'run_summary',
	indexes: [{ properties: ['lastAt'], name: 'run_summary_last_at_index' }],
	properties: {
		run: () => p.manyToOne(Run).primary(),
		firstAt: p.datetime(),
		lastAt: p.datetime(),
		findingCount: p.integer()
	}
});
export type IRunSummary = InferEntity<typeof RunSummary>;

/**
 * The UTC days on which a person signed a record of a run: "which runs did Dana sign last week" becomes a range read
 * of one small index instead of every record Dana signed. Kept by the same trigger as `run_summary`, SELECT only.
 */
export const RunSignerDay = defineEntity({
	name: 'RunSignerDay',
	tableName: 'run_signer_day',
	properties: {
		signerId: p.uuid().primary(),
		day: p.date().primary(),
		run: () => p.manyToOne(Run).primary()
	}
});
export type IRunSignerDay = InferEntity<typeof RunSignerDay>;
