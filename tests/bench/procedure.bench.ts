/** Parse + validate a generated 300-step procedure, compared with marked's lexer alone; evaluations per second. */
import { marked } from 'marked';
import { evaluate } from '../../src/lib/checks/evaluate';
import { parse } from '../../src/lib/procedure/parse';
import type { Checkpoint } from '../../src/lib/procedure/model';

export const title = 'procedure engine';

/** Goal from the brief: parse + validate within 15× the time of `marked.lexer` on the same text. */
const RATIO_GOAL = 15;

function fence(info: string, body: string): string {
	return '```' + info + '\n' + body + '\n```\n';
}

/** A 300-step procedure with prose, callouts and checkpoints of several kinds. */
export function generate(steps = 300): string {
	const parts = [
		'---\ntitle: Generated bench procedure\nfamily: KTX-7 (invented)\npurpose: Benchmark\nspecs: invented\n---\n\n> Warning: generated text.\n'
	];
	for (let i = 1; i <= steps; i++) {
		parts.push(`\n## Step ${i}: work on item ${i}\n\n`);
		parts.push(
			fence(
				'step',
				`critical: ${i % 3 === 0 ? 'yes' : 'no'}\nminutes: ${5 + (i % 20)}\ntools: [torque wrench, bore gauge]`
			)
		);
		parts.push(
			`\nClean the part with **lint-free** cloth, then check it against the [sheet](/docs/${i}). Item ${i} of the run.\n\n- first point\n- second point\n\n`
		);
		if (i % 5 === 0) parts.push('> Caution: hot fluid.\n\n');
		switch (i % 6) {
			case 0:
				parts.push(
					fence(
						`torque t-${i}`,
						'target: 24 N·m\ntolerance: ±10 %\nfasteners: [A, B, C, D]\norder: [A, C, B, D]\npasses: 50 %, 100 %\nangle: 90° ±5°'
					)
				);
				break;
			case 1:
				parts.push(
					fence(
						`measure m-${i}`,
						'nominal: 22 mm\ntolerance: H7\nangles: [0°, 90°]\ndepths: [top, bottom]\novality: max 0.008 mm\ntaper: max 0.01 mm\nmaterial: aluminium\nzero-check: yes\nresolution: 0.001 mm'
					)
				);
				break;
			case 2:
				parts.push(fence(`clearance c-${i}`, 'fit: 25 H7/g6'));
				break;
			case 3:
				parts.push(fence(`part p-${i}`, 'number: KL-4410-##@\nserial: PS########'));
				break;
			case 4:
				parts.push(fence(`fluid f-${i}`, 'spec: KLW DCF-7 (invented)\nlot: required\namount: 5.2 L ±0.2 L'));
				break;
			case 5:
				parts.push(fence(`confirm k-${i}`, 'prompt: Magnet faces the sensor\nphoto: required'));
				break;
		}
	}
	return parts.join('');
}

export async function main(
	medianMs: (fn: () => unknown, runs?: number, warmup?: number) => Promise<number>
): Promise<void> {
	const source = generate(300);
	const check = parse(source);
	if (check.errors.length) throw new Error(`generated procedure has errors: ${check.errors[0].message}`);
	const checkpoints = check.procedure!.steps.flatMap((s) => s.checkpoints);
	console.log(
		`generated: ${check.procedure!.steps.length} steps, ${checkpoints.length} checkpoints, ${source.length.toLocaleString('en-US')} characters`
	);

	const lexMs = await medianMs(() => marked.lexer(source), 9, 3);
	const parseMs = await medianMs(() => parse(source), 9, 3);
	const ratio = parseMs / lexMs;
	console.log(`marked.lexer alone: ${lexMs.toFixed(2)} ms (median of 9)`);
	console.log(`parse + validate:   ${parseMs.toFixed(2)} ms (median of 9)`);
	console.log(`ratio: ${ratio.toFixed(1)}× (goal ≤ ${RATIO_GOAL}×) — ${ratio <= RATIO_GOAL ? 'met' : 'NOT met'}`);

	const byKind = (k: Checkpoint['kind']) => checkpoints.find((c) => c.kind === k)!;
	const torque = byKind('torque');
	const measure = byKind('measure');
	const torqueEntry = {
		passes: [0, 1].map(() => Object.fromEntries(['A', 'B', 'C', 'D'].map((f) => [f, { value: '23.9' }]))),
		angles: [{ A: { value: '91' }, B: { value: '90' }, C: { value: '89' }, D: { turned: true } }]
	};
	const measureEntry = { readings: ['22.010', '22.012', '22.011', '22.013'], zeroed: true, partTemperature: '24' };
	const tool = { kind: 'indicating' as const, max: '60', unit: 'N_m', accuracyPercent: '2' };
	const N = 2000;
	const evalMs = await medianMs(
		() => {
			for (let i = 0; i < N; i++) {
				evaluate(torque, torqueEntry, { tool });
				evaluate(measure, measureEntry);
			}
		},
		5,
		1
	);
	console.log(
		`evaluate: ${Math.round((2 * N) / (evalMs / 1000)).toLocaleString('en-US')} evaluations/s (torque 4 fasteners × 2 passes + angle, and 4-reading bore, alternating; median of 5)`
	);
}
