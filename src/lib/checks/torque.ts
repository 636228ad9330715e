/**
 * Torque checks that do not depend on a reading: does a registered torque tool suit a
 * fastener's target and tolerance, and what is the target of each pass of a multi-pass sequence.
 */
import { abs, div, type Exact, ex, gt, lt, min as minOf, mul, sub } from './exact';
import { formatQuantity, formatValue } from './format';
import { type Limits, limitsIn, within } from './limits';
import { convert, type Unit } from './units';

/** A torque tool as registered in the shop's tool list. */
export interface TorqueTool {
	kind: 'preset' | 'indicating';
	/** Lower end of the usable range; when absent, 20 % of max (see `usableRange`). */
	min?: Exact;
	max: Exact;
	unit: Unit;
	/** ± % of reading, e.g. 4 */
	accuracyPercent: Exact;
}

/** Errors block the step; warnings are shown and the technician may continue. */
export interface Suitability {
	ok: boolean;
	errors: string[];
	warnings: string[];
}

/**
 * Share of the maximum where a tool's usable range starts when the register gives no minimum:
 * ISO 6789-1:2017 specifies torque tools from 20 % to 100 % of their maximum (§5.1.5 usable
 * range, from memory).
 */
export const DEFAULT_MIN_SHARE = ex('0.2');

/**
 * Test accuracy ratio: the tool's band should be at most a quarter of the tolerance half-width
 * (the 4:1 rule, common practice, no source).
 */
export const ACCURACY_RATIO = ex(4);

/** The tool's usable range in its own unit. */
export function usableRange(tool: TorqueTool): { min: Exact; max: Exact } {
	return { min: tool.min ?? mul(tool.max, DEFAULT_MIN_SHARE), max: tool.max };
}

/**
 * Whether a tool may tighten to `target` with `tolerance`.
 *
 * Errors: a unit that is not a torque; the target outside the tool's usable range, or else a
 * limit outside it;
 * the target outside its own tolerance; the accuracy band (± accuracyPercent of the target)
 * wider than the tolerance half-width. Warning: the band wider than a quarter of the half-width.
 *
 * Half-width is the distance from the target to the nearer limit: for 24 ± 2 N·m it is 2 N·m;
 * for an asymmetric or one-sided tolerance the nearer side is the one the tool's error can break.
 */
export function toolSuitsTorque(tool: TorqueTool, target: Exact, targetUnit: Unit, tolerance: Limits): Suitability {
	const errors: string[] = [];
	const warnings: string[] = [];
	const done = (): Suitability => ({ ok: errors.length === 0, errors, warnings });
	for (const [what, u] of [
		["The tool's range", tool.unit],
		['The target', targetUnit],
		['The tolerance', tolerance.unit]
	] as const) {
		if (u.dimension !== 'torque') errors.push(`${what} is in ${u.symbol}, which is not a torque unit.`);
	}
	if (errors.length > 0) return done();

	const range = usableRange(tool);
	const rangeText = `${formatValue(range.min)}–${formatQuantity(range.max, tool.unit)}`;
	const inTool = (x: Exact, from: Unit): Exact => convert(x, from, tool.unit);
	/** Adds an error when x is outside the usable range; returns whether it was inside. */
	const checkInRange = (what: string, x: Exact, from: Unit): boolean => {
		const v = inTool(x, from);
		const side = lt(v, range.min) ? 'below' : gt(v, range.max) ? 'above' : undefined;
		if (!side) return true;
		const shown = from.id === tool.unit.id ? '' : ` (${formatQuantity(v, tool.unit)})`;
		errors.push(`${what} ${formatQuantity(x, from)}${shown} is ${side} the tool's usable range of ${rangeText}.`);
		return false;
	};
	// Limits are checked only when the target fits: otherwise their errors repeat the target's.
	if (checkInRange('The target', target, targetUnit)) {
		if (tolerance.min !== undefined) checkInRange('The lower limit', tolerance.min, tolerance.unit);
		if (tolerance.max !== undefined) checkInRange('The upper limit', tolerance.max, tolerance.unit);
	}

	const limits = limitsIn(tolerance, targetUnit);
	if (!within(target, limits)) {
		errors.push(`The target ${formatQuantity(target, targetUnit)} lies outside its own tolerance.`);
		return done();
	}
	const sides = [limits.min, limits.max].filter((b): b is Exact => b !== undefined);
	const halfWidth = sides.map((b) => abs(sub(b, target))).reduce(minOf);
	const band = abs(div(mul(target, tool.accuracyPercent), ex(100)));
	const accuracy =
		`The tool's accuracy of ±${formatValue(tool.accuracyPercent)} % ` +
		`(±${formatQuantity(band, targetUnit)} at ${formatQuantity(target, targetUnit)})`;
	const tol = `±${formatQuantity(halfWidth, targetUnit)}`;
	if (gt(band, halfWidth)) {
		errors.push(`${accuracy} is wider than the tolerance of ${tol}; use a more accurate tool.`);
	} else if (gt(mul(band, ACCURACY_RATIO), halfWidth)) {
		warnings.push(`${accuracy} is more than a quarter of the tolerance of ${tol}; a more accurate tool is advised.`);
	}
	return done();
}

/** Target of one pass of a multi-pass sequence: percent % of the final target (50 % of 24 → 12). */
export function passTarget(target: Exact, percent: Exact): Exact {
	return div(mul(target, percent), ex(100));
}
