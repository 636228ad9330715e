import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Procedure } from './procedure.entity';
import { User } from './user.entity';

/**
 * The one open draft of a procedure (unique per procedure). Approval turns it into the next version and deletes it.
 * `contributors` holds everyone who saved it: none of them may approve it.
 */
export const ProcedureDraft = defineEntity({
	name: 'ProcedureDraft',
	tableName: 'procedure_draft',
	properties: {
		id: p.uuid().primary(),
		procedure: () => p.manyToOne(Procedure).unique().deleteRule('cascade'),
		source: p.text(),
		author: () => p.manyToOne(User),
		contributors: p.array<string>().$type<string[]>(),
		createdAt: p.datetime().onCreate(() => new Date()),
		updatedAt: p.datetime().onCreate(() => new Date()),
		updatedBy: () => p.manyToOne(User),
		submittedAt: p.datetime().nullable(),
		submittedBy: () => p.manyToOne(User).nullable()
	}
});
export type IProcedureDraft = InferEntity<typeof ProcedureDraft>;
