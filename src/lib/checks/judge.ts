/**
 * The judging half of the engine: an entry already in its schema's output shape, judged against its checkpoint.
 * `evaluate` (./evaluate) parses with zod first and is what the server stores; `evaluateOnTablet` skips the parse
 * for entries the runner's own controls built, so the tablet judges with the very same functions without bundling
 * zod. Pure and deterministic: nothing here reads the clock, randomness, or anything outside its arguments.
 */
import type * as z from 'zod/mini';
import type {
	Checkpoint,
	ChoiceCheckpoint,
	ClearanceCheckpoint,
	ConfirmCheckpoint,
	FluidCheckpoint,
	LimitsJson,
	MeasureCheckpoint,
	PartCheckpoint,
	PhotoCheckpoint,
	TestCheckpoint,
	TextCheckpoint,
	TorqueCheckpoint
} from '../procedure/model';
import { compilePattern, describePattern, matchPattern } from '../procedure/pattern';
import { exactToString, limitsFromJson, limitsToJson, mustExact } from '../procedure/quantity';
import { ENGINE_VERSION } from '../procedure/version';
import {
	decimalPlaces,
	div,
	eq,
	type Exact,
	max as maxOf,
	min as minOf,
	mul,
	ratio,
	sign,
	sub,
	toFixed
} from './exact';
import { formatQuantity, formatValue } from './format';
import { judge, type Limits, limitsIn, parseReading, within } from './limits';
import {
	correctTo20C,
	mean,
	ovality,
	type Material,
	MATERIALS,
	resolutionWarning,
	taper,
	temperatureWarning
} from './measure';
import { toolSuitsTorque, type TorqueTool } from './torque';
import { convert, unitById, type Dimension, type Unit } from './units';
import type { entrySchemas, TorqueToolContext } from './entry-schemas';

/** The parsed (output) shape of a kind's entry, e.g. `EntryData<'measure'>`. */
export type EntryData<K extends keyof typeof entrySchemas> = z.output<(typeof entrySchemas)[K]>;

/** Reads another checkpoint's entry into its parsed shape (a clearance reads its two measures), or undefined. */
export type ReadEntry = <K extends Checkpoint['kind']>(kind: K, entry: unknown) => EntryData<K> | undefined;

/** Outcome of one reading, one derived value, or the whole checkpoint. */
export type Status = 'pass' | 'fail' | 'incomplete';

/** One judged line: a fastener in a pass, a bore reading, an ovality, a clearance… */
export interface ReadingResult {
	/** Stable key for the UI, e.g. "pass-1/P3", "reading-2", "ovality/top", "clearance/min". */
	key: string;
	/** Human label, e.g. "Pass 1 (50 %), P3". */
	label: string;
	status: Status;
	/** The value as judged, exact, in the entry unit ("25.0125" or "n/d"). */
	value?: string;
	/** Entry unit id. */
	unit?: string;
	/** The value before thermal correction, when one was applied (entry unit). */
	raw?: string;
	/** Display text rounded to the instrument's resolution, with unit: "25.013 mm". */
	display?: string;
	/** Limits as written in the procedure (spec unit). */
	limits?: LimitsJson;
	/** The same limits expressed exactly in the entry unit. */
	limitsInEntryUnit?: LimitsJson;
	reason?: string;
}

/** Result of evaluating one checkpoint entry. */
export interface Evaluation {
	engine: string;
	checkpointId: string;
	kind: Checkpoint['kind'];
	status: Status;
	readings: ReadingResult[];
	/** Sentences about the whole entry (missing confirmations, wrong stage…). */
	reasons: string[];
	/** Advice that does not change the verdict (resolution, temperature, tool accuracy). */
	warnings: string[];
	/** Checkpoint ids this entry makes required (a choice's follow-ups). */
	requires: string[];
}

/** What evaluation may need beyond the checkpoint and its entry. */
export interface EvaluationContext {
	tool?: TorqueToolContext;
	/** Other checkpoints of the procedure, by id (clearance needs its two measures). */
	checkpoints?: Record<string, Checkpoint>;
	/** Other entries of the run, by checkpoint id (clearance readings, choice follow-ups). */
	entries?: Record<string, unknown>;
	/** Qualifications of the person recording (for tests that require one). */
	qualifications?: string[];
}

function overall(readings: ReadingResult[], incomplete: boolean, failed = false): Status {
	if (failed || readings.some((r) => r.status === 'fail')) return 'fail';
	if (incomplete || readings.some((r) => r.status === 'incomplete')) return 'incomplete';
	return 'pass';
}

function safeUnit(
	id: string | undefined,
	fallback: Unit,
	dims: readonly Dimension[]
): { unit: Unit } | { reason: string } {
	if (id === undefined) return { unit: fallback };
	let u: Unit;
	try {
		u = unitById(id);
	} catch {
		return { reason: `"${id}" is not a unit id Benchstamp knows.` };
	}
	if (!dims.includes(u.dimension))
		return { reason: `${u.symbol} is a unit of ${u.dimension}; this needs a unit of ${dims.join(' or ')}.` };
	return { unit: u };
}

/** Rounds to a multiple of `step` (half away from zero) and prints with the step's places. */
export function roundToResolution(value: Exact, step: Exact): string {
	const q = div(value, step);
	const n = q.n < 0n ? -q.n : q.n;
	let whole = n / q.d;
	if ((n % q.d) * 2n >= q.d) whole += 1n;
	const rounded = mul(ratio(q.n < 0n ? -whole : whole, 1n), step);
	return toFixed(rounded, decimalPlaces(step) ?? 6);
}

function display(value: Exact, unit: Unit, resolution?: Exact): string {
	const text = resolution ? roundToResolution(value, resolution) : formatValue(value);
	return `${text}${unit.symbol === '°' ? '' : ' '}${unit.symbol}`;
}

/** Judges one typed reading; invalid text or a non-positive value when `positive` → incomplete. */
function judgeReading(
	key: string,
	label: string,
	text: string | undefined,
	unit: Unit,
	limits: Limits,
	opts: { positive?: boolean; resolution?: Exact; transform?: (v: Exact) => Exact } = {}
): { result: ReadingResult; value?: Exact } {
	const base = {
		key,
		label,
		unit: unit.id,
		limits: limitsToJson(limits),
		limitsInEntryUnit: limitsToJson(limitsIn(limits, unit))
	};
	if (text === undefined || text.trim() === '')
		return { result: { ...base, status: 'incomplete', reason: 'No reading yet.' } };
	const r = parseReading(text);
	if (!r.ok) return { result: { ...base, status: 'incomplete', reason: r.reason } };
	if (opts.positive && sign(r.value) <= 0) {
		return {
			result: {
				...base,
				status: 'incomplete',
				reason: `A reading of ${text.trim()} is not possible here; it must be greater than zero. Re-check and enter it again.`
			}
		};
	}
	const judged = opts.transform ? opts.transform(r.value) : r.value;
	const j = judge(judged, unit, limits);
	return {
		value: judged,
		result: {
			...base,
			status: j.verdict,
			value: exactToString(judged),
			...(opts.transform && { raw: exactToString(r.value) }),
			display: display(judged, unit, opts.resolution),
			...(j.reason && { reason: j.reason })
		}
	};
}

function toTool(t: TorqueToolContext): TorqueTool | undefined {
	const maxV = mustExactOrUndefined(t.max);
	const acc = mustExactOrUndefined(t.accuracyPercent);
	const minV = t.min === undefined ? undefined : mustExactOrUndefined(t.min);
	let unit: Unit;
	try {
		unit = unitById(t.unit);
	} catch {
		return undefined;
	}
	if (!maxV || !acc || (t.min !== undefined && !minV)) return undefined;
	return { kind: t.kind, max: maxV, unit, accuracyPercent: acc, ...(minV && { min: minV }) };
}

function mustExactOrUndefined(s: string): Exact | undefined {
	const r = parseReading(s);
	return r.ok ? r.value : undefined;
}

function evaluateTorque(
	cp: TorqueCheckpoint,
	entry: EntryData<'torque'>,
	out: Evaluation,
	ctx: EvaluationContext
): void {
	const specUnit = unitById(cp.target.unit);
	const target = mustExact(cp.target.value);
	const tool = ctx.tool ? toTool(ctx.tool) : undefined;
	if (ctx.tool && !tool) out.reasons.push('The torque tool record is incomplete or unreadable; choose the tool again.');
	let failed = false;
	const incomplete = !!(ctx.tool && !tool);
	if (tool) {
		const s = toolSuitsTorque(tool, target, specUnit, limitsFromJson(cp.limits));
		out.reasons.push(...s.errors);
		out.warnings.push(...s.warnings);
		if (!s.ok) failed = true;
	}
	const mode = tool?.kind ?? (cp.tool === 'any' ? undefined : cp.tool);
	if (tool && cp.tool !== 'any' && tool.kind !== cp.tool) {
		out.warnings.push(
			`This step calls for ${cp.tool === 'preset' ? 'a preset (click)' : 'an indicating'} wrench; a ${tool.kind} wrench was used.`
		);
	}
	const entryUnitChoice = safeUnit(entry.unit, tool?.unit ?? specUnit, ['torque']);
	if ('reason' in entryUnitChoice) {
		out.reasons.push(entryUnitChoice.reason);
		out.status = 'incomplete';
		return;
	}
	const entryUnit = entryUnitChoice.unit;
	cp.passes.forEach((pass, pi) => {
		const limits = limitsFromJson(pass.limits);
		const passTarget = mustExact(pass.target);
		const label = (f: string) => (cp.passes.length > 1 ? `Pass ${pi + 1} (${pass.percent} %), ${f}` : f);
		const records = entry.passes[pi] ?? {};
		for (const f of cp.order) {
			const key = `pass-${pi + 1}/${f}`;
			const rec = records[f];
			const usePreset =
				mode === 'preset' || (mode === undefined && rec?.value === undefined && rec?.reached !== undefined);
			if (usePreset) {
				const base = { key, label: label(f), limits: pass.limits, unit: (tool?.unit ?? specUnit).id };
				if (rec?.reached === undefined) {
					out.readings.push({ ...base, status: 'incomplete', reason: 'Not tightened yet.' });
					continue;
				}
				if (!rec.reached) {
					out.readings.push({
						...base,
						status: 'fail',
						reason: 'The wrench did not reach its setting; check the thread and the fastener before going on.'
					});
					continue;
				}
				const setText = ctx.tool?.setTo?.[pi];
				if (!tool || setText === undefined) {
					out.readings.push({
						...base,
						status: 'incomplete',
						reason: `Record the value the wrench was set to for ${cp.passes.length > 1 ? `pass ${pi + 1}` : 'this pass'}.`
					});
					continue;
				}
				const set = parseReading(setText);
				if (!set.ok || sign(set.value) <= 0) {
					out.readings.push({
						...base,
						status: 'incomplete',
						reason: `The wrench setting "${setText}" is not a usable torque.`
					});
					continue;
				}
				const setInSpec = convert(set.value, tool.unit, specUnit);
				const setText2 = formatQuantity(set.value, tool.unit);
				const okSet = tool.unit.id === specUnit.id ? eq(setInSpec, passTarget) : within(setInSpec, limits);
				out.readings.push({
					...base,
					status: okSet ? 'pass' : 'fail',
					value: exactToString(set.value),
					display: `set to ${setText2}, reached`,
					limitsInEntryUnit: limitsToJson(limitsIn(limits, tool.unit)),
					...(!okSet && {
						reason:
							tool.unit.id === specUnit.id
								? `The wrench was set to ${setText2}; this pass needs ${formatQuantity(passTarget, specUnit)}.`
								: `The wrench was set to ${setText2}, outside this pass's limits.`
					})
				});
				continue;
			}
			const r = judgeReading(key, label(f), rec?.value, entryUnit, limits, { positive: true });
			if (rec?.value === undefined) r.result.reason = 'Not tightened yet.';
			out.readings.push(r.result);
		}
	});
	const deg = unitById('deg');
	cp.angles.forEach((stage, ai) => {
		const records = entry.angles[ai] ?? {};
		const limits: Limits = stage.limits ? limitsFromJson(stage.limits) : { min: mustExact(stage.degrees), unit: deg };
		for (const f of cp.order) {
			const key = `angle-${ai + 1}/${f}`;
			const lbl = `Angle +${stage.degrees}°, ${f}`;
			const rec = records[f];
			if (rec?.value !== undefined) {
				out.readings.push(judgeReading(key, lbl, rec.value, deg, limits, { positive: true }).result);
			} else if (rec?.turned === true) {
				out.readings.push({
					key,
					label: lbl,
					status: 'pass',
					display: `turned +${stage.degrees}°`,
					limits: limitsToJson(limits),
					unit: deg.id
				});
			} else {
				out.readings.push({
					key,
					label: lbl,
					status: rec?.turned === false ? 'fail' : 'incomplete',
					reason: rec?.turned === false ? 'Not turned through the angle.' : 'Not turned yet.',
					limits: limitsToJson(limits),
					unit: deg.id
				});
			}
		}
	});
	out.status = overall(out.readings, incomplete, failed);
}

interface MeasureValues {
	values: (Exact | undefined)[];
	unit: Unit;
}

function evaluateMeasure(
	cp: MeasureCheckpoint,
	entry: EntryData<'measure'>,
	out: Evaluation
): MeasureValues | undefined {
	const specUnit = unitById(cp.unit);
	const stage = entry.stage === undefined ? cp.stages[0] : cp.stages.find((s) => s.name === entry.stage);
	let incomplete = false;
	if (!stage) {
		out.reasons.push(
			`"${entry.stage}" is not a stage of this measurement; choose one of ${cp.stages.map((s) => s.name).join(', ')}.`
		);
		out.status = 'incomplete';
		return undefined;
	}
	const u = safeUnit(entry.unit, specUnit, ['length']);
	if ('reason' in u) {
		out.reasons.push(u.reason);
		out.status = 'incomplete';
		return undefined;
	}
	const unit = u.unit;
	const limits = limitsFromJson(stage.limits);
	if (cp.zeroCheck && entry.zeroed !== true) {
		out.reasons.push('Confirm that the gauge was zeroed on its master before these readings.');
		incomplete = true;
	}

	let resolution: Exact | undefined;
	if (entry.resolution !== undefined) {
		const r = parseReading(entry.resolution);
		if (r.ok && sign(r.value) > 0) resolution = r.value;
		else out.reasons.push(`The gauge resolution "${entry.resolution}" is not a positive number.`);
	} else if (cp.resolution) resolution = convert(mustExact(cp.resolution), specUnit, unit);
	if (resolution) {
		const w = resolutionWarning(resolution, limits, unit);
		if (w) out.warnings.push(w);
	}

	let transform: ((v: Exact) => Exact) | undefined;
	if (entry.partTemperature !== undefined && entry.partTemperature.trim() !== '') {
		const t = parseReading(entry.partTemperature);
		if (!t.ok) {
			out.reasons.push(`Part temperature: ${t.reason}`);
			incomplete = true;
		} else {
			const tC = convert(t.value, unitById(entry.temperatureUnit ?? 'degC'), unitById('degC'));
			const material =
				cp.material && (MATERIALS as string[]).includes(cp.material) ? (cp.material as Material) : undefined;
			if (material) {
				transform = (v) => correctTo20C(v, tC, material);
				out.warnings.push(
					`Readings corrected to 20 °C for ${material.replace('_', ' ')} at ${formatQuantity(tC, unitById('degC'))}; the raw readings are kept beside them.`
				);
			} else {
				const w = temperatureWarning(tC);
				if (w) out.warnings.push(w);
			}
		}
	} else if (cp.temperature === 'required') {
		out.reasons.push('Enter the part temperature.');
		incomplete = true;
	}

	const values: (Exact | undefined)[] = [];
	cp.positions.forEach((pos, i) => {
		const r = judgeReading(
			`reading-${i + 1}`,
			cp.positions.length > 1 ? `Reading ${i + 1} (${pos})` : 'Reading',
			entry.readings[i],
			unit,
			limits,
			{
				positive: true,
				...(resolution && { resolution }),
				...(transform && { transform })
			}
		);
		out.readings.push(r.result);
		values.push(r.value);
	});
	if (entry.readings.length > cp.positions.length) {
		out.reasons.push(`${entry.readings.length} readings were entered; this measurement takes ${cp.positions.length}.`);
		incomplete = true;
	}

	const A = Math.max(1, cp.angles.length);
	const D = Math.max(1, cp.depths.length);
	const byDepth: Exact[][] = [];
	for (let d = 0; d < D; d++) {
		const row = values.slice(d * A, d * A + A);
		if (row.every((v): v is Exact => v !== undefined)) byDepth.push(row);
	}
	const derived = (key: string, label: string, v: Exact | undefined, lim: LimitsJson) => {
		const l = limitsFromJson(lim);
		if (v === undefined) {
			out.readings.push({
				key,
				label,
				status: 'incomplete',
				reason: 'Needs all readings first.',
				limits: lim,
				unit: unit.id
			});
			return;
		}
		const j = judge(v, unit, l);
		out.readings.push({
			key,
			label,
			status: j.verdict,
			value: exactToString(v),
			unit: unit.id,
			display: display(v, unit, resolution),
			limits: lim,
			limitsInEntryUnit: limitsToJson(limitsIn(l, unit)),
			...(j.reason && { reason: j.reason })
		});
	};
	if (cp.ovality && cp.angles.length >= 2) {
		for (let d = 0; d < D; d++) {
			const row = values.slice(d * A, d * A + A);
			const complete = row.every((v): v is Exact => v !== undefined);
			const where = cp.depths[d] ?? '';
			derived(
				`ovality/${where || d + 1}`,
				where ? `Ovality at ${where}` : 'Ovality',
				complete ? ovality(row as Exact[]) : undefined,
				cp.ovality
			);
		}
	}
	if (cp.taper && cp.depths.length >= 2) {
		derived('taper', 'Taper', byDepth.length === D ? taper(byDepth.map((row) => mean(row))) : undefined, cp.taper);
	}
	out.status = overall(out.readings, incomplete);
	return { values, unit };
}

function evaluateClearance(
	cp: ClearanceCheckpoint,
	entry: EntryData<'clearance'>,
	out: Evaluation,
	ctx: EvaluationContext,
	read: ReadEntry
): void {
	const limits = limitsFromJson(cp.limits);
	const res = cp.resolution ? mustExact(cp.resolution) : undefined;
	if (cp.bore && cp.shaft) {
		const sides: { min: Exact; max: Exact }[] = [];
		for (const [role, id] of [
			['bore', cp.bore],
			['shaft', cp.shaft]
		] as const) {
			const other = ctx.checkpoints?.[id];
			const otherEntry = ctx.entries?.[id];
			if (!other || other.kind !== 'measure') {
				out.reasons.push(`The ${role} measurement "${id}" is not available to work out the clearance.`);
				continue;
			}
			const parsed = read('measure', otherEntry ?? {});
			const sub0: Evaluation = { ...out, readings: [], reasons: [], warnings: [], requires: [] };
			const mv = parsed ? evaluateMeasure(other, parsed, sub0) : undefined;
			const vals = mv?.values.filter((v): v is Exact => v !== undefined) ?? [];
			if (!mv || vals.length === 0 || vals.length < mv.values.length) {
				out.reasons.push(`Record every reading of ${id} (${role}) first.`);
				continue;
			}
			const inUnit = vals.map((v) => convert(v, mv.unit, limits.unit));
			sides.push({ min: inUnit.reduce(minOf), max: inUnit.reduce(maxOf) });
		}
		if (sides.length < 2) {
			out.readings.push({
				key: 'clearance',
				label: 'Clearance',
				status: 'incomplete',
				limits: cp.limits,
				unit: limits.unit.id,
				reason: 'Waiting for both measurements.'
			});
			out.status = 'incomplete';
			return;
		}
		const [bore, shaft] = sides;
		// Worst-case pairing: the tightest and the loosest the pair can be.
		const pairs = [
			['clearance/min', 'Smallest clearance (smallest bore − largest shaft)', sub(bore.min, shaft.max)],
			['clearance/max', 'Largest clearance (largest bore − smallest shaft)', sub(bore.max, shaft.min)]
		] as const;
		for (const [key, label, v] of pairs) {
			const j = judge(v, limits.unit, limits);
			out.readings.push({
				key,
				label,
				status: j.verdict,
				value: exactToString(v),
				unit: limits.unit.id,
				display: display(v, limits.unit, res),
				limits: cp.limits,
				limitsInEntryUnit: cp.limits,
				...(j.reason && { reason: j.reason })
			});
		}
		out.status = overall(out.readings, false);
		return;
	}
	const u = safeUnit(entry.unit, limits.unit, ['length']);
	if ('reason' in u) {
		out.reasons.push(u.reason);
		out.status = 'incomplete';
		return;
	}
	// A clearance may be negative (interference), so no positivity check here.
	out.readings.push(
		judgeReading(
			'clearance',
			'Clearance',
			entry.reading,
			u.unit,
			limits,
			res ? { resolution: convert(res, limits.unit, u.unit) } : {}
		).result
	);
	out.status = overall(out.readings, false);
}

function evaluateConfirm(cp: ConfirmCheckpoint, entry: EntryData<'confirm'>, out: Evaluation): void {
	let incomplete = false;
	let failed = false;
	if (entry.confirmed === undefined) {
		out.reasons.push('Not confirmed yet.');
		incomplete = true;
	} else if (!entry.confirmed) {
		out.reasons.push(`Reported as not so: ${cp.prompt}`);
		failed = true;
	}
	if (cp.photo === 'required' && entry.photos.length === 0) {
		out.reasons.push('Add a photo showing it.');
		incomplete = true;
	}
	out.status = overall([], incomplete, failed);
}

function evaluateChoice(
	cp: ChoiceCheckpoint,
	entry: EntryData<'choice'>,
	out: Evaluation,
	ctx: EvaluationContext
): void {
	const opt = cp.options.find((o) => o.key === entry.option);
	if (!opt) {
		out.reasons.push(
			entry.option === undefined ? 'Choose one option.' : `"${entry.option}" is not one of the options.`
		);
		out.status = 'incomplete';
		return;
	}
	out.requires.push(...opt.then);
	let incomplete = false;
	if (ctx.entries) {
		for (const id of opt.then) {
			if (ctx.entries[id] === undefined) {
				out.reasons.push(`"${opt.label}" needs checkpoint ${id} recorded as well.`);
				incomplete = true;
			}
		}
	}
	out.status = overall([], incomplete);
}

function identifierCheck(
	what: string,
	value: string | undefined,
	pattern: string | undefined,
	out: Evaluation
): Status {
	if (value === undefined || value.trim() === '') {
		out.reasons.push(`Enter the ${what}.`);
		return 'incomplete';
	}
	if (pattern) {
		const p = compilePattern(pattern);
		if (p.ok && !matchPattern(p.pattern, value.trim())) {
			out.reasons.push(
				`The ${what} "${value.trim()}" does not match ${pattern} (${describePattern(p.pattern)}); check it.`
			);
			return 'incomplete';
		}
	}
	return 'pass';
}

function evaluatePart(cp: PartCheckpoint, entry: EntryData<'part'>, out: Evaluation): void {
	const statuses: Status[] = [];
	if (entry.number === undefined || entry.number.trim() === '') {
		out.reasons.push('Enter the part number.');
		statuses.push('incomplete');
	} else {
		const n = entry.number.trim();
		const matched = cp.numbers.some((src) => {
			const p = compilePattern(src);
			return p.ok && matchPattern(p.pattern, n);
		});
		if (!matched) {
			out.reasons.push(
				`Part number "${n}" is not one this step accepts (${cp.numbers.join(', ')}); check the part before fitting it.`
			);
			statuses.push('fail');
		}
	}
	if (cp.serial) statuses.push(identifierCheck('serial number', entry.serial, cp.serial.pattern, out));
	if (cp.lot) statuses.push(identifierCheck('lot number', entry.lot, cp.lot.pattern, out));
	const qty = entry.quantity ?? (cp.quantity === 1 ? 1 : undefined);
	if (qty === undefined) {
		out.reasons.push(`Enter the quantity fitted (${cp.quantity}).`);
		statuses.push('incomplete');
	} else if (qty !== cp.quantity) {
		out.reasons.push(`${qty} fitted; this step needs ${cp.quantity}.`);
		statuses.push('fail');
	}
	out.status = statuses.includes('fail') ? 'fail' : statuses.includes('incomplete') ? 'incomplete' : 'pass';
}

function evaluateFluid(cp: FluidCheckpoint, entry: EntryData<'fluid'>, out: Evaluation): void {
	let incomplete = false;
	let failed = false;
	if (entry.specConfirmed !== true) {
		out.reasons.push(`Confirm the fluid is ${cp.spec}.`);
		incomplete = true;
	}
	if (cp.lot && identifierCheck('fluid lot', entry.lot, cp.lot.pattern, out) !== 'pass') incomplete = true;
	if (cp.amount) {
		const l = limitsFromJson(cp.amount);
		const u = safeUnit(entry.unit, l.unit, ['volume']);
		if ('reason' in u) {
			out.reasons.push(u.reason);
			incomplete = true;
		} else
			out.readings.push(judgeReading('amount', 'Amount filled', entry.amount, u.unit, l, { positive: true }).result);
	}
	if (cp.level) {
		if (cp.level.temperature) {
			const l = limitsFromJson(cp.level.temperature);
			const r = judgeReading(
				'level-temperature',
				'Fluid temperature at the level check',
				entry.temperature,
				unitById(entry.temperatureUnit ?? 'degC'),
				l
			);
			if (r.result.status === 'fail') {
				// A level read at the wrong temperature is not a fault of the unit: read it again.
				r.result.status = 'incomplete';
				r.result.reason = `${r.result.reason} Check the level again within the stated temperature.`;
			}
			out.readings.push(r.result);
		}
		if (entry.level === undefined) {
			out.reasons.push(`Check the level: ${cp.level.description}.`);
			incomplete = true;
		} else if (entry.level !== 'ok') {
			out.reasons.push(
				entry.level === 'low'
					? 'Level low: top up and check again.'
					: 'Level high: drain to the correct level and check again.'
			);
			failed = true;
		}
	}
	out.status = overall(out.readings, incomplete, failed);
}

function evaluateTest(cp: TestCheckpoint, entry: EntryData<'test'>, out: Evaluation, ctx: EvaluationContext): void {
	let incomplete = false;
	let failed = false;
	if (cp.qualification && ctx.qualifications && !ctx.qualifications.includes(cp.qualification)) {
		out.reasons.push(`This test must be done by a person qualified for: ${cp.qualification}.`);
		incomplete = true;
	}
	if (entry.result === undefined) {
		out.reasons.push('Record whether the test passed.');
		incomplete = true;
	} else if (entry.result === 'fail') {
		out.reasons.push('The test was recorded as failed.');
		failed = true;
	}
	if (cp.value) {
		const l = limitsFromJson(cp.value);
		const u = safeUnit(entry.unit, l.unit, [l.unit.dimension]);
		if ('reason' in u) {
			out.reasons.push(u.reason);
			incomplete = true;
		} else out.readings.push(judgeReading('value', 'Test value', entry.reading, u.unit, l).result);
	}
	out.status = overall(out.readings, incomplete, failed);
}

function evaluateText(cp: TextCheckpoint, entry: EntryData<'text'>, out: Evaluation): void {
	const t = (entry.text ?? '').trim();
	if (t.length < Math.max(1, cp.minLength)) {
		out.reasons.push(t.length === 0 ? 'Nothing written yet.' : `Write at least ${cp.minLength} characters.`);
		out.status = 'incomplete';
	} else out.status = 'pass';
}

function evaluatePhoto(cp: PhotoCheckpoint, entry: EntryData<'photo'>, out: Evaluation): void {
	const n = new Set(entry.photos).size;
	if (n < cp.min) {
		out.reasons.push(`${n} of ${cp.min} photo${cp.min === 1 ? '' : 's'} taken.`);
		out.status = 'incomplete';
	} else out.status = 'pass';
}

/** One kind's judging function: the checkpoint, its parsed entry, the result to fill, and the run around it. */
type Judge<C extends Checkpoint> = (
	cp: C,
	entry: never,
	out: Evaluation,
	ctx: EvaluationContext,
	read: ReadEntry
) => void;

const JUDGES: { [K in Checkpoint['kind']]: Judge<Extract<Checkpoint, { kind: K }>> } = {
	torque: evaluateTorque,
	measure: evaluateMeasure,
	clearance: evaluateClearance,
	confirm: evaluateConfirm,
	choice: evaluateChoice,
	part: evaluatePart,
	fluid: evaluateFluid,
	test: evaluateTest,
	text: evaluateText,
	photo: evaluatePhoto
};

/** A fresh result for `checkpoint`, not judged yet. */
export function emptyEvaluation(checkpoint: Checkpoint): Evaluation {
	return {
		engine: ENGINE_VERSION,
		checkpointId: checkpoint.id,
		kind: checkpoint.kind,
		status: 'incomplete',
		readings: [],
		reasons: [],
		warnings: [],
		requires: []
	};
}

/**
 * Judges `data`, an entry already in its kind's parsed shape, into `out`. Never throws: an internal error leaves the
 * entry `incomplete` with the reason.
 */
export function judgeParsed(
	checkpoint: Checkpoint,
	data: unknown,
	context: EvaluationContext,
	read: ReadEntry,
	out: Evaluation = emptyEvaluation(checkpoint)
): Evaluation {
	try {
		(JUDGES[checkpoint.kind] as Judge<Checkpoint>)(checkpoint, data as never, out, context, read);
	} catch (e) {
		out.status = 'incomplete';
		out.readings = [];
		out.reasons.push(`This entry could not be judged (internal error: ${e instanceof Error ? e.message : String(e)}).`);
	}
	return out;
}
