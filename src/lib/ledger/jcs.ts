/**
 * RFC 8785 JSON Canonicalization Scheme (JCS), written here as a small pure module so the browser and the server
 * produce the same bytes for the same record — the bytes the ledger hashes.
 *
 * What RFC 8785 asks (section numbers from memory):
 * - §3.1 the input must be I-JSON (RFC 7493): no duplicate names, IEEE 754 double numbers, valid Unicode. A lone
 *   (unpaired) surrogate is not valid Unicode, so it is refused here rather than passed through. (ES2019's
 *   JSON.stringify would escape it as `\udxxx`, and a UTF-8 encoder would silently turn it into U+FFFD, so two
 *   different strings could hash alike — one more reason to refuse.)
 * - §3.2.1 no whitespace between tokens; `null`, `true`, `false` as literals.
 * - §3.2.2.2 strings as ECMAScript's JSON.stringify writes them: `"` → `\"`, `\` → `\\`, U+0008/09/0A/0C/0D →
 *   `\b \t \n \f \r`, every other control below U+0020 → `\u00xx` in lower-case hex; everything else, U+007F and
 *   non-ASCII included, literally.
 * - §3.2.2.3 numbers as ECMAScript's Number.prototype.toString writes them (shortest round-trip form, exponent
 *   from 1e21 up and below 1e-6, `-0` → `0`); NaN and ±Infinity are not JSON and are refused.
 * - §3.2.3 object members sorted by their names compared as arrays of UTF-16 code units (not code points, not
 *   locale order), recursively; array order is kept.
 *
 * Numbers are allowed because JCS defines them, but **discouraged** in ledger bodies: a reading such as 12.700 mm
 * would come back as `12.7` and lose the resolution it was read at. Readings are kept as decimal strings.
 *
 * Beyond JSON itself the module is strict so a hash can never cover something other than what is stored:
 * functions, symbols, bigint, `undefined` inside arrays (JSON.stringify would write `null`), array holes, cycles and
 * non-plain objects (Date, Map, class instances — whose `toJSON` would otherwise be called silently) are refused
 * with a {@link JcsError} naming the path. An `undefined` object member is left out, exactly as JSON.stringify and a
 * JSON round trip do, so a client object with an unset optional field hashes like the JSON the server receives.
 */

/** A JSON value as the ledger stores it. */
export type JsonValue = null | boolean | number | string | JsonValue[] | { [key: string]: JsonValue };

/** Thrown when a value cannot be canonicalised; `path` is a JSON-Pointer-like location such as `/body/readings/2`. */
export class JcsError extends Error {
	readonly path: string;
	constructor(path: string, problem: string) {
		super(`Cannot canonicalise the value at ${path || '/'}: ${problem}`);
		this.name = 'JcsError';
		this.path = path;
	}
}

const SHORT_ESCAPES: Record<string, string> = {
	'"': '\\"',
	'\\': '\\\\',
	'\b': '\\b',
	'\t': '\\t',
	'\n': '\\n',
	'\f': '\\f',
	'\r': '\\r'
};

// eslint-disable-next-line no-control-regex -- the control range is exactly what must be escaped
const NEEDS_ESCAPE = /["\\\u0000-\u001f]/g;

/** Offset of the first unpaired surrogate, or -1. A scan, not a regex: look-behind is missing on older tablets. */
function loneSurrogateAt(s: string): number {
	for (let i = 0; i < s.length; i++) {
		const u = s.charCodeAt(i);
		if (u < 0xd800 || u > 0xdfff) continue;
		if (u <= 0xdbff) {
			const next = s.charCodeAt(i + 1); // NaN past the end
			if (next >= 0xdc00 && next <= 0xdfff) {
				i++;
				continue;
			}
		}
		return i;
	}
	return -1;
}

function escapeChar(c: string): string {
	return SHORT_ESCAPES[c] ?? '\\u' + c.charCodeAt(0).toString(16).padStart(4, '0');
}

/** Anything that is not written as itself: quote, backslash, controls, and any surrogate (checked for pairing). */
// eslint-disable-next-line no-control-regex -- the control range is exactly what must be escaped
const NOT_PLAIN = /["\\\u0000-\u001f\ud800-\udfff]/;

/** Internal: a refusal on its way up; each level adds its path segment, so the happy path builds no paths. */
class Refusal {
	readonly segments: string[] = [];
	constructor(
		readonly problem: string,
		segment?: string
	) {
		if (segment !== undefined) this.segments.push(segment);
	}
}

function stringOrRefuse(s: string): string {
	if (!NOT_PLAIN.test(s)) return '"' + s + '"'; // the common case: nothing to escape or check
	const at = loneSurrogateAt(s);
	if (at >= 0) {
		const unit = s.charCodeAt(at).toString(16).toUpperCase();
		throw new Refusal(`the string holds a lone surrogate U+${unit} at offset ${at} (not valid Unicode)`);
	}
	return '"' + s.replace(NEEDS_ESCAPE, escapeChar) + '"';
}

function numberOrRefuse(n: number): string {
	if (!Number.isFinite(n)) throw new Refusal(`${n} is not a JSON number`);
	// ECMAScript Number::toString is exactly the serialisation RFC 8785 adopts; it already writes -0 as "0".
	return String(n);
}

function pointer(segments: readonly string[]): string {
	return segments
		.map((k) => '/' + k.replace(/~/g, '~0').replace(/\//g, '~1'))
		.reverse()
		.join('');
}

function asJcsError(e: unknown, path: string): unknown {
	return e instanceof Refusal ? new JcsError(path + pointer(e.segments), e.problem) : e;
}

/** The RFC 8785 §3.2.2.2 form of a string, quotes included. Throws {@link JcsError} on a lone surrogate. */
export function canonicalString(s: string, path = ''): string {
	try {
		return stringOrRefuse(s);
	} catch (e) {
		throw asJcsError(e, path);
	}
}

/** The RFC 8785 §3.2.2.3 form of a number. Throws {@link JcsError} on NaN and ±Infinity. */
export function canonicalNumber(n: number, path = ''): string {
	try {
		return numberOrRefuse(n);
	} catch (e) {
		throw asJcsError(e, path);
	}
}

function isPlainObject(v: object): boolean {
	const proto: unknown = Object.getPrototypeOf(v);
	return proto === Object.prototype || proto === null;
}

function describe(v: unknown): string {
	if (typeof v === 'object' && v !== null) {
		const proto: unknown = Object.getPrototypeOf(v);
		const name = (proto as { constructor?: { name?: string } } | null)?.constructor?.name;
		return name ? `a ${name} object` : 'an object that is not a plain object';
	}
	return `a ${typeof v}`;
}

/** Write `item`, the member `segment` of its parent; a refusal below gets `segment` added to its path. */
function writeChild(item: unknown, segment: string, seen: Set<object>, out: string[]): void {
	try {
		write(item, seen, out);
	} catch (e) {
		if (e instanceof Refusal) e.segments.push(segment);
		throw e;
	}
}

/**
 * Appends the canonical text of `v` to `out` as pieces, joined once at the end: building the text by `+=` made a
 * deep rope of short strings that cost 3–4× more to build and about 10× more to hash (V8 flattens it first) —
 * measured on the audit bench's record bodies.
 */
function write(v: unknown, seen: Set<object>, out: string[]): void {
	if (v === null) {
		out.push('null');
		return;
	}
	switch (typeof v) {
		case 'boolean':
			out.push(v ? 'true' : 'false');
			return;
		case 'number':
			out.push(numberOrRefuse(v));
			return;
		case 'string':
			out.push(stringOrRefuse(v));
			return;
		case 'object':
			break;
		case 'undefined':
			throw new Refusal('undefined is not a JSON value');
		default:
			throw new Refusal(`${describe(v)} is not a JSON value`);
	}
	const obj = v as object;
	if (seen.has(obj)) throw new Refusal('the value refers to itself (a cycle)');
	seen.add(obj);
	if (Array.isArray(obj)) {
		out.push('[');
		for (let i = 0; i < obj.length; i++) {
			if (!(i in obj)) throw new Refusal('the array has a hole here', String(i));
			const item: unknown = obj[i];
			if (item === undefined) {
				throw new Refusal('undefined inside an array is not a JSON value', String(i));
			}
			if (i) out.push(',');
			writeChild(item, String(i), seen, out);
		}
		out.push(']');
	} else {
		if (!isPlainObject(obj)) throw new Refusal(`${describe(obj)} is not a plain JSON object`);
		const record = obj as Record<string, unknown>;
		// The default sort compares strings by UTF-16 code units (ECMAScript IsLessThan), exactly RFC 8785 §3.2.3's
		// order — not code points, not locale.
		const keys = Object.keys(record).sort();
		out.push('{');
		let first = true;
		for (const key of keys) {
			const item = record[key];
			if (item === undefined) continue; // as JSON.stringify and a JSON round trip do
			let name: string;
			try {
				name = stringOrRefuse(key);
			} catch (e) {
				if (e instanceof Refusal) e.segments.push(key);
				throw e;
			}
			out.push(first ? name : ',' + name, ':');
			writeChild(item, key, seen, out);
			first = false;
		}
		out.push('}');
	}
	seen.delete(obj);
}

/**
 * The RFC 8785 canonical JSON text of `value`.
 *
 * @throws {JcsError} for anything that is not plain JSON (see the module comment), naming where it is.
 */
export function canonicalize(value: unknown): string {
	const out: string[] = [];
	try {
		write(value, new Set(), out);
	} catch (e) {
		throw asJcsError(e, '');
	}
	return out.join('');
}

/** Short alias of {@link canonicalize}. */
export const jcs = canonicalize;
