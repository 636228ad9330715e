import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import {
	CALIBRATION_KINDS,
	TOLERANCE_RESULTS,
	type CalibrationKind,
	type ToleranceResult
} from '../../../registers/tool-kinds';
import { Tool } from './tool.entity';

/**
 * One calibration (by a lab, with a certificate, as-left and next due date) or one in-house check (as-found only)
 * of a tool. Records are added, never edited: a correction is a new record.
 */
export const Calibration = defineEntity({
	name: 'Calibration',
	tableName: 'calibration',
	properties: {
		id: p.uuid().primary(),
		tool: () => p.manyToOne(Tool).deleteRule('cascade').index(),
		kind: p.enum([...CALIBRATION_KINDS]).$type<CalibrationKind>(),
		performedOn: p.date(),
		certificateNo: p.string().length(80).nullable(),
		asFound: p.enum([...TOLERANCE_RESULTS]).$type<ToleranceResult>(),
		asLeft: p
			.enum([...TOLERANCE_RESULTS])
			.$type<ToleranceResult>()
			.nullable(),
		nextDueOn: p.date().nullable(),
		notes: p.text().default(''),
		recordedById: p.uuid().nullable(),
		recordedByName: p.string().length(120).nullable(),
		recordedAt: p.datetime().onCreate(() => new Date())
	}
});
export type ICalibration = InferEntity<typeof Calibration>;
