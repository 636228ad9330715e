/**
 * Reads the `key: value` body of a checkpoint, step-attribute or front-matter block with the
 * `yaml` package, and turns it into a tiny tree that keeps every value's source text and
 * document line. Source text matters: YAML would read `0.10` as the float 0.1 and lose both the
 * exactness and the written precision.
 */
import { isAlias, isMap, isScalar, isSeq, LineCounter, parseDocument, type Node as YamlNode } from 'yaml';

export type YValue =
	| { type: 'scalar'; text: string; isNull: boolean; line: number; column: number }
	| { type: 'seq'; items: YValue[]; line: number; column: number }
	| { type: 'map'; entries: YEntry[]; line: number; column: number };

export interface YEntry {
	key: string;
	line: number;
	column: number;
	value: YValue;
}

export interface YProblem {
	line: number;
	column: number;
	message: string;
}

export interface YBody {
	entries: YEntry[];
	errors: YProblem[];
	warnings: YProblem[];
}

/** Longest YAML message sentence kept; the package's pretty errors include a source excerpt we drop. */
function firstSentence(message: string): string {
	const line = message.split('\n')[0] ?? message;
	return line.replace(/ at line \d+, column \d+:?$/, '').trim();
}

/**
 * Parses `text` (the block's body) whose first line is document line `firstLine` and whose
 * lines were de-indented by `indent` columns.
 */
export function readYamlBody(text: string, firstLine: number, indent = 0): YBody {
	const errors: YProblem[] = [];
	const warnings: YProblem[] = [];
	const lc = new LineCounter();
	const doc = parseDocument(text, { prettyErrors: true, uniqueKeys: true, lineCounter: lc, schema: 'core' });
	const at = (offset: number) => {
		const p = lc.linePos(Math.max(0, Math.min(offset, text.length)));
		return { line: p.line + firstLine - 1, column: p.col + indent };
	};
	for (const e of doc.errors) {
		const pos = e.pos ? at(e.pos[0]) : { line: firstLine, column: 1 };
		const msg =
			e.code === 'DUPLICATE_KEY'
				? 'a key is written twice; keep one'
				: `this is not valid "key: value" text (${firstSentence(e.message)})`;
		errors.push({ ...pos, message: msg });
	}
	for (const w of doc.warnings) {
		const pos = w.pos ? at(w.pos[0]) : { line: firstLine, column: 1 };
		warnings.push({ ...pos, message: firstSentence(w.message) });
	}
	if (errors.length > 0) return { entries: [], errors, warnings };

	const convert = (node: unknown): YValue | undefined => {
		if (node === null || node === undefined) return undefined;
		const n = node as YamlNode;
		const pos = at(n.range ? n.range[0] : 0);
		if (isAlias(node)) {
			errors.push({ ...pos, message: 'aliases ("*name") are not allowed; write the value out' });
			return undefined;
		}
		if ((n as { anchor?: string }).anchor) {
			errors.push({ ...pos, message: 'anchors ("&name") are not allowed; write each value out' });
			return undefined;
		}
		if ((n as { tag?: string }).tag && !isMap(node) && !isSeq(node)) {
			const tag = (n as { tag?: string }).tag ?? '';
			if (!tag.startsWith('tag:yaml.org,2002:')) {
				errors.push({ ...pos, message: `YAML tags such as "${tag}" are not allowed` });
				return undefined;
			}
		}
		if (isScalar(node)) {
			const plain = node.type === 'PLAIN' || node.type === undefined;
			const src = node.range ? text.slice(node.range[0], node.range[1]).trim() : String(node.value ?? '');
			const isNull = node.value === null;
			// Plain scalars keep their source ("0.10", "12.50"); quoted and block scalars their value.
			const textValue = isNull ? '' : plain ? src.replace(/^!!\w+\s+/, '') : String(node.value);
			return { type: 'scalar', text: textValue, isNull, ...pos };
		}
		if (isSeq(node)) {
			const items: YValue[] = [];
			for (const item of node.items) {
				const v = convert(item);
				if (v) items.push(v);
			}
			return { type: 'seq', items, ...pos };
		}
		if (isMap(node)) {
			const entries: YEntry[] = [];
			for (const pair of node.items) {
				const key = pair.key;
				if (!isScalar(key)) {
					const kp = at((key as YamlNode | null)?.range?.[0] ?? n.range?.[0] ?? 0);
					errors.push({ ...kp, message: 'a key must be a plain word' });
					continue;
				}
				const kp = at(key.range ? key.range[0] : 0);
				const v = convert(pair.value) ?? { type: 'scalar' as const, text: '', isNull: true, ...kp };
				entries.push({ key: String(key.value), ...kp, value: v });
			}
			return { type: 'map', entries, ...pos };
		}
		errors.push({ ...pos, message: 'this value cannot be read' });
		return undefined;
	};

	const root = doc.contents;
	if (root === null || (isScalar(root) && root.value === null)) return { entries: [], errors, warnings };
	const top = convert(root);
	if (!top) return { entries: [], errors, warnings };
	if (top.type !== 'map') {
		errors.push({ line: top.line, column: top.column, message: 'write one "key: value" per line' });
		return { entries: [], errors, warnings };
	}
	return { entries: top.entries, errors, warnings };
}

/** Text of a scalar or of a list joined by ", " (so `tools: [a, b]` and `tools: a, b` read alike). */
export function asText(v: YValue): string | undefined {
	if (v.type === 'scalar') return v.isNull ? undefined : v.text;
	return undefined;
}

/** Items of a list value, or of a comma-separated scalar. */
export function asList(v: YValue): string[] | undefined {
	if (v.type === 'seq') {
		const out: string[] = [];
		for (const item of v.items) {
			if (item.type !== 'scalar') return undefined;
			out.push(item.text);
		}
		return out;
	}
	if (v.type === 'scalar') {
		if (v.isNull) return [];
		return v.text
			.split(',')
			.map((s) => s.trim())
			.filter((s) => s !== '');
	}
	return undefined;
}

/** Edit distance, for "did you mean" hints on misspelt keys. */
export function distance(a: string, b: string): number {
	if (Math.abs(a.length - b.length) > 3) return 99;
	const prev = Array.from({ length: b.length + 1 }, (_, i) => i);
	for (let i = 1; i <= a.length; i++) {
		let diag = prev[0];
		prev[0] = i;
		for (let j = 1; j <= b.length; j++) {
			const tmp = prev[j];
			prev[j] = Math.min(prev[j] + 1, prev[j - 1] + 1, diag + (a[i - 1] === b[j - 1] ? 0 : 1));
			diag = tmp;
		}
	}
	return prev[b.length];
}

/** "Did you mean …?" for an unknown key, or ''. */
export function suggestion(key: string, known: readonly string[]): string {
	let best = '';
	let bestD = 3;
	for (const k of known) {
		const d = distance(key.toLowerCase(), k);
		if (d < bestD) {
			bestD = d;
			best = k;
		}
	}
	return best ? ` Did you mean "${best}"?` : '';
}
