/**
 * Display text for quantities in sentences shown to technicians. Never used for a verdict.
 */
import { decimalPlaces, type Exact, toDecimalString, toSignificant } from './exact';
import type { Unit } from './units';

/** Decimal places beyond which a terminating value is shown rounded instead of in full. */
const MAX_EXACT_PLACES = 9;

/**
 * A value as a person would write it: exact when it terminates within 9 places ("25.021"),
 * otherwise 6 significant digits ("0.985079").
 */
export function formatValue(x: Exact): string {
	const places = decimalPlaces(x);
	if (places !== undefined && places <= MAX_EXACT_PLACES) return toDecimalString(x);
	return toSignificant(x, 6);
}

/** "25.021 mm", "24 N·m", "20 °C", "90°" (SI: a space before the symbol, none before °). */
export function formatQuantity(x: Exact, unit: Unit): string {
	const gap = unit.symbol === '°' ? '' : ' ';
	return `${formatValue(x)}${gap}${unit.symbol}`;
}
