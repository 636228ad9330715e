import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import type { Procedure as ProcedureModel } from '../../../procedure/model';
import { Procedure } from './procedure.entity';
import { User } from './user.entity';

/**
 * A published version: immutable. A database trigger (migration `…_procedure_version_immutable`) refuses every
 * UPDATE except setting `retired_at`/`retired_by` once, and every DELETE. `(procedure, number)` is unique, so two
 * concurrent approvals can never both become version N.
 */
export const ProcedureVersion = defineEntity({
	name: 'ProcedureVersion',
	tableName: 'procedure_version',
	uniques: [{ properties: ['procedure', 'number'], name: 'procedure_version_procedure_number_unique' }],
	properties: {
		id: p.uuid().primary(),
		procedure: () => p.manyToOne(Procedure),
		number: p.integer(),
		source: p.text(),
		model: p.json<ProcedureModel>(),
		contentHash: p.string().length(64),
		engineVersion: p.string().length(64),
		changeNote: p.text(),
		author: () => p.manyToOne(User),
		approver: () => p.manyToOne(User),
		publishedAt: p.datetime(),
		retiredAt: p.datetime().nullable(),
		retiredBy: () => p.manyToOne(User).nullable()
	}
});
export type IProcedureVersion = InferEntity<typeof ProcedureVersion>;
