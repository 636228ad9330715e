/** Test-data factory for procedure and evaluation tests: small documents around checkpoint blocks. */
import type { Checkpoint, Procedure } from './model';
import { parse } from './parse';

/** A minimal valid document with one step holding the given Markdown. */
export function doc(stepBody: string, title = 'Test step'): string {
	return `---\ntitle: Test\nfamily: KX-7 (invented)\npurpose: Unit tests\n---\n\n## ${title}\n\n${stepBody}\n`;
}

/** A fenced checkpoint block. */
export function block(info: string, body: string): string {
	return '```' + info + '\n' + body.trim() + '\n```\n';
}

/** Parses a document that must be clean and returns it; throws with the problems otherwise. */
export function mustParse(source: string): Procedure {
	const r = parse(source);
	if (!r.procedure) throw new Error(r.errors.map((e) => `${e.line}:${e.column} ${e.message}`).join('\n'));
	return r.procedure;
}

/** Parses one checkpoint block (plus optional other blocks before it) and returns it by id. */
export function checkpoint(info: string, body: string, others = ''): Checkpoint {
	const p = mustParse(doc(others + '\n' + block(info, body)));
	const id = info.split(/\s+/)[1];
	const cp = p.steps.flatMap((s) => s.checkpoints).find((c) => c.id === id);
	if (!cp) throw new Error(`no checkpoint ${id}`);
	return cp;
}
