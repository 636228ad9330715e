import type { EntityManager } from '@mikro-orm/postgresql';
import { Calibration, Tool, type ICalibration, type ITool } from '../db/entities';
import { isoDate } from '../../registers/dates';
import type { ToolInput } from '../../registers/schema';
import type { CalibrationKind, ToleranceResult, ToolKind } from '../../registers/tool-kinds';
import { toolStatus, type ToolStatus } from '../../registers/tool-status';

/** A tool as pages, JSON routes and the bench runner see it: plain data with its status on the day asked about. */
export interface ToolSummary {
	id: string;
	assetTag: string;
	kind: ToolKind;
	description: string;
	rangeMin: string;
	rangeMax: string;
	unit: string;
	resolution: string;
	accuracyPct: string;
	active: boolean;
	lastCalibratedOn: string | null;
	status: ToolStatus;
}

export interface CalibrationRecord {
	id: string;
	kind: CalibrationKind;
	performedOn: string;
	certificateNo: string | null;
	asFound: ToleranceResult;
	asLeft: ToleranceResult | null;
	nextDueOn: string | null;
	notes: string;
	recordedByName: string | null;
	recordedAt: Date;
}

export const toCalibrationRecord = (c: ICalibration): CalibrationRecord => ({
	id: c.id,
	kind: c.kind,
	performedOn: c.performedOn,
	certificateNo: c.certificateNo ?? null,
	asFound: c.asFound,
	asLeft: c.asLeft ?? null,
	nextDueOn: c.nextDueOn ?? null,
	notes: c.notes,
	recordedByName: c.recordedByName ?? null,
	recordedAt: c.recordedAt
});

function summarise(tool: ITool, records: readonly ICalibration[], on: string): ToolSummary {
	const cals = records.filter((r) => r.kind === 'calibration').map((r) => r.performedOn);
	return {
		id: tool.id,
		assetTag: tool.assetTag,
		kind: tool.kind,
		description: tool.description,
		rangeMin: tool.rangeMin,
		rangeMax: tool.rangeMax,
		unit: tool.unit,
		resolution: tool.resolution,
		accuracyPct: tool.accuracyPct,
		active: tool.active,
		lastCalibratedOn: cals.sort().at(-1) ?? null,
		status: toolStatus(
			records.map((r) => ({ ...r, asLeft: r.asLeft ?? null, nextDueOn: r.nextDueOn ?? null })),
			on,
			tool.active
		)
	};
}

async function summariseAll(em: EntityManager, tools: ITool[], at: Date): Promise<ToolSummary[]> {
	if (tools.length === 0) return [];
	const records = await em.find(Calibration, { tool: { $in: tools.map((t) => t.id) } });
	const byTool = new Map<string, ICalibration[]>();
	for (const r of records) {
		const id = (r.tool as unknown as ITool).id;
		byTool.set(id, [...(byTool.get(id) ?? []), r]);
	}
	return tools.map((t) => summarise(t, byTool.get(t.id) ?? [], isoDate(at)));
}

export function findById(em: EntityManager, id: string): Promise<ITool | null> {
	return em.findOne(Tool, { id });
}

export function findByAssetTag(em: EntityManager, assetTag: string): Promise<ITool | null> {
	return em.findOne(Tool, { assetTag: assetTag.trim().toUpperCase() });
}

/** Every tool in the register (retired ones too), by asset tag, each with its status on `at` (default now). */
export async function listWithStatus(
	em: EntityManager,
	opts: { kind?: ToolKind; at?: Date } = {}
): Promise<ToolSummary[]> {
	const tools = await em.find(Tool, opts.kind ? { kind: opts.kind } : {}, { orderBy: { assetTag: 'asc' } });
	return summariseAll(em, tools, opts.at ?? new Date());
}

/**
 * The tools that may be chosen when signing on `at` (default now): active, calibrated, not past the next due date,
 * and not found out of tolerance since the last calibration that left them in tolerance (see `toolStatus`).
 * The bench runner refuses any other tool.
 */
export async function findUsable(em: EntityManager, opts: { kind?: ToolKind; at?: Date } = {}): Promise<ToolSummary[]> {
	const tools = await em.find(
		Tool,
		{ active: true, ...(opts.kind ? { kind: opts.kind } : {}) },
		{
			orderBy: { assetTag: 'asc' }
		}
	);
	return (await summariseAll(em, tools, opts.at ?? new Date())).filter((t) => t.status.usable);
}

/** One tool with its status on `at`, or null; for the runner to re-check the tool a signature names. */
export async function findSummary(em: EntityManager, id: string, at: Date = new Date()): Promise<ToolSummary | null> {
	const tool = await findById(em, id);
	return tool ? (await summariseAll(em, [tool], at))[0] : null;
}

/** Tools past due or due within `DUE_SOON_DAYS`, soonest first (retired tools left out). */
export async function listDueSoon(em: EntityManager, at: Date = new Date()): Promise<ToolSummary[]> {
	const all = await listWithStatus(em, { at });
	return all
		.filter((t) => t.active && (t.status.usable ? t.status.dueSoon : t.status.reason === 'past_due'))
		.sort((a, b) => (a.status.dueOn ?? '').localeCompare(b.status.dueOn ?? ''));
}

export function listCalibrations(em: EntityManager, toolId: string): Promise<ICalibration[]> {
	return em.find(Calibration, { tool: toolId }, { orderBy: { performedOn: 'desc', recordedAt: 'desc' } });
}

export function create(em: EntityManager, input: ToolInput): ITool {
	return em.create(Tool, { id: crypto.randomUUID(), ...input, active: true });
}

export function addCalibration(
	em: EntityManager,
	tool: ITool,
	actor: { id: string; name: string },
	data: Omit<CalibrationRecord, 'id' | 'recordedByName' | 'recordedAt'>
): ICalibration {
	return em.create(Calibration, {
		id: crypto.randomUUID(),
		tool,
		...data,
		recordedById: actor.id,
		recordedByName: actor.name
	});
}
