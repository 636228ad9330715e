/**
 * Exact rational arithmetic on bigint.
 *
 * Readings, limits and unit factors are decimal text; binary floating point cannot hold 0.1 or
 * 25.021 exactly, so a reading that sits exactly on a limit could fail after a unit conversion.
 * Everything a verdict depends on is computed here, exactly; numbers appear only for display.
 */

/** Exact rational n/d, d > 0, always reduced. */
export interface Exact {
	readonly n: bigint;
	readonly d: bigint;
}

/**
 * Largest decimal exponent `exact` accepts. Beyond it a typo such as "1e999999999" would make
 * bigint allocate gigabytes; no workshop quantity needs more than a few dozen digits.
 */
export const MAX_EXPONENT = 1000;

const DECIMAL = /^([+-]?)(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/;

function absBig(x: bigint): bigint {
	return x < 0n ? -x : x;
}

function gcd(a: bigint, b: bigint): bigint {
	a = absBig(a);
	b = absBig(b);
	while (b !== 0n) [a, b] = [b, a % b];
	return a;
}

function pow10(k: number): bigint {
	return 10n ** BigInt(k);
}

/** Builds the reduced rational n/d. Throws RangeError when d is 0. */
export function ratio(n: bigint, d: bigint): Exact {
	if (d === 0n) throw new RangeError('ratio: denominator is zero');
	if (d < 0n) {
		n = -n;
		d = -d;
	}
	const g = gcd(n, d); // gcd(0, d) = d, so zero reduces to 0/1
	return Object.freeze({ n: n / g, d: d / g });
}

/** 0 */
export const ZERO: Exact = ratio(0n, 1n);
/** 1 */
export const ONE: Exact = ratio(1n, 1n);

/**
 * Parses plain decimal text: "12", "-0.021", "+3.5", "1.5e-3", ".5", "12.".
 * Returns undefined for anything else: "", whitespace (not trimmed — callers trim), "NaN",
 * "Infinity", "1,5", "0x10", or an exponent beyond ±MAX_EXPONENT.
 */
export function exact(text: string): Exact | undefined {
	const m = DECIMAL.exec(text);
	if (!m) return undefined;
	const [, sign, int = '', frac = '', expText] = m;
	if (int === '' && frac === '') return undefined; // ".", "+", "e5"
	const exp = expText === undefined ? 0 : Number(expText);
	if (!Number.isSafeInteger(exp) || Math.abs(exp) > MAX_EXPONENT) return undefined;
	let n = BigInt(int + frac === '' ? '0' : int + frac);
	if (sign === '-') n = -n;
	const scale = exp - frac.length;
	return scale >= 0 ? ratio(n * pow10(scale), 1n) : ratio(n, pow10(-scale));
}

/**
 * Convenience constructor for code and tests. Numbers go through their shortest decimal string
 * (so `ex(0.1)` is exactly 1/10, not the binary double). Throws on NaN, Infinity or text that
 * `exact` rejects: those are programmer errors here, user text goes through `exact`.
 */
export function ex(value: number | bigint | string): Exact {
	if (typeof value === 'bigint') return ratio(value, 1n);
	if (typeof value === 'number' && !Number.isFinite(value)) {
		throw new RangeError(`ex: ${value} is not a finite number`);
	}
	const parsed = exact(String(value));
	if (!parsed) throw new RangeError(`ex: "${value}" is not decimal text`);
	return parsed;
}

/** a + b */
export function add(a: Exact, b: Exact): Exact {
	return ratio(a.n * b.d + b.n * a.d, a.d * b.d);
}

/** a − b */
export function sub(a: Exact, b: Exact): Exact {
	return ratio(a.n * b.d - b.n * a.d, a.d * b.d);
}

/** a × b */
export function mul(a: Exact, b: Exact): Exact {
	return ratio(a.n * b.n, a.d * b.d);
}

/** a / b. Throws RangeError when b is zero. */
export function div(a: Exact, b: Exact): Exact {
	if (b.n === 0n) throw new RangeError('div: division by zero');
	return ratio(a.n * b.d, a.d * b.n);
}

/** −a */
export function neg(a: Exact): Exact {
	return ratio(-a.n, a.d);
}

/** |a| */
export function abs(a: Exact): Exact {
	return a.n < 0n ? neg(a) : a;
}

/** Three-way comparison. */
export function cmp(a: Exact, b: Exact): -1 | 0 | 1 {
	const l = a.n * b.d;
	const r = b.n * a.d;
	return l < r ? -1 : l > r ? 1 : 0;
}

/** a = b */
export function eq(a: Exact, b: Exact): boolean {
	return cmp(a, b) === 0;
}
/** a < b */
export function lt(a: Exact, b: Exact): boolean {
	return cmp(a, b) < 0;
}
/** a ≤ b */
export function le(a: Exact, b: Exact): boolean {
	return cmp(a, b) <= 0;
}
/** a > b */
export function gt(a: Exact, b: Exact): boolean {
	return cmp(a, b) > 0;
}
/** a ≥ b */
export function ge(a: Exact, b: Exact): boolean {
	return cmp(a, b) >= 0;
}
/** The smaller of a and b. */
export function min(a: Exact, b: Exact): Exact {
	return le(a, b) ? a : b;
}
/** The larger of a and b. */
export function max(a: Exact, b: Exact): Exact {
	return ge(a, b) ? a : b;
}
/** a = 0 */
export function isZero(a: Exact): boolean {
	return a.n === 0n;
}
/** −1, 0 or 1. */
export function sign(a: Exact): -1 | 0 | 1 {
	return a.n < 0n ? -1 : a.n > 0n ? 1 : 0;
}

/** Integer quotient n/d rounded half away from zero; d > 0. */
function roundDiv(n: bigint, d: bigint): bigint {
	const q = n / d; // truncates toward zero
	const r = absBig(n % d);
	if (2n * r >= d) return n < 0n ? q - 1n : q + 1n;
	return q;
}

/** Writes the integer q as a decimal with `places` digits after the point. */
function withPoint(q: bigint, places: number): string {
	const negative = q < 0n;
	let digits = absBig(q).toString();
	if (places > 0) {
		digits = digits.padStart(places + 1, '0');
		digits = `${digits.slice(0, -places)}.${digits.slice(-places)}`;
	}
	return negative ? `-${digits}` : digits;
}

function trimZeros(s: string): string {
	if (!s.includes('.')) return s;
	return s.replace(/0+$/, '').replace(/\.$/, '');
}

function checkPlaces(places: number): void {
	if (!Number.isInteger(places) || places < 0) {
		throw new RangeError(`places must be a whole number ≥ 0, got ${places}`);
	}
}

/**
 * Fixed-point text rounded half away from zero (for display only; verdicts never use it).
 * A value that rounds to zero prints without a minus sign.
 */
export function toFixed(a: Exact, places: number): string {
	checkPlaces(places);
	const q = roundDiv(a.n * pow10(places), a.d);
	return withPoint(q, places);
}

/** Number of decimal places a terminating rational needs, or undefined if it does not terminate. */
export function decimalPlaces(a: Exact): number | undefined {
	let d = a.d;
	let twos = 0;
	let fives = 0;
	while (d % 2n === 0n) {
		d /= 2n;
		twos++;
	}
	while (d % 5n === 0n) {
		d /= 5n;
		fives++;
	}
	return d === 1n ? Math.max(twos, fives) : undefined;
}

/**
 * Plain decimal text without trailing zeros: exact when the value terminates (whatever its
 * length), otherwise rounded half away from zero to `maxPlaces`.
 */
export function toDecimalString(a: Exact, maxPlaces = 12): string {
	checkPlaces(maxPlaces);
	const places = decimalPlaces(a);
	if (places !== undefined) return trimZeros(withPoint((a.n * pow10(places)) / a.d, places));
	return trimZeros(toFixed(a, maxPlaces));
}

/** Decimal exponent k with 10^k ≤ |a| < 10^(k+1); a ≠ 0. */
function magnitude(a: Exact): number {
	const n = absBig(a.n);
	let k = n.toString().length - a.d.toString().length;
	// the digit-count estimate is off by at most one
	const atLeast = (e: number): boolean => (e >= 0 ? n >= a.d * pow10(e) : n * pow10(-e) >= a.d);
	if (!atLeast(k)) k--;
	else if (atLeast(k + 1)) k++;
	return k;
}

/**
 * Display text with about `significant` significant digits (never fewer integer digits),
 * no trailing zeros. Terminating values short enough are printed exactly.
 */
export function toSignificant(a: Exact, significant = 6): string {
	if (a.n === 0n) return '0';
	const places = Math.max(0, significant - 1 - magnitude(a));
	return trimZeros(toFixed(a, places));
}

/** Nearest double (for charts and logs; never for a verdict). */
export function toNumber(a: Exact): number {
	const limit = 2n ** 53n;
	// both operands exact in a double, so IEEE division rounds correctly
	if (absBig(a.n) <= limit && a.d <= limit) return Number(a.n) / Number(a.d);
	if (a.n === 0n) return 0;
	const k = magnitude(a);
	const digits = roundDiv(k >= 20 ? a.n / pow10(k - 20) : a.n * pow10(20 - k), a.d);
	return Number(`${digits}e${k - 20}`);
}

const NM_PER_MM = 1_000_000n;

/** Nanometres → millimetres. */
export function fromNm(nm: bigint): Exact {
	return ratio(nm, NM_PER_MM);
}

/** Millimetres → whole nanometres, rounded half away from zero (for storage as integers). */
export function toNm(mm: Exact): bigint {
	return roundDiv(mm.n * NM_PER_MM, mm.d);
}
