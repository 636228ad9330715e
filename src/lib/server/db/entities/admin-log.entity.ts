import { defineEntity, p, type InferEntity } from '@mikro-orm/core';

/**
 * Append-only record of administrative changes (roles, deactivations, resets…).
 * The app's database role may only INSERT and SELECT it; a trigger refuses UPDATE and DELETE for everyone.
 */
export const AdminLog = defineEntity({
	name: 'AdminLog',
	tableName: 'admin_log',
	// The entries about one subject: its history page, and the submit path's "already logged?" guard per record.
	indexes: [{ properties: ['subjectType', 'subjectId', 'action'], name: 'admin_log_subject_index' }],
	properties: {
		id: p.bigint('string').primary().autoincrement(),
		at: p.datetime().defaultRaw('now()'),
		actorId: p.uuid().nullable(),
		actorName: p.string().length(120).nullable(),
		action: p.string().length(64),
		subjectType: p.string().length(32),
		subjectId: p.string().length(64),
		detail: p.json<Record<string, unknown>>().default('{}')
	}
});
export type IAdminLog = InferEntity<typeof AdminLog>;
