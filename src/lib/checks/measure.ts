/**
 * Bore and shaft measurement arithmetic: ovality and taper from several readings, correction of
 * a length measured on a warm or cold part to the 20 °C reference temperature, and warnings
 * about conditions that make a reading untrustworthy.
 */
import { abs, add, div, type Exact, ex, gt, max as maxOf, min as minOf, mul, sub } from './exact';
import { formatQuantity } from './format';
import type { Limits } from './limits';
import { convertInterval, type Unit, unitById } from './units';

function spread(values: readonly Exact[], what: string): Exact {
	if (values.length < 2) throw new RangeError(`${what} needs at least two readings.`);
	return sub(values.reduce(maxOf), values.reduce(minOf));
}

/**
 * Ovality (out-of-round) at one depth: largest minus smallest of the diameters read at several
 * angles (common practice, no source; a two-point reading, not a roundness measurement to
 * ISO 12181). Throws RangeError for fewer than two readings.
 */
export function ovality(readings: readonly Exact[]): Exact {
	return spread(readings, 'Ovality');
}

/**
 * Taper along a bore: largest minus smallest of the mean diameters at several depths (common
 * practice, no source). Means are used, not single readings, so that ovality at one depth is not
 * counted as taper. Throws RangeError for fewer than two depths.
 */
export function taper(depthMeans: readonly Exact[]): Exact {
	return spread(depthMeans, 'Taper');
}

/** Arithmetic mean, exact. Throws RangeError for no values. */
export function mean(values: readonly Exact[]): Exact {
	if (values.length === 0) throw new RangeError('A mean needs at least one value.');
	return div(values.reduce(add), ex(values.length));
}

/** Taper from the raw readings of each depth: `taper` of the mean at each depth. */
export function taperOfDepths(readingsByDepth: readonly (readonly Exact[])[]): Exact {
	return taper(readingsByDepth.map(mean));
}

/**
 * Materials a transmission bench measures. Alloys within a family vary by about ±10 %, so the
 * correction is an estimate; it is always shown beside the raw reading, never instead of it.
 */
export type Material = 'steel' | 'cast_iron' | 'aluminium' | 'cast_aluminium' | 'brass';

/** Linear expansion coefficients in 10⁻⁶ per °C, typical values near room temperature. */
const ALPHA_PER_MILLION: Readonly<Record<Material, string>> = {
	steel: '11.5', // carbon and low-alloy steel; ISO/TR 16015:2003 typical value, from memory
	cast_iron: '10.5', // grey cast iron; ISO/TR 16015:2003 typical value, from memory
	aluminium: '23', // wrought alloys (pure Al 23.1); ISO/TR 16015:2003 typical value, from memory
	cast_aluminium: '21', // Al-Si casting alloys of cases and valve bodies, 20–22; from memory, no single source
	brass: '19' // ISO/TR 16015:2003 typical value, from memory
};

/** Every material with a coefficient. */
export const MATERIALS = Object.keys(ALPHA_PER_MILLION) as Material[];

/** Linear expansion coefficient α per °C (exact rational of the tabulated value). */
export function expansionCoefficient(m: Material): Exact {
	return div(ex(ALPHA_PER_MILLION[m]), ex(1_000_000));
}

/** Reference temperature for lengths (ISO 1:2016). */
export const REFERENCE_TEMPERATURE_C = ex(20);

/**
 * The length at 20 °C of a part measured at partTempC: L20 = Lt / (1 + α (t − 20)), exact.
 * Assumes the instrument itself reads true (set to a master at 20 °C, or of negligible
 * expansion); the unit of the length does not matter.
 */
export function correctTo20C(valueMm: Exact, partTempC: Exact, m: Material): Exact {
	const growth = mul(expansionCoefficient(m), sub(partTempC, REFERENCE_TEMPERATURE_C));
	return div(valueMm, add(ex(1), growth));
}

/**
 * Largest difference from 20 °C at which readings are taken without a warning: 5 °C (common
 * practice, no source). A steel bore of 50 mm grows 2.9 µm over 5 °C, a quarter of an IT6.
 */
export const TEMPERATURE_WARNING_SPAN_C = ex(5);

/** A sentence when the part is more than 5 °C from 20 °C; undefined otherwise (5 °C exactly is fine). */
export function temperatureWarning(partTempC: Exact): string | undefined {
	const off = abs(sub(partTempC, REFERENCE_TEMPERATURE_C));
	if (!gt(off, TEMPERATURE_WARNING_SPAN_C)) return undefined;
	const degC = unitById('degC');
	return (
		`The part is at ${formatQuantity(partTempC, degC)}, ${formatQuantity(off, degC)} from the ` +
		`20 °C reference; let it settle or correct the reading for temperature.`
	);
}

/**
 * Share of the tolerance width an instrument's resolution may take: one tenth (the 10:1 rule,
 * common practice, no source).
 */
export const RESOLUTION_RATIO = ex(10);

/**
 * A sentence when the instrument's resolution (smallest step it shows) is coarser than a tenth
 * of the tolerance width; undefined when fine or when the limits are one-sided (no width).
 * `resolutionUnit` defaults to the limits' unit. Throws RangeError for a resolution ≤ 0.
 */
export function resolutionWarning(
	resolution: Exact,
	limits: Limits,
	resolutionUnit: Unit = limits.unit
): string | undefined {
	if (!gt(resolution, ex(0))) throw new RangeError('A resolution must be greater than zero.');
	if (limits.min === undefined || limits.max === undefined) return undefined;
	const width = sub(limits.max, limits.min);
	const step = convertInterval(resolution, resolutionUnit, limits.unit);
	if (!gt(mul(step, RESOLUTION_RATIO), width)) return undefined;
	return (
		`The instrument reads in steps of ${formatQuantity(resolution, resolutionUnit)}, coarser than a ` +
		`tenth of the ${formatQuantity(width, limits.unit)} tolerance; use a finer instrument.`
	);
}
