/**
 * One parser per checkpoint kind: `key: value` entries in, a typed checkpoint (or problems) out.
 * Every message is a sentence for a lead technician; the caller prefixes "Step n, checkpoint id:".
 */
import { add, cmp, div, type Exact, gt, mul, ratio, sign, sub, ex, lt } from '../checks/exact';
import { iso286Deviations, parseFit, fitLimits, parseToleranceClass } from '../checks/iso286';
import { convert, unitById, type Dimension, type Unit } from '../checks/units';
import { formatQuantity } from '../checks/format';
import { resolutionWarning, MATERIALS } from '../checks/measure';
import type {
	Checkpoint,
	CheckpointKind,
	ChoiceCheckpoint,
	ClearanceCheckpoint,
	ConfirmCheckpoint,
	FluidCheckpoint,
	IdentifierSpec,
	LimitsJson,
	MeasureCheckpoint,
	PartCheckpoint,
	PhotoCheckpoint,
	TestCheckpoint,
	TextCheckpoint,
	TorqueCheckpoint
} from './model';
import { compilePattern } from './pattern';
import {
	type ExactLimits,
	exactToString,
	isImpossible,
	limitsToJson,
	looksLikeClass,
	parseNumber,
	parseQuantity,
	parseTolerance,
	type Parsed
} from './quantity';
import { asList, asText, suggestion, type YEntry } from './yaml-body';

/** Where a problem goes; `at` is the entry the problem is about (its key line), or the fence. */
export interface Sink {
	error(at: { line: number; column: number } | undefined, message: string): void;
	warning(at: { line: number; column: number } | undefined, message: string): void;
}

/** Keys every kind accepts. */
const COMMON_KEYS = ['prompt'] as const;

/** Keys per kind, in the order FORMAT.md documents them. */
export const KIND_KEYS: Record<CheckpointKind, readonly string[]> = {
	torque: ['target', 'tolerance', 'fasteners', 'order', 'passes', 'angle', 'tool'],
	measure: [
		'feature',
		'nominal',
		'tolerance',
		'stages',
		'readings',
		'angles',
		'depths',
		'ovality',
		'taper',
		'material',
		'temperature',
		'zero-check',
		'resolution'
	],
	clearance: ['bore', 'shaft', 'fit', 'limits', 'resolution'],
	confirm: ['photo'],
	choice: ['options', 'then'],
	part: ['number', 'serial', 'lot', 'quantity'],
	fluid: ['spec', 'lot', 'amount', 'level', 'temperature'],
	test: ['value', 'qualification'],
	text: ['min-length'],
	photo: ['min']
};

/** Checkpoint input shared by all kinds. */
export interface CheckpointInput {
	kind: CheckpointKind;
	id: string;
	line: number;
	column: number;
	stepIndex: number;
	entries: YEntry[];
}

class Fields {
	private readonly map = new Map<string, YEntry>();
	constructor(
		private readonly input: CheckpointInput,
		private readonly sink: Sink
	) {
		const known = [...COMMON_KEYS, ...KIND_KEYS[input.kind]];
		for (const e of input.entries) {
			if (known.includes(e.key)) this.map.set(e.key, e);
			else
				sink.warning(
					e,
					`"${e.key}" is not a key of a ${input.kind} checkpoint, so it is ignored.${suggestion(e.key, known)}`
				);
		}
	}
	get fence() {
		return { line: this.input.line, column: this.input.column };
	}
	has(key: string): boolean {
		return this.map.has(key);
	}
	entry(key: string): YEntry | undefined {
		return this.map.get(key);
	}
	/** The entry, or an error at the fence naming the missing key with an example. */
	need(key: string, example: string): YEntry | undefined {
		const e = this.map.get(key);
		if (!e)
			this.sink.error(this.fence, `a ${this.input.kind} checkpoint needs "${key}", for example "${key}: ${example}".`);
		return e;
	}
	text(key: string, example?: string): string | undefined {
		const e = example === undefined ? this.map.get(key) : this.need(key, example);
		if (!e) return undefined;
		const t = asText(e.value);
		if (t === undefined || t.trim() === '') {
			this.sink.error(e, `"${key}" is empty; write a value${example ? `, for example "${key}: ${example}"` : ''}.`);
			return undefined;
		}
		return t.trim();
	}
	list(key: string): string[] | undefined {
		const e = this.map.get(key);
		if (!e) return undefined;
		const l = asList(e.value);
		if (!l) this.sink.error(e, `"${key}" must be a list such as [a, b] or a, b.`);
		return l;
	}
	int(key: string, min: number, max: number, fallback: number): number | undefined {
		const e = this.map.get(key);
		if (!e) return fallback;
		const t = asText(e.value)?.trim() ?? '';
		if (!/^\d+$/.test(t) || Number(t) < min || Number(t) > max) {
			this.sink.error(e, `"${key}" must be a whole number from ${min} to ${max}; "${t}" is not.`);
			return undefined;
		}
		return Number(t);
	}
	flag(key: string, fallback: boolean): boolean | undefined {
		const e = this.map.get(key);
		if (!e) return fallback;
		const t = (asText(e.value) ?? '').trim().toLowerCase();
		if (['yes', 'true', 'required', 'on'].includes(t)) return true;
		if (['no', 'false', 'off'].includes(t)) return false;
		this.sink.error(e, `"${key}" must be yes or no; "${t}" is neither.`);
		return undefined;
	}
	choiceOf<T extends string>(
		key: string,
		allowed: readonly T[],
		fallback: T,
		aliases: Record<string, T> = {}
	): T | undefined {
		const e = this.map.get(key);
		if (!e) return fallback;
		const t = (asText(e.value) ?? '').trim().toLowerCase();
		if ((allowed as readonly string[]).includes(t)) return t as T;
		if (t in aliases) return aliases[t];
		this.sink.error(e, `"${key}" must be one of ${allowed.join(', ')}; "${t}" is not.`);
		return undefined;
	}
}

function report<T>(sink: Sink, at: { line: number; column: number } | undefined, r: Parsed<T>): T | undefined {
	if (r.ok) return r.value;
	sink.error(at, sentence(r.message));
	return undefined;
}

/** Capital-free start (it follows "checkpoint id:"), full stop at the end. */
export function sentence(message: string): string {
	const m = message.trim();
	return /[.?!]$/.test(m) ? m : `${m}.`;
}

function limitsProblem(l: ExactLimits, what: string, allowNegative: boolean): string | undefined {
	if (isImpossible(l)) {
		return `the limits of ${what} are impossible: the minimum ${formatQuantity(l.min as Exact, l.unit)} is above the maximum ${formatQuantity(l.max as Exact, l.unit)}.`;
	}
	if (!allowNegative && ((l.min && sign(l.min) < 0) || (l.max && sign(l.max) < 0))) {
		return `the limits of ${what} go below zero, which is impossible for this quantity.`;
	}
	return undefined;
}

/**
 * A spec phrase with its own nominal: "5.5 L ±0.2 L", "18.25 mm H7", "300 to 350 kPa",
 * "max 0.05 mm". Returns limits in the nominal's (or the range's) unit.
 */
export function parseSpecPhrase(
	text: string,
	dims: readonly Dimension[],
	defaultUnit: Unit | undefined,
	opts: { allowClass?: boolean; allowPercent?: boolean } = {}
): Parsed<{ limits: ExactLimits; nominal?: Exact; cls?: string; tolerance: string }> {
	const t = text.trim();
	const oneSided = /^(max|maximum|at most|min|minimum|at least|≤|<=|≥|>=)\b|^[≤≥]/i.test(t);
	const ranged = /\s+to\s+|[–—]|\.\./i.test(t);
	if (oneSided || ranged) {
		// The unit at the end of the phrase tells its dimension ("max 0.05 mm", "300 to 350 kPa").
		let unit = defaultUnit;
		const anyUnit = /([A-Za-z°µ"″][^\d]*)$/.exec(t);
		if (anyUnit) {
			const q = parseQuantity(`1 ${anyUnit[1]}`, dims);
			if (!q.ok) return q;
			unit = q.value.unit;
		}
		if (!unit) return { ok: false, message: `"${t}" needs a unit` };
		const tol = parseTolerance(t, undefined, unit, false);
		if (!tol.ok) return tol;
		return { ok: true, value: { limits: tol.value.limits, tolerance: t } };
	}
	const m = /^([+-]?(?:\d+(?:\.\d*)?|\.\d+))\s*(.*)$/.exec(t);
	if (!m) return { ok: false, message: `"${t}" does not start with a number` };
	// Split "18.25 mm H7" / "5.5 L ±0.2 L" / "12 N·m ±10 %" at the start of the tolerance.
	const rest = m[2];
	const tolStart = rest.search(/±|\+\/-|\+-|\s[+-]\d|\s[A-Za-z]{1,2}\d{1,3}$|^[A-Za-z]{1,2}\d{1,3}$/);
	const unitText = tolStart < 0 ? rest : rest.slice(0, tolStart);
	const tolText = tolStart < 0 ? '' : rest.slice(tolStart).trim();
	const nominal = parseQuantity(`${m[1]} ${unitText}`, dims, defaultUnit);
	if (!nominal.ok) return nominal;
	if (tolText === '') {
		return {
			ok: false,
			message: `"${t}" has a nominal but no tolerance; add one such as ±0.1 ${nominal.value.unit.symbol}, or write a range`
		};
	}
	if (looksLikeClass(tolText)) {
		if (!opts.allowClass)
			return { ok: false, message: `a tolerance class such as ${tolText} is only for measured sizes` };
		const iso = isoLimits(nominal.value.value, nominal.value.unit, tolText);
		if (!iso.ok) return iso;
		return { ok: true, value: { limits: iso.value, nominal: nominal.value.value, cls: tolText, tolerance: tolText } };
	}
	const tol = parseTolerance(tolText, nominal.value, nominal.value.unit, opts.allowPercent ?? false);
	if (!tol.ok) return tol;
	return { ok: true, value: { limits: tol.value.limits, nominal: nominal.value.value, tolerance: tolText } };
}

/** ISO 286 limits of a class at a nominal; classes need a metric nominal (the tables are in mm). */
export function isoLimits(nominal: Exact, unit: Unit, cls: string): Parsed<ExactLimits> {
	const c = cls.trim();
	if (!parseToleranceClass(c)) {
		const r = iso286Deviations(nominal, c);
		return {
			ok: false,
			message: r.ok ? `"${c}" is not a tolerance class; write a letter and a grade such as H7` : r.message
		};
	}
	if (unit.dimension !== 'length') return { ok: false, message: `a tolerance class needs a length` };
	const mm = unitById('mm');
	const nominalMm = convert(nominal, unit, mm);
	if (unit.id !== 'mm' && unit.id !== 'um') {
		return { ok: false, message: `ISO 286 classes such as ${c} apply to metric sizes; write the nominal in mm` };
	}
	const r = iso286Deviations(nominalMm, c);
	if (!r.ok) return { ok: false, message: r.message };
	return {
		ok: true,
		value: { min: convert(add(nominalMm, r.lower), mm, unit), max: convert(add(nominalMm, r.upper), mm, unit), unit }
	};
}

function identifier(f: Fields, sink: Sink, key: string): IdentifierSpec | undefined | null {
	const t = f.text(key);
	if (t === undefined) return f.has(key) ? null : undefined;
	if (t.toLowerCase() === 'required' || t.toLowerCase() === 'yes') return {};
	const p = compilePattern(t);
	if (!p.ok) {
		sink.error(
			f.entry(key),
			`"${t}" is not a usable ${key} pattern: ${sentence(p.message)} Write # for a digit, @ for a letter, * for either.`
		);
		return null;
	}
	return { pattern: t };
}

type Base = { id: string; line: number; stepIndex: number; prompt?: string };

function baseOf(input: CheckpointInput, f: Fields): Base {
	const prompt = f.text('prompt');
	return { id: input.id, line: input.line, stepIndex: input.stepIndex, ...(prompt !== undefined && { prompt }) };
}

function torque(input: CheckpointInput, f: Fields, sink: Sink): TorqueCheckpoint | undefined {
	const targetText = f.text('target', '24 N·m');
	const tolText = f.text('tolerance', '±10 %');
	const fastenerEntry = f.need('fasteners', '6');
	if (targetText === undefined || tolText === undefined || !fastenerEntry) return undefined;
	const target = report(sink, f.entry('target'), parseQuantity(targetText, ['torque']));
	if (!target) return undefined;
	if (sign(target.value) <= 0) {
		sink.error(f.entry('target'), `a torque target must be greater than zero; "${targetText}" is not.`);
		return undefined;
	}
	const tol = report(sink, f.entry('tolerance'), parseTolerance(tolText, target, target.unit, true));
	if (!tol) return undefined;
	const l = tol.limits;
	const problem = limitsProblem(l, 'the torque', false);
	if (problem) {
		sink.error(f.entry('tolerance'), problem);
		return undefined;
	}
	if ((l.min && gt(l.min, target.value)) || (l.max && lt(l.max, target.value))) {
		sink.error(
			f.entry('tolerance'),
			`the target ${formatQuantity(target.value, target.unit)} lies outside its own limits; check the tolerance.`
		);
		return undefined;
	}

	let fasteners: string[];
	const countText = asText(fastenerEntry.value)?.trim() ?? '';
	if (fastenerEntry.value.type === 'scalar' && /^\d+$/.test(countText)) {
		const n = Number(countText);
		if (n < 1 || n > 200) {
			sink.error(fastenerEntry, `"fasteners" must be from 1 to 200; "${countText}" is not.`);
			return undefined;
		}
		fasteners = Array.from({ length: n }, (_, i) => String(i + 1));
	} else {
		const labels = f.list('fasteners');
		if (!labels) return undefined;
		if (labels.length === 0) {
			sink.error(fastenerEntry, `"fasteners" is empty; write a count such as 6 or labels such as [A1, A2].`);
			return undefined;
		}
		const dup = labels.find((x, i) => labels.indexOf(x) !== i);
		if (dup !== undefined) {
			sink.error(fastenerEntry, `fastener "${dup}" is listed twice.`);
			return undefined;
		}
		fasteners = labels;
	}

	let order = fasteners;
	if (f.has('order')) {
		const o = f.list('order');
		if (!o) return undefined;
		const missing = fasteners.filter((x) => !o.includes(x));
		const extra = o.filter((x) => !fasteners.includes(x));
		const dup = o.find((x, i) => o.indexOf(x) !== i);
		if (extra.length || missing.length || dup !== undefined) {
			const why = extra.length
				? `"${extra[0]}" is not one of the fasteners`
				: dup !== undefined
					? `"${dup}" appears twice`
					: `"${missing[0]}" is missing`;
			sink.error(f.entry('order'), `the tightening order must name every fastener exactly once; ${why}.`);
			return undefined;
		}
		order = o;
	}

	let percents: Exact[] = [ratio(100n, 1n)];
	if (f.has('passes')) {
		const items = f.list('passes');
		if (!items) return undefined;
		const parsed: Exact[] = [];
		for (const item of items) {
			const p = parseNumber(item.replace(/\s*%$/, ''));
			if (!p.ok || !item.trim().endsWith('%') || sign(p.value) <= 0 || gt(p.value, ex(100))) {
				sink.error(
					f.entry('passes'),
					`each pass is a percentage of the target from above 0 % to 100 %, such as 50 %; "${item}" is not.`
				);
				return undefined;
			}
			parsed.push(p.value);
		}
		for (let i = 1; i < parsed.length; i++) {
			if (cmp(parsed[i], parsed[i - 1]) <= 0) {
				sink.error(f.entry('passes'), `passes must rise, each above the one before (e.g. 50 %, 100 %).`);
				return undefined;
			}
		}
		if (parsed.length === 0 || cmp(parsed[parsed.length - 1], ex(100)) !== 0) {
			sink.error(f.entry('passes'), `the last pass must be 100 % (the full target).`);
			return undefined;
		}
		percents = parsed;
	}
	const hundred = ex(100);
	// An intermediate pass is a share of the final one: its target and its limits scale alike.
	const passes = percents.map((p) => {
		const k = div(p, hundred);
		const scaled: ExactLimits = { unit: l.unit };
		if (l.min) scaled.min = mul(l.min, k);
		if (l.max) scaled.max = mul(l.max, k);
		return { percent: exactToString(p), target: exactToString(mul(target.value, k)), limits: limitsToJson(scaled) };
	});

	const angles: TorqueCheckpoint['angles'] = [];
	if (f.has('angle')) {
		const items = f.list('angle');
		if (!items) return undefined;
		for (const item of items) {
			const [degText, tolPart] = item.split(/±|\+\/-/);
			const q = report(sink, f.entry('angle'), parseQuantity(degText.replace(/^\+/, ''), ['angle']));
			if (!q) return undefined;
			const deg = convert(q.value, q.unit, unitById('deg'));
			if (sign(deg) <= 0 || gt(deg, ex(720))) {
				sink.error(f.entry('angle'), `an angle stage is a turn from above 0° up to 720°; "${item}" is not.`);
				return undefined;
			}
			if (tolPart !== undefined) {
				const t = report(
					sink,
					f.entry('angle'),
					parseTolerance(`±${tolPart}`, { value: deg, unit: unitById('deg') }, unitById('deg'), false)
				);
				if (!t) return undefined;
				angles.push({ degrees: exactToString(deg), limits: limitsToJson(t.limits) });
			} else angles.push({ degrees: exactToString(deg) });
		}
	}
	const tool = f.choiceOf('tool', ['preset', 'indicating', 'any'] as const, 'any', {
		click: 'preset',
		dial: 'indicating',
		digital: 'indicating'
	});
	if (tool === undefined) return undefined;
	return {
		...baseOf(input, f),
		kind: 'torque',
		target: { value: exactToString(target.value), unit: target.unit.id },
		tolerance: tolText,
		limits: limitsToJson(l),
		fasteners,
		order,
		passes,
		angles,
		tool
	};
}

const MATERIAL_ALIASES: Record<string, string> = {
	aluminum: 'aluminium',
	'cast iron': 'cast_iron',
	'cast-iron': 'cast_iron'
};

function measure(input: CheckpointInput, f: Fields, sink: Sink): MeasureCheckpoint | undefined {
	const stages: MeasureCheckpoint['stages'] = [];
	let unit: Unit | undefined;
	const lengths: Dimension[] = ['length'];
	let classFeature: 'bore' | 'shaft' | undefined;
	if (f.has('stages')) {
		if (f.has('nominal') || f.has('tolerance')) {
			sink.error(f.entry('stages'), `write either "nominal" with "tolerance", or "stages", not both.`);
			return undefined;
		}
		const e = f.entry('stages') as YEntry;
		if (e.value.type !== 'map' || e.value.entries.length === 0) {
			sink.error(e, `"stages" lists each repair stage on its own indented line, such as "standard: 18 mm H7".`);
			return undefined;
		}
		for (const s of e.value.entries) {
			const t = asText(s.value);
			if (!t) {
				sink.error(s, `stage "${s.key}" needs a size such as 18.25 mm H7 or 18.20 to 18.27 mm.`);
				return undefined;
			}
			const r = report(sink, s, parseSpecPhrase(t, lengths, unit, { allowClass: true }));
			if (!r) return undefined;
			if (unit && r.limits.unit.id !== unit.id) {
				sink.error(s, `all stages must use the same unit (${unit.symbol}).`);
				return undefined;
			}
			unit = r.limits.unit;
			const problem = limitsProblem(r.limits, `stage "${s.key}"`, false);
			if (problem) {
				sink.error(s, problem);
				return undefined;
			}
			if (r.cls) classFeature = parseToleranceClass(r.cls)?.feature === 'hole' ? 'bore' : 'shaft';
			stages.push({
				name: s.key,
				...(r.nominal && { nominal: exactToString(r.nominal) }),
				tolerance: r.tolerance,
				...(r.cls && { toleranceClass: r.cls }),
				limits: limitsToJson(r.limits)
			});
		}
	} else {
		const tolText = f.text('tolerance', 'H7');
		if (tolText === undefined) return undefined;
		const nominalText = f.text('nominal');
		let nominal: { value: Exact; unit: Unit } | undefined;
		if (nominalText !== undefined) {
			nominal = report(sink, f.entry('nominal'), parseQuantity(nominalText, lengths));
			if (!nominal) return undefined;
			if (sign(nominal.value) <= 0) {
				sink.error(f.entry('nominal'), `a nominal size must be greater than zero.`);
				return undefined;
			}
		} else if (f.has('nominal')) return undefined;
		let limits: ExactLimits | undefined;
		let cls: string | undefined;
		if (looksLikeClass(tolText)) {
			if (!nominal) {
				sink.error(f.fence, `a tolerance class needs "nominal", for example "nominal: 18 mm".`);
				return undefined;
			}
			limits = report(sink, f.entry('tolerance'), isoLimits(nominal.value, nominal.unit, tolText));
			cls = tolText;
			if (limits) classFeature = parseToleranceClass(tolText)?.feature === 'hole' ? 'bore' : 'shaft';
		} else {
			const specUnit = nominal?.unit;
			let u = specUnit;
			if (!u) {
				const anyUnit = /([A-Za-z°µ"″][^\d]*)$/.exec(tolText);
				const q = anyUnit ? parseQuantity(`1 ${anyUnit[1]}`, lengths) : undefined;
				if (q && !q.ok) {
					sink.error(f.entry('tolerance'), sentence(q.message));
					return undefined;
				}
				u = q?.value.unit;
			}
			if (!u) {
				sink.error(f.entry('tolerance'), `"${tolText}" needs a unit such as mm or in.`);
				return undefined;
			}
			limits = report(sink, f.entry('tolerance'), parseTolerance(tolText, nominal, u, false))?.limits;
		}
		if (!limits) return undefined;
		const problem = limitsProblem(limits, 'the size', false);
		if (problem) {
			sink.error(f.entry('tolerance'), problem);
			return undefined;
		}
		unit = limits.unit;
		stages.push({
			name: 'standard',
			...(nominal && { nominal: exactToString(convert(nominal.value, nominal.unit, unit)) }),
			tolerance: tolText,
			...(cls && { toleranceClass: cls }),
			limits: limitsToJson(limits)
		});
	}
	if (!unit) return undefined;
	const specUnit = unit;

	let feature: 'bore' | 'shaft' | undefined = classFeature;
	if (f.has('feature')) {
		const v = f.choiceOf('feature', ['bore', 'shaft'] as const, 'bore', {
			hole: 'bore',
			piston: 'shaft',
			pin: 'shaft'
		});
		if (v === undefined) return undefined;
		if (classFeature && v !== classFeature) {
			sink.error(
				f.entry('feature'),
				`"feature: ${v}" disagrees with the tolerance class, which is for a ${classFeature === 'bore' ? 'hole (capital letter)' : 'shaft (small letter)'}.`
			);
			return undefined;
		}
		feature = v;
	}

	const angles = f.list('angles') ?? [];
	const depths = f.list('depths') ?? [];
	if ((f.has('angles') && !f.list('angles')) || (f.has('depths') && !f.list('depths'))) return undefined;
	let positions: string[];
	if (angles.length || depths.length) {
		const A = angles.length ? angles : [''];
		const D = depths.length ? depths : [''];
		positions = D.flatMap((d) => A.map((a) => [d, a].filter((x) => x !== '').join(', ')));
		if (f.has('readings')) {
			const n = f.int('readings', 1, 100, positions.length);
			if (n === undefined) return undefined;
			if (n !== positions.length) {
				sink.error(
					f.entry('readings'),
					`"readings: ${n}" does not match ${A.length} angle(s) × ${D.length} depth(s) = ${positions.length}; remove "readings" or correct it.`
				);
				return undefined;
			}
		}
	} else {
		const n = f.int('readings', 1, 100, 1);
		if (n === undefined) return undefined;
		positions = Array.from({ length: n }, (_, i) => String(i + 1));
	}

	const shapeLimit = (
		key: 'ovality' | 'taper',
		needs: number,
		have: number,
		what: string
	): LimitsJson | undefined | null => {
		const t = f.text(key);
		if (t === undefined) return f.has(key) ? null : undefined;
		if (have < needs) {
			sink.error(f.entry(key), `${key} needs readings at ${needs} or more ${what}; add "${what}".`);
			return null;
		}
		const r = report(sink, f.entry(key), parseTolerance(t, undefined, specUnit, false));
		if (!r) return null;
		const problem = limitsProblem(r.limits, key, false);
		if (problem) {
			sink.error(f.entry(key), problem);
			return null;
		}
		return limitsToJson(r.limits);
	};
	const ovality = shapeLimit('ovality', 2, angles.length, 'angles');
	const taper = shapeLimit('taper', 2, depths.length, 'depths');
	if (ovality === null || taper === null) return undefined;

	let material: string | undefined;
	if (f.has('material')) {
		const t = (f.text('material') ?? '').toLowerCase();
		const m = MATERIAL_ALIASES[t] ?? t.replace(/\s+/g, '_');
		if (!(MATERIALS as readonly string[]).includes(m)) {
			sink.error(
				f.entry('material'),
				`"${t}" is not a material Benchstamp knows; write one of ${MATERIALS.join(', ')}.`
			);
			return undefined;
		}
		material = m;
	}
	const temperature = f.choiceOf(
		'temperature',
		['off', 'optional', 'required'] as const,
		material ? 'optional' : 'off',
		{
			yes: 'required',
			no: 'off',
			true: 'required',
			false: 'off'
		}
	);
	if (temperature === undefined) return undefined;
	const zeroCheck = f.flag('zero-check', false);
	if (zeroCheck === undefined) return undefined;

	let resolution: string | undefined;
	if (f.has('resolution')) {
		const t = f.text('resolution');
		if (t === undefined) return undefined;
		const q = report(sink, f.entry('resolution'), parseQuantity(t, lengths, specUnit));
		if (!q) return undefined;
		if (sign(q.value) <= 0) {
			sink.error(f.entry('resolution'), `a gauge resolution must be greater than zero.`);
			return undefined;
		}
		const r = convert(q.value, q.unit, specUnit);
		resolution = exactToString(r);
		const first = stages[0].limits;
		const warn = resolutionWarning(r, {
			unit: specUnit,
			...(first.min && { min: mustDecimal(first.min) }),
			...(first.max && { max: mustDecimal(first.max) })
		});
		if (warn) sink.warning(f.entry('resolution'), sentence(warn));
	}
	return {
		...baseOf(input, f),
		kind: 'measure',
		...(feature && { feature }),
		unit: specUnit.id,
		stages,
		angles,
		depths,
		positions,
		...(ovality && { ovality }),
		...(taper && { taper }),
		...(material && { material }),
		temperature,
		zeroCheck,
		...(resolution && { resolution })
	};
}

function mustDecimal(s: string): Exact {
	const frac = /^(-?\d+)\/(\d+)$/.exec(s);
	if (frac) return ratio(BigInt(frac[1]), BigInt(frac[2]));
	const r = parseNumber(s);
	if (!r.ok) throw new RangeError(s);
	return r.value;
}

/** Clearance limits are filled in later when they come from the referenced measures. */
export type PendingClearance = Omit<ClearanceCheckpoint, 'limits'> & { limits?: LimitsJson };

function clearance(input: CheckpointInput, f: Fields, sink: Sink): PendingClearance | undefined {
	const bore = f.text('bore');
	const shaft = f.text('shaft');
	if ((bore === undefined) !== (shaft === undefined)) {
		sink.error(
			f.fence,
			`a clearance from measurements needs both "bore" and "shaft" (the ids of two measure checkpoints).`
		);
		return undefined;
	}
	let fit: ClearanceCheckpoint['fit'];
	let limits: ExactLimits | undefined;
	const mm = unitById('mm');
	if (f.has('fit')) {
		const t = f.text('fit');
		if (t === undefined) return undefined;
		const parsed = parseFit(t);
		if (!parsed) {
			sink.error(
				f.entry('fit'),
				`"${t}" is not a fit; write the size, the hole class and the shaft class, such as 18 H7/g6.`
			);
			return undefined;
		}
		const r = fitLimits(parsed);
		if (!r.ok) {
			sink.error(f.entry('fit'), sentence(r.message));
			return undefined;
		}
		fit = {
			text: t,
			nominal: exactToString(parsed.nominal),
			hole: parsed.hole,
			shaft: parsed.shaft,
			holeLimits: limitsToJson({ min: r.hole.min, max: r.hole.max, unit: mm }),
			shaftLimits: limitsToJson({ min: r.shaft.min, max: r.shaft.max, unit: mm })
		};
		limits = { min: r.minClearance, max: r.maxClearance, unit: mm };
	}
	if (f.has('limits')) {
		const t = f.text('limits');
		if (t === undefined) return undefined;
		const unitMatch = /([A-Za-zµ"″][^\d]*)$/.exec(t);
		let u = mm;
		if (unitMatch) {
			const q = parseQuantity(`1 ${unitMatch[1]}`, ['length']);
			if (!q.ok) {
				sink.error(f.entry('limits'), sentence(q.message));
				return undefined;
			}
			u = q.value.unit;
		}
		const r = report(sink, f.entry('limits'), parseTolerance(t, undefined, u, false));
		if (!r) return undefined;
		const problem = limitsProblem(r.limits, 'the clearance', true);
		if (problem) {
			sink.error(f.entry('limits'), problem);
			return undefined;
		}
		limits = r.limits;
	}
	if (!fit && bore === undefined && !limits) {
		sink.error(
			f.fence,
			`a clearance checkpoint needs "bore" and "shaft", a "fit" such as 18 H7/g6, or "limits" for a direct reading.`
		);
		return undefined;
	}
	let resolution: string | undefined;
	if (f.has('resolution')) {
		const t = f.text('resolution');
		const q =
			t === undefined
				? undefined
				: report(sink, f.entry('resolution'), parseQuantity(t, ['length'], limits?.unit ?? mm));
		if (!q) return undefined;
		resolution = exactToString(convert(q.value, q.unit, limits?.unit ?? mm));
	}
	return {
		...baseOf(input, f),
		kind: 'clearance',
		...(bore !== undefined && { bore }),
		...(shaft !== undefined && { shaft }),
		...(fit && { fit }),
		...(limits && { limits: limitsToJson(limits) }),
		...(resolution && { resolution })
	};
}

function confirm(input: CheckpointInput, f: Fields, sink: Sink): ConfirmCheckpoint | undefined {
	const prompt = f.text('prompt', 'The piston magnet faces the position sensor.');
	const photo = f.choiceOf('photo', ['off', 'optional', 'required'] as const, 'off', {
		yes: 'required',
		no: 'off',
		true: 'required',
		false: 'off'
	});
	if (prompt === undefined || photo === undefined) return undefined;
	void sink;
	return { ...baseOf(input, f), kind: 'confirm', prompt, photo };
}

function slug(label: string): string {
	return label
		.toLowerCase()
		.replace(/[^a-z0-9]+/g, '-')
		.replace(/^-+|-+$/g, '');
}

function choice(input: CheckpointInput, f: Fields, sink: Sink): ChoiceCheckpoint | undefined {
	const prompt = f.text('prompt', 'What was done with the sensor?');
	const e = f.need('options', '[reused, replaced new]');
	if (prompt === undefined || !e) return undefined;
	let options: { key: string; label: string; then: string[] }[] = [];
	if (e.value.type === 'map') {
		for (const o of e.value.entries) {
			const label = asText(o.value);
			options.push({ key: o.key, label: label?.trim() || o.key, then: [] });
		}
	} else {
		const list = f.list('options');
		if (!list) return undefined;
		options = list.map((label) => ({ key: slug(label), label, then: [] }));
	}
	if (options.length < 2) {
		sink.error(e, `a choice needs at least two options.`);
		return undefined;
	}
	const dupKey = options.find((o, i) => options.findIndex((x) => x.key === o.key) !== i);
	if (dupKey) {
		sink.error(e, `option "${dupKey.label}" is listed twice.`);
		return undefined;
	}
	const then = f.entry('then');
	if (then) {
		if (then.value.type !== 'map') {
			sink.error(
				then,
				`"then" lists, per option, the checkpoints it makes required, such as "replaced-new: [new-sensor]".`
			);
			return undefined;
		}
		for (const t of then.value.entries) {
			const opt = options.find((o) => o.key === t.key);
			if (!opt) {
				sink.error(t, `"then" names option "${t.key}", which is not one of ${options.map((o) => o.key).join(', ')}.`);
				return undefined;
			}
			const ids = asList(t.value);
			if (!ids) {
				sink.error(t, `write the checkpoint ids as a list, such as [new-sensor].`);
				return undefined;
			}
			opt.then = ids;
		}
	}
	return { ...baseOf(input, f), kind: 'choice', prompt, options };
}

function part(input: CheckpointInput, f: Fields, sink: Sink): PartCheckpoint | undefined {
	const e = f.need('number', 'BX-4471-##');
	if (!e) return undefined;
	const list = asList(e.value);
	if (!list || list.length === 0) {
		sink.error(
			e,
			`"number" is empty; write the part number, or a pattern such as BX-4471-## (# digit, @ letter, * either).`
		);
		return undefined;
	}
	const numbers: PartCheckpoint['numbers'] = [];
	for (const n of list) {
		const p = compilePattern(n);
		if (!p.ok) {
			sink.error(
				e,
				`"${n}" is not a usable part-number pattern: ${sentence(p.message)} Write # for a digit, @ for a letter, * for either.`
			);
			return undefined;
		}
		numbers.push(n);
	}
	const serial = identifier(f, sink, 'serial');
	const lot = identifier(f, sink, 'lot');
	const quantity = f.int('quantity', 1, 999, 1);
	if (serial === null || lot === null || quantity === undefined) return undefined;
	return { ...baseOf(input, f), kind: 'part', numbers, ...(serial && { serial }), ...(lot && { lot }), quantity };
}

function fluid(input: CheckpointInput, f: Fields, sink: Sink): FluidCheckpoint | undefined {
	const spec = f.text('spec', 'BG-DCF 4 (invented)');
	if (spec === undefined) return undefined;
	const lot = identifier(f, sink, 'lot');
	if (lot === null) return undefined;
	let amount: LimitsJson | undefined;
	if (f.has('amount')) {
		const t = f.text('amount');
		const r = t === undefined ? undefined : report(sink, f.entry('amount'), parseSpecPhrase(t, ['volume'], undefined));
		if (!r) return undefined;
		const problem = limitsProblem(r.limits, 'the amount', false);
		if (problem) {
			sink.error(f.entry('amount'), problem);
			return undefined;
		}
		amount = limitsToJson(r.limits);
	}
	let level: FluidCheckpoint['level'];
	if (f.has('level')) {
		const description = f.text('level');
		if (description === undefined) return undefined;
		level = { description };
		if (f.has('temperature')) {
			const t = f.text('temperature');
			const r =
				t === undefined
					? undefined
					: report(sink, f.entry('temperature'), parseSpecPhrase(t, ['temperature'], undefined));
			if (!r) return undefined;
			const problem = limitsProblem(r.limits, 'the fluid temperature', true);
			if (problem) {
				sink.error(f.entry('temperature'), problem);
				return undefined;
			}
			level.temperature = limitsToJson(r.limits);
		}
	} else if (f.has('temperature')) {
		sink.error(f.entry('temperature'), `"temperature" belongs to a level check; add "level" or remove it.`);
		return undefined;
	}
	if (!amount && !level) {
		sink.error(
			f.fence,
			`a fluid checkpoint needs "amount" (such as 5.5 L ±0.2 L) or "level" (where and how the level is checked).`
		);
		return undefined;
	}
	return {
		...baseOf(input, f),
		kind: 'fluid',
		spec,
		...(lot && { lot }),
		...(amount && { amount }),
		...(level && { level })
	};
}

function test(input: CheckpointInput, f: Fields, sink: Sink): TestCheckpoint | undefined {
	const prompt = f.text('prompt', 'Line pressure at idle, in drive');
	if (prompt === undefined) return undefined;
	let value: LimitsJson | undefined;
	if (f.has('value')) {
		const t = f.text('value');
		const r =
			t === undefined
				? undefined
				: report(
						sink,
						f.entry('value'),
						parseSpecPhrase(t, ['pressure', 'length', 'torque', 'volume', 'temperature', 'angle'], undefined, {
							allowPercent: true
						})
					);
		if (!r) return undefined;
		const problem = limitsProblem(r.limits, 'the test value', true);
		if (problem) {
			sink.error(f.entry('value'), problem);
			return undefined;
		}
		value = limitsToJson(r.limits);
	}
	const qualification = f.text('qualification');
	if (f.has('qualification') && qualification === undefined) return undefined;
	return {
		...baseOf(input, f),
		kind: 'test',
		prompt,
		...(value && { value }),
		...(qualification && { qualification })
	};
}

function text(input: CheckpointInput, f: Fields): TextCheckpoint | undefined {
	const prompt = f.text('prompt', 'Describe any scoring found');
	const minLength = f.int('min-length', 0, 2000, 1);
	if (prompt === undefined || minLength === undefined) return undefined;
	return { ...baseOf(input, f), kind: 'text', prompt, minLength };
}

function photo(input: CheckpointInput, f: Fields): PhotoCheckpoint | undefined {
	const prompt = f.text('prompt', 'Photograph the bores after cleaning');
	const min = f.int('min', 1, 50, 1);
	if (prompt === undefined || min === undefined) return undefined;
	return { ...baseOf(input, f), kind: 'photo', prompt, min };
}

/** Parses one checkpoint; undefined when it had errors (already sent to `sink`). */
export function parseCheckpoint(input: CheckpointInput, sink: Sink): Checkpoint | PendingClearance | undefined {
	const f = new Fields(input, sink);
	switch (input.kind) {
		case 'torque':
			return torque(input, f, sink);
		case 'measure':
			return measure(input, f, sink);
		case 'clearance':
			return clearance(input, f, sink);
		case 'confirm':
			return confirm(input, f, sink);
		case 'choice':
			return choice(input, f, sink);
		case 'part':
			return part(input, f, sink);
		case 'fluid':
			return fluid(input, f, sink);
		case 'test':
			return test(input, f, sink);
		case 'text':
			return text(input, f);
		case 'photo':
			return photo(input, f);
	}
}

/** Worst-case clearance limits of a bore/shaft pair: min bore − max shaft … max bore − min shaft. */
export function pairedClearance(bore: ExactLimits, shaft: ExactLimits, unit: Unit): ExactLimits | undefined {
	if (!bore.min || !bore.max || !shaft.min || !shaft.max) return undefined;
	const b = { min: convert(bore.min, bore.unit, unit), max: convert(bore.max, bore.unit, unit) };
	const s = { min: convert(shaft.min, shaft.unit, unit), max: convert(shaft.max, shaft.unit, unit) };
	return { min: sub(b.min, s.max), max: sub(b.max, s.min), unit };
}
