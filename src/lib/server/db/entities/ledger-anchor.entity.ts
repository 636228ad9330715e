import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Run } from './run.entity';

/** Where a chain head was copied to outside the database. */
export const ANCHOR_PLACES = ['release_pdf', 'daily_digest', 'manual'] as const;
export type AnchorPlace = (typeof ANCHOR_PLACES)[number];

/**
 * A run's chain head as it was copied outside the database ("after `count` records the head was `head`"), so that
 * verify can catch an alter-and-rehash. Append-only like the ledger (migration `…_ledger_anchor_append_only`).
 * `run` is null for an anchor over every run (reserved: the daily digest records one row per run for now).
 */
export const LedgerAnchor = defineEntity({
	name: 'LedgerAnchor',
	tableName: 'ledger_anchor',
	properties: {
		id: p.uuid().primary(),
		run: () => p.manyToOne(Run).nullable().index(),
		head: p.string().length(64),
		count: p.integer(),
		recordedAt: p.datetime(),
		recordedIn: p.enum([...ANCHOR_PLACES]).$type<AnchorPlace>()
	}
});
export type ILedgerAnchor = InferEntity<typeof LedgerAnchor>;
