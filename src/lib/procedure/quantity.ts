/**
 * Reading the small quantity and tolerance phrases lead technicians write inside checkpoint
 * blocks ("12 N·m", "±10 %", "18.000 to 18.018 mm", "max 0.005 mm") into exact values, and
 * moving limits between the exact form used for judging and the decimal-string form stored in
 * the JSON model.
 */
import {
	add,
	div,
	type Exact,
	exact,
	decimalPlaces,
	mul,
	ratio,
	sub,
	toDecimalString,
	cmp,
	sign
} from '../checks/exact';
import { convert, convertInterval, findUnit, unitById, type Dimension, type Unit } from '../checks/units';
import type { LimitsJson } from './model';

/** Exact limits in a unit; either side may be open (a wear limit has only a max). */
export interface ExactLimits {
	min?: Exact;
	max?: Exact;
	unit: Unit;
}

export type Parsed<T> = { ok: true; value: T } | { ok: false; message: string };

const ok = <T>(value: T): Parsed<T> => ({ ok: true, value });
const bad = <T>(message: string): Parsed<T> => ({ ok: false, message });

const NUMBER_AT_START = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)/;

const DIMENSION_EXAMPLE: Record<Dimension, string> = {
	length: 'mm or in',
	torque: 'N·m, lbf·ft or lbf·in',
	volume: 'L, mL or US qt',
	angle: '° (degrees)',
	temperature: '°C or °F',
	pressure: 'kPa, bar or psi'
};

/** Decimal text → exact value, with a sentence for the usual mistakes. */
export function parseNumber(text: string): Parsed<Exact> {
	const t = text.trim();
	if (t === '') return bad('a number is missing');
	if (/^[+-]?\d+,\d+$/.test(t))
		return bad(`"${t}" uses a decimal comma; write a decimal point, e.g. ${t.replace(',', '.')}`);
	if (!NUMBER_AT_START.test(t)) return bad(`"${t}" is not a number`);
	const e = exact(t);
	return e ? ok(e) : bad(`"${t}" is not a number`);
}

/** "12 N·m" → value + unit. `dimensions` limits which kinds of unit are accepted. */
export function parseQuantity(
	text: string,
	dimensions: readonly Dimension[],
	defaultUnit?: Unit
): Parsed<{ value: Exact; unit: Unit }> {
	const t = text.trim();
	const m = NUMBER_AT_START.exec(t);
	if (!m) return bad(`"${t}" does not start with a number`);
	const num = parseNumber(m[0]);
	if (!num.ok) return num;
	const unitText = t.slice(m[0].length).trim();
	if (unitText.startsWith(',') && /^\d/.test(unitText.slice(1))) {
		return bad(`"${t}" uses a decimal comma; write a decimal point`);
	}
	if (unitText === '') {
		if (defaultUnit) return ok({ value: num.value, unit: defaultUnit });
		return bad(`"${t}" needs a unit such as ${DIMENSION_EXAMPLE[dimensions[0]]}`);
	}
	const unit = findUnit(unitText);
	if (!unit)
		return bad(
			`"${unitText}" is not a unit Benchstamp knows; write ${dimensions.map((d) => DIMENSION_EXAMPLE[d]).join(', or ')}`
		);
	if (!dimensions.includes(unit.dimension)) {
		return bad(
			`"${unitText}" is a unit of ${unit.dimension}; this needs ${dimensions.map((d) => DIMENSION_EXAMPLE[d]).join(', or ')}`
		);
	}
	return ok({ value: num.value, unit });
}

/** How a tolerance was written; kept in the model so a summary can say it the same way. */
export type ToleranceForm = 'plus-minus' | 'percent' | 'deviations' | 'range' | 'max' | 'min' | 'class';

export interface ToleranceResult {
	form: ToleranceForm;
	limits: ExactLimits;
}

const RANGE_SEPARATOR = /\s+to\s+|\s*[–—]\s*|\s*\.\.\s*/i;

/**
 * Reads a tolerance phrase against a nominal (when one is given) and returns limits in
 * `specUnit`. ISO 286 classes are handled by the caller (they need the table); this returns
 * `{ ok: false, message: 'class' }` style errors only through `looksLikeClass`.
 *
 * Forms: "±0.01 mm", "+/- 1.5 N·m", "±10 %", "+0.018/-0.000 mm", "11 to 13 N·m", "11–13 N·m",
 * "max 0.05 mm", "min 2.40 mm" (also "≤ x", "≥ x").
 */
export function parseTolerance(
	text: string,
	nominal: { value: Exact; unit: Unit } | undefined,
	specUnit: Unit,
	allowPercent: boolean
): Parsed<ToleranceResult> {
	const t = text.trim().replace(/^\+\/-|^\+-/, '±');
	const dims: Dimension[] = [specUnit.dimension];
	const inSpec = (v: Exact, u: Unit) => convert(v, u, specUnit);

	if (t.startsWith('±')) {
		const rest = t.slice(1).trim();
		if (!nominal)
			return bad(`"${t}" needs a nominal to be measured from; add "nominal:" or write a range such as 11 to 13`);
		if (rest.endsWith('%')) {
			if (!allowPercent) return bad(`a percentage tolerance is only for torque; write it in ${specUnit.symbol}`);
			const pct = parseNumber(rest.slice(0, -1));
			if (!pct.ok) return pct;
			if (sign(pct.value) < 0) return bad(`a tolerance of ${t} cannot be negative`);
			const delta = div(mul(nominal.value, pct.value), ratio(100n, 1n));
			return ok({
				form: 'percent',
				limits: {
					min: inSpec(sub(nominal.value, delta), nominal.unit),
					max: inSpec(add(nominal.value, delta), nominal.unit),
					unit: specUnit
				}
			});
		}
		const q = parseQuantity(rest, dims, nominal.unit);
		if (!q.ok) return q;
		if (sign(q.value.value) < 0) return bad(`a tolerance of ${t} cannot be negative`);
		const delta = convertInterval(q.value.value, q.value.unit, nominal.unit);
		return ok({
			form: 'plus-minus',
			limits: {
				min: inSpec(sub(nominal.value, delta), nominal.unit),
				max: inSpec(add(nominal.value, delta), nominal.unit),
				unit: specUnit
			}
		});
	}

	const dev = /^([+-]\s*[\d.]+)\s*\/\s*([+-]?\s*[\d.]+)\s*(.*)$/.exec(t);
	if (dev) {
		if (!nominal) return bad(`"${t}" needs a nominal; add "nominal:"`);
		const up = parseNumber(dev[1].replace(/\s+/g, ''));
		const lo = parseNumber(dev[2].replace(/\s+/g, ''));
		if (!up.ok) return up;
		if (!lo.ok) return lo;
		let unit = nominal.unit;
		if (dev[3].trim() !== '') {
			const u = findUnit(dev[3]);
			if (!u)
				return bad(`"${dev[3].trim()}" is not a unit Benchstamp knows; write ${DIMENSION_EXAMPLE[specUnit.dimension]}`);
			if (u.dimension !== specUnit.dimension)
				return bad(
					`"${dev[3].trim()}" is a unit of ${u.dimension}; this needs ${DIMENSION_EXAMPLE[specUnit.dimension]}`
				);
			unit = u;
		}
		const upper = convertInterval(up.value, unit, nominal.unit);
		const lower = convertInterval(lo.value, unit, nominal.unit);
		return ok({
			form: 'deviations',
			limits: {
				min: inSpec(add(nominal.value, lower), nominal.unit),
				max: inSpec(add(nominal.value, upper), nominal.unit),
				unit: specUnit
			}
		});
	}

	const oneSided = /^(max|maximum|at most|≤|<=|min|minimum|at least|≥|>=)\s*(.*)$/i.exec(t);
	if (oneSided) {
		const word = oneSided[1].toLowerCase();
		const isMax = word.startsWith('max') || word === 'at most' || word === '≤' || word === '<=';
		const q = parseQuantity(oneSided[2], dims, specUnit);
		if (!q.ok) return q;
		const v = inSpec(q.value.value, q.value.unit);
		return ok(
			isMax ? { form: 'max', limits: { max: v, unit: specUnit } } : { form: 'min', limits: { min: v, unit: specUnit } }
		);
	}

	const parts = t.split(RANGE_SEPARATOR);
	if (parts.length === 2) {
		const second = parseQuantity(parts[1], dims, specUnit);
		if (!second.ok) return second;
		const first = parseQuantity(parts[0], dims, second.value.unit);
		if (!first.ok) return first;
		return ok({
			form: 'range',
			limits: {
				min: inSpec(first.value.value, first.value.unit),
				max: inSpec(second.value.value, second.value.unit),
				unit: specUnit
			}
		});
	}
	return bad(
		`"${t}" is not a tolerance Benchstamp can read; write ±0.5 ${specUnit.symbol}${allowPercent ? ', ±10 %' : ''}, a range such as 11 to 13 ${specUnit.symbol}, or max/min followed by a value`
	);
}

/** True for text shaped like an ISO 286 class ("H7", "g6", "js5", and typos like "H77"). */
export function looksLikeClass(text: string): boolean {
	return /^[A-Za-z]{1,3}\d{1,3}$/.test(text.trim());
}

/**
 * Model form of an exact value: plain decimal text when it terminates ("25.021"), otherwise
 * "n/d" (a converted limit such as 50 N·m in lbf·ft has no finite decimal; rounding it would let
 * an on-limit reading fail).
 */
export function exactToString(e: Exact): string {
	return decimalPlaces(e) !== undefined ? toDecimalString(e) : `${e.n}/${e.d}`;
}

/** Inverse of {@link exactToString}; undefined for anything else. */
export function exactFromString(s: string): Exact | undefined {
	const frac = /^(-?\d+)\/(\d+)$/.exec(s);
	if (frac) {
		const d = BigInt(frac[2]);
		return d === 0n ? undefined : ratio(BigInt(frac[1]), d);
	}
	return exact(s);
}

export function limitsToJson(l: ExactLimits): LimitsJson {
	const out: LimitsJson = { unit: l.unit.id };
	if (l.min) out.min = exactToString(l.min);
	if (l.max) out.max = exactToString(l.max);
	return out;
}

/** Model limits → exact limits. Throws only on a corrupted model (the schema rules it out). */
export function limitsFromJson(j: LimitsJson): ExactLimits {
	const out: ExactLimits = { unit: unitById(j.unit) };
	if (j.min !== undefined) out.min = mustExact(j.min);
	if (j.max !== undefined) out.max = mustExact(j.max);
	return out;
}

export function mustExact(s: string): Exact {
	const e = exactFromString(s);
	if (!e) throw new RangeError(`not an exact value: ${s}`);
	return e;
}

/** min > max? */
export function isImpossible(l: ExactLimits): boolean {
	return l.min !== undefined && l.max !== undefined && cmp(l.min, l.max) > 0;
}
