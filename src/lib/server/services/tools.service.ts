import { UniqueConstraintViolationException } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { isoDate } from '../../registers/dates';
import type { CalibrationInput, ToolInput } from '../../registers/schema';
import * as adminLog from '../repositories/admin-log';
import * as tools from '../repositories/tools';
import type { Actor, Result } from './accounts.service';

export type { ToolSummary, CalibrationRecord } from '../repositories/tools';

const ok = <T>(value: T): Result<T> => ({ ok: true, value });
const refuse = (message: string, field?: string): Result<never> => ({ ok: false, message, field });
const DUPLICATE_TAG = 'Another tool already has this asset tag. Check the label on the tool.';

/** Adds a tool to the register. It stays blocked until its first calibration is recorded. */
export async function registerTool(em: EntityManager, actor: Actor, input: ToolInput): Promise<Result<{ id: string }>> {
	if (await tools.findByAssetTag(em, input.assetTag)) return refuse(DUPLICATE_TAG, 'assetTag');
	const tool = tools.create(em, input);
	adminLog.append(em, actor, {
		action: 'tool.registered',
		subjectType: 'tool',
		subjectId: tool.id,
		detail: { ...input }
	});
	try {
		await em.flush();
	} catch (e) {
		// Two registrations of one tag at the same moment: the unique index decides.
		if (e instanceof UniqueConstraintViolationException) return refuse(DUPLICATE_TAG, 'assetTag');
		throw e;
	}
	return ok({ id: tool.id });
}

/**
 * Corrects a tool's details (a mistyped range or tag). The change and what it replaced go to the admin log;
 * calibration history is untouched, and a retired tool stays retired.
 */
export async function updateTool(em: EntityManager, actor: Actor, toolId: string, input: ToolInput): Promise<Result> {
	const tool = await tools.findById(em, toolId);
	if (!tool) return refuse('No such tool.');
	if (!tool.active) return refuse('This tool is retired; its details can no longer change.');
	const other = await tools.findByAssetTag(em, input.assetTag);
	if (other && other.id !== tool.id) return refuse(DUPLICATE_TAG, 'assetTag');
	const fields = [
		'assetTag',
		'kind',
		'description',
		'rangeMin',
		'rangeMax',
		'unit',
		'resolution',
		'accuracyPct'
	] as const;
	const before: Record<string, unknown> = {};
	const after: Record<string, unknown> = {};
	for (const f of fields) {
		if (String(tool[f]) === String(input[f])) continue;
		before[f] = tool[f];
		after[f] = input[f];
	}
	if (!Object.keys(after).length) return ok(undefined);
	Object.assign(tool, input);
	adminLog.append(em, actor, {
		action: 'tool.updated',
		subjectType: 'tool',
		subjectId: tool.id,
		detail: { before, after }
	});
	try {
		await em.flush();
	} catch (e) {
		if (e instanceof UniqueConstraintViolationException) return refuse(DUPLICATE_TAG, 'assetTag');
		throw e;
	}
	return ok(undefined);
}

/**
 * Records a calibration or an in-house check. The server re-checks the dates against its own clock: a record
 * cannot be dated in the future, and a calibration's next due date must follow its date.
 */
export async function recordCalibration(
	em: EntityManager,
	actor: Actor,
	toolId: string,
	input: CalibrationInput,
	now: Date = new Date()
): Promise<Result<{ id: string }>> {
	const tool = await tools.findById(em, toolId);
	if (!tool) return refuse('No such tool.');
	if (!tool.active) return refuse('This tool is retired; its history is closed.');
	if (input.performedOn > isoDate(now)) return refuse('The calibration cannot be dated in the future.', 'performedOn');
	const isCal = input.kind === 'calibration';
	if (isCal && (!input.nextDueOn || input.nextDueOn <= input.performedOn))
		return refuse('The next due date must come after the calibration date.', 'nextDueOn');
	const row = tools.addCalibration(em, tool, actor, {
		kind: input.kind,
		performedOn: input.performedOn,
		certificateNo: input.certificateNo || null,
		asFound: input.asFound,
		asLeft: isCal ? input.asLeft || null : null,
		nextDueOn: isCal ? input.nextDueOn || null : null,
		notes: input.notes
	});
	adminLog.append(em, actor, {
		action: 'tool.calibration_recorded',
		subjectType: 'tool',
		subjectId: tool.id,
		detail: {
			assetTag: tool.assetTag,
			calibrationId: row.id,
			kind: row.kind,
			performedOn: row.performedOn,
			certificateNo: row.certificateNo,
			asFound: row.asFound,
			asLeft: row.asLeft,
			nextDueOn: row.nextDueOn
		}
	});
	await em.flush();
	return ok({ id: row.id });
}

/** Takes a tool out of service for good (lost, broken, scrapped); its history stays. */
export async function retireTool(em: EntityManager, actor: Actor, toolId: string, reason: string): Promise<Result> {
	const tool = await tools.findById(em, toolId);
	if (!tool) return refuse('No such tool.');
	if (!tool.active) return ok(undefined);
	tool.active = false;
	adminLog.append(em, actor, {
		action: 'tool.retired',
		subjectType: 'tool',
		subjectId: tool.id,
		detail: { assetTag: tool.assetTag, reason }
	});
	await em.flush();
	return ok(undefined);
}
