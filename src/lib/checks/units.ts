/**
 * Units of the quantities a rebuild bench records, with exact conversion factors.
 *
 * Factors come from exact definitions (NIST SP 811:2008 appendix B states them as exact), not
 * from the rounded factors in its tables, so a conversion there and back is the identity and a
 * reading exactly on a limit stays exactly on it in any unit.
 */
import { add, div, ex, type Exact, mul, ratio, sub } from './exact';

/** Kind of quantity; conversion works only within one. */
export type Dimension = 'length' | 'torque' | 'volume' | 'angle' | 'temperature' | 'pressure';

/**
 * A unit: value in base units = value × toBase + (offset ?? 0).
 * Bases: length mm, torque N·m, volume L, angle degree, pressure kPa, temperature °C.
 * Only temperature uses an offset (°F is affine to °C).
 */
export interface Unit {
	readonly id: string;
	readonly symbol: string;
	readonly dimension: Dimension;
	readonly toBase: Exact;
	readonly offset?: Exact;
}

/** 1 in = 25.4 mm exactly (international inch, 1959). */
const INCH_MM = ex('25.4');
/** 1 lbf = 4.448 221 615 260 5 N exactly (NIST SP 811:2008 B.8, from the pound and g_n). */
const LBF_N = ex('4.4482216152605');
/** 1 US gallon = 231 in³ exactly; 1 in³ = 16.387 064 cm³ exactly. */
const US_GAL_L = mul(ex(231), ex('0.016387064'));
const INCH_M = ex('0.0254');

function unit(id: string, symbol: string, dimension: Dimension, toBase: Exact, offset?: Exact): Unit {
	return Object.freeze(offset ? { id, symbol, dimension, toBase, offset } : { id, symbol, dimension, toBase });
}

const UNITS: readonly Unit[] = [
	unit('mm', 'mm', 'length', ex(1)),
	unit('um', 'µm', 'length', ex('0.001')),
	unit('in', 'in', 'length', INCH_MM),
	unit('N_m', 'N·m', 'torque', ex(1)),
	unit('lbf_ft', 'lbf·ft', 'torque', mul(LBF_N, ex('0.3048'))),
	unit('lbf_in', 'lbf·in', 'torque', mul(LBF_N, INCH_M)),
	unit('L', 'L', 'volume', ex(1)),
	unit('mL', 'mL', 'volume', ex('0.001')),
	unit('US_qt', 'US qt', 'volume', div(US_GAL_L, ex(4))),
	unit('US_gal', 'US gal', 'volume', US_GAL_L),
	unit('deg', '°', 'angle', ex(1)),
	unit('degC', '°C', 'temperature', ex(1)),
	// °C = (°F − 32) × 5/9 = °F × 5/9 − 160/9
	unit('degF', '°F', 'temperature', ratio(5n, 9n), ratio(-160n, 9n)),
	unit('kPa', 'kPa', 'pressure', ex(1)),
	unit('bar', 'bar', 'pressure', ex(100)),
	// psi = lbf / in², in kPa: 4.448 221 615 260 5 N / 0.000 645 16 m² / 1000
	unit('psi', 'psi', 'pressure', div(LBF_N, mul(mul(INCH_M, INCH_M), ex(1000))))
];

const BY_ID = new Map(UNITS.map((u) => [u.id, u]));

/**
 * Spellings a technician writes, after `normalise` (lower case, micro signs → u, separators
 * · . - * and spaces removed, trailing plural s kept as its own entry).
 */
const SPELLINGS: Record<string, string> = {
	mm: 'mm',
	millimetre: 'mm',
	millimetres: 'mm',
	millimeter: 'mm',
	millimeters: 'mm',
	um: 'um',
	micrometre: 'um',
	micrometres: 'um',
	micrometer: 'um',
	micrometers: 'um',
	micron: 'um',
	microns: 'um',
	in: 'in',
	inch: 'in',
	inches: 'in',
	'"': 'in',
	'″': 'in',
	nm: 'N_m', // only reached through "N·m", "N m", "Nm"… — bare lower-case "nm" is refused first
	newtonmetre: 'N_m',
	newtonmetres: 'N_m',
	newtonmeter: 'N_m',
	newtonmeters: 'N_m',
	lbfft: 'lbf_ft',
	lbft: 'lbf_ft',
	lbsft: 'lbf_ft',
	ftlb: 'lbf_ft',
	ftlbs: 'lbf_ft',
	ftlbf: 'lbf_ft',
	poundfoot: 'lbf_ft',
	poundfeet: 'lbf_ft',
	footpound: 'lbf_ft',
	footpounds: 'lbf_ft',
	lbfin: 'lbf_in',
	lbin: 'lbf_in',
	lbsin: 'lbf_in',
	inlb: 'lbf_in',
	inlbs: 'lbf_in',
	inlbf: 'lbf_in',
	poundinch: 'lbf_in',
	poundinches: 'lbf_in',
	inchpound: 'lbf_in',
	inchpounds: 'lbf_in',
	l: 'L',
	litre: 'L',
	litres: 'L',
	liter: 'L',
	liters: 'L',
	ml: 'mL',
	millilitre: 'mL',
	millilitres: 'mL',
	milliliter: 'mL',
	milliliters: 'mL',
	usqt: 'US_qt',
	qt: 'US_qt',
	quart: 'US_qt',
	quarts: 'US_qt',
	usgal: 'US_gal',
	gal: 'US_gal',
	gallon: 'US_gal',
	gallons: 'US_gal',
	'°': 'deg',
	deg: 'deg',
	degree: 'deg',
	degrees: 'deg',
	'°c': 'degC',
	degc: 'degC',
	degreescelsius: 'degC',
	'°f': 'degF',
	degf: 'degF',
	degreesfahrenheit: 'degF',
	kpa: 'kPa',
	kilopascal: 'kPa',
	kilopascals: 'kPa',
	bar: 'bar',
	psi: 'psi'
};

function normalise(text: string): string {
	return text
		.normalize('NFKC') // U+00B5 micro sign → U+03BC mu, "º" stays distinct on purpose
		.toLowerCase()
		.replace(/μ/g, 'u')
		.replace(/[\s·⋅•.*\-‑–]/g, '');
}

/**
 * Finds a unit from what a person typed, tolerant of case and spelling ("N·m", "Nm", "ft-lbs",
 * "in-lb", "µm"/"um", "\"", "US qt", "°F", "psi"…). Returns undefined when unknown.
 *
 * Deliberately refused: bare "C"/"F" (coulomb, farad; write °C or degC) and bare lower-case "nm"
 * (the SI symbol of the nanometre; write N·m or Nm for torque).
 */
export function findUnit(text: string): Unit | undefined {
	const trimmed = text.trim();
	if (trimmed === 'nm') return undefined;
	const id = SPELLINGS[normalise(trimmed)];
	return id === undefined ? undefined : BY_ID.get(id);
}

/** The unit with this id; throws for an unknown id (ids are fixed in code, not typed by users). */
export function unitById(id: string): Unit {
	const u = BY_ID.get(id);
	if (!u) throw new RangeError(`unitById: no unit "${id}"`);
	return u;
}

/** Every unit of a dimension, base unit first. */
export function unitsOf(d: Dimension): Unit[] {
	return UNITS.filter((u) => u.dimension === d);
}

/** Every known unit. */
export function allUnits(): readonly Unit[] {
	return UNITS;
}

/** Whether a value in `from` can be expressed in `to`. */
export function sameDimension(from: Unit, to: Unit): boolean {
	return from.dimension === to.dimension;
}

/** Converts exactly. Throws when the dimensions differ (callers check with `sameDimension`). */
export function convert(value: Exact, from: Unit, to: Unit): Exact {
	if (from.dimension !== to.dimension) {
		throw new RangeError(`convert: cannot express ${from.dimension} (${from.symbol}) in ${to.symbol}`);
	}
	if (from.id === to.id) return value;
	let base = mul(value, from.toBase);
	if (from.offset) base = add(base, from.offset);
	if (to.offset) base = sub(base, to.offset);
	return div(base, to.toBase);
}

/**
 * Converts a difference (an interval, not a point): offsets cancel, so 9 °F of rise is 5 °C.
 * Use it for tolerances and deviations of temperatures; for every other dimension it equals
 * `convert`.
 */
export function convertInterval(value: Exact, from: Unit, to: Unit): Exact {
	if (from.dimension !== to.dimension) {
		throw new RangeError(`convert: cannot express ${from.dimension} (${from.symbol}) in ${to.symbol}`);
	}
	return div(mul(value, from.toBase), to.toBase);
}
