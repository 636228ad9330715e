import { describe, expect, it } from 'vitest';
import { checkpoint, mustParse, doc, block } from '../procedure/test-helpers';
import { evaluate, roundToResolution, type EvaluationContext } from './evaluate';
import { ex } from './exact';

const torque24pct = checkpoint('torque t1', 'target: 24 N·m\ntolerance: ±10 %\nfasteners: 2');
const torqueRange = checkpoint('torque t2', 'target: 24 N·m\ntolerance: 22 to 26 N·m\nfasteners: [A, B]');
const torquePasses = checkpoint(
	'torque t3',
	'target: 40 N·m\ntolerance: ±2 N·m\nfasteners: [A, B]\norder: [B, A]\npasses: 50 %, 100 %\nangle: 90° ±5°'
);

const indicating = { kind: 'indicating', max: '60', unit: 'N_m', accuracyPercent: '2' } as const;

describe('evaluate torque', () => {
	// Limits hand-computed: 24 ± 10 % = 21.6 … 26.4 N·m; 22–26 as written.
	it.each([
		['on the lower ±% limit passes', torque24pct, '21.6', 'pass'],
		['on the upper ±% limit passes', torque24pct, '26.4', 'pass'],
		['just over the ±% limit fails', torque24pct, '26.41', 'fail'],
		['inside min–max passes', torqueRange, '25', 'pass'],
		['below min–max fails', torqueRange, '21.99', 'fail']
	])('%s', (_name, cp, value, expected) => {
		const labels = cp.kind === 'torque' ? cp.order : [];
		const entry = { passes: [Object.fromEntries(labels.map((l) => [l, { value }]))] };
		const r = evaluate(cp, entry, { tool: indicating });
		expect(r.status).toBe(expected);
		expect(r.readings).toHaveLength(labels.length);
	});

	it.each([
		['garbage', 'abc'],
		['NaN', 'NaN'],
		['empty', ''],
		['negative', '-24'],
		['zero', '0'],
		['decimal comma', '24,0'],
		['Infinity', 'Infinity']
	])('a %s reading gives a reason, never a pass', (_name, value) => {
		const r = evaluate(torque24pct, { passes: [{ '1': { value }, '2': { value: '24' } }] }, { tool: indicating });
		expect(r.status).toBe('incomplete');
		expect(r.readings[0].status).toBe('incomplete');
		expect(r.readings[0].reason).toBeTruthy();
	});

	it('multi-pass: 50 % then 100 %, in the stated order, with the angle stage', () => {
		// Hand-computed: pass 1 target 20 N·m, limits 19–21; pass 2 38–42; angle 85–95°.
		expect(
			torquePasses.kind === 'torque' && torquePasses.passes.map((p) => [p.target, p.limits.min, p.limits.max])
		).toEqual([
			['20', '19', '21'],
			['40', '38', '42']
		]);
		const entry = {
			passes: [
				{ A: { value: '20.5' }, B: { value: '19' } },
				{ A: { value: '41' }, B: { value: '42' } }
			],
			angles: [{ A: { value: '92' }, B: { turned: true } }]
		};
		const r = evaluate(torquePasses, entry, { tool: indicating });
		expect(r.readings.map((x) => x.key)).toEqual([
			'pass-1/B',
			'pass-1/A',
			'pass-2/B',
			'pass-2/A',
			'angle-1/B',
			'angle-1/A'
		]);
		expect(r.status).toBe('pass');
		const bad = evaluate(
			torquePasses,
			{ ...entry, angles: [{ A: { value: '96' }, B: { turned: true } }] },
			{ tool: indicating }
		);
		expect(bad.status).toBe('fail');
		const missing = evaluate(torquePasses, { passes: entry.passes }, { tool: indicating });
		expect(missing.status).toBe('incomplete');
	});

	it('preset tool: "reached" passes only when the wrench was set to the pass target', () => {
		const preset = (setTo: string[]) =>
			({
				tool: { kind: 'preset', max: '60', min: '10', unit: 'N_m', accuracyPercent: '2', setTo }
			}) as EvaluationContext;
		const reached = {
			passes: [
				{ A: { reached: true }, B: { reached: true } },
				{ A: { reached: true }, B: { reached: true } }
			],
			angles: [{ A: { turned: true }, B: { turned: true } }]
		};
		const ok = evaluate(torquePasses, reached, preset(['20', '40']));
		expect(ok.status).toBe('pass');
		expect(ok.readings[0].display).toBe('set to 20 N·m, reached');
		const wrongSet = evaluate(torquePasses, reached, preset(['20', '39']));
		expect(wrongSet.status).toBe('fail');
		expect(wrongSet.readings[2].reason).toContain('needs 40 N·m');
		const noSetting = evaluate(torquePasses, reached, {
			tool: { kind: 'preset', max: '60', unit: 'N_m', accuracyPercent: '2' }
		});
		expect(noSetting.status).toBe('incomplete');
		const notReached = evaluate(
			torquePasses,
			{ ...reached, passes: [{ A: { reached: false }, B: { reached: true } }, reached.passes[1]] },
			preset(['20', '40'])
		);
		expect(notReached.status).toBe('fail');
	});

	it('indicating tool in lbf·ft judged against N·m limits; unsuitable tool is a failure', () => {
		// 24 N·m ÷ 1.3558179483314004 N·m/lbf·ft = 17.7012… lbf·ft (NIST SP 811 exact factor, hand-computed).
		const r = evaluate(
			torque24pct,
			{ unit: 'lbf_ft', passes: [{ '1': { value: '17.70' }, '2': { value: '19.5' } }] },
			{ tool: { ...indicating, unit: 'lbf_ft', max: '45' } }
		);
		expect(r.readings[0].status).toBe('pass');
		expect(r.readings[1].status).toBe('fail'); // 19.5 lbf·ft = 26.44 N·m > 26.4
		expect(r.readings[0].limitsInEntryUnit?.unit).toBe('lbf_ft');
		const tooBig = evaluate(
			torque24pct,
			{ passes: [{ '1': { value: '24' }, '2': { value: '24' } }] },
			{ tool: { ...indicating, max: '300' } }
		);
		expect(tooBig.status).toBe('fail');
		expect(tooBig.reasons.join(' ')).toMatch(/range/);
	});
});

const bore = checkpoint(
	'measure bore-1',
	'nominal: 25 mm\ntolerance: H7\nangles: [0°, 90°]\ndepths: [top, bottom]\novality: max 0.005 mm\ntaper: max 0.004 mm\nmaterial: aluminium\nzero-check: yes\nresolution: 0.001 mm'
);
const wear = checkpoint('measure wear-1', 'nominal: 25.4 mm\ntolerance: max 25.4 mm');
const minOnly = checkpoint('measure pad-1', 'tolerance: min 2.5 mm');

describe('evaluate measure', () => {
	// 25 H7 = 25.000 … 25.021 mm (ISO 286-2 table, from memory: IT7 over 18 to 30 mm = 21 µm, H → EI = 0).
	it.each([
		['all inside', ['25.010', '25.012', '25.011', '25.013'], 'pass'],
		['one on the upper limit', ['25.021', '25.021', '25.020', '25.020'], 'pass'],
		['one over', ['25.022', '25.020', '25.020', '25.020'], 'fail'],
		['ovality too large at top (0.006)', ['25.002', '25.008', '25.004', '25.005'], 'fail'],
		['taper too large (means 25.001 vs 25.0155)', ['25.001', '25.001', '25.015', '25.016'], 'fail']
	])('%s', (_n, readings, expected) => {
		const r = evaluate(bore, { readings, zeroed: true });
		expect(r.status).toBe(expected);
	});

	it('reports ovality per depth and taper, hand-computed', () => {
		const r = evaluate(bore, { readings: ['25.010', '25.013', '25.011', '25.012'], zeroed: true });
		const byKey = Object.fromEntries(r.readings.map((x) => [x.key, x]));
		expect(byKey['ovality/top'].value).toBe('0.003');
		expect(byKey['ovality/bottom'].value).toBe('0.001');
		expect(byKey['taper'].value).toBe('0'); // means 25.0115 and 25.0115
	});

	it('requires the zero confirmation when the spec asks', () => {
		const r = evaluate(bore, { readings: ['25.010', '25.012', '25.011', '25.013'] });
		expect(r.status).toBe('incomplete');
		expect(r.reasons.join(' ')).toMatch(/zeroed/);
	});

	it('corrects to 20 °C for aluminium and judges the corrected value', () => {
		// 25.0225 mm at 30 °C, α = 23e-6/°C: 25.0225 / (1 + 0.00023) = 25.016746… mm (hand-computed), inside H7.
		const r = evaluate(bore, {
			readings: ['25.0225', '25.0225', '25.0225', '25.0225'],
			zeroed: true,
			partTemperature: '30'
		});
		expect(r.readings[0].status).toBe('pass');
		expect(r.readings[0].raw).toBe('25.0225');
		expect(r.readings[0].display).toBe('25.017 mm');
		expect(r.warnings.join(' ')).toMatch(/corrected to 20 °C/);
		const uncorrected = evaluate(bore, { readings: ['25.0225', '25.0225', '25.0225', '25.0225'], zeroed: true });
		expect(uncorrected.readings[0].status).toBe('fail');
	});

	it('warns when far from 20 °C and no material is known', () => {
		const r = evaluate(wear, { readings: ['25.3'], partTemperature: '40' });
		expect(r.warnings.join(' ')).toMatch(/20 °C/);
	});

	it.each([
		// 1.0000 in = 25.4 mm exactly (international inch); on the one-sided max → pass.
		['inch reading exactly on a metric limit', wear, { unit: 'in', readings: ['1.0000'] }, 'pass'],
		['inch reading just over', wear, { unit: 'in', readings: ['1.0001'] }, 'fail'],
		['min-only passes above', minOnly, { readings: ['2.6'] }, 'pass'],
		['min-only on the limit passes', minOnly, { readings: ['2.5'] }, 'pass'],
		['min-only below fails', minOnly, { readings: ['2.49'] }, 'fail'],
		['negative length is not a reading', minOnly, { readings: ['-2.6'] }, 'incomplete'],
		['unit of another dimension', minOnly, { unit: 'N_m', readings: ['2.6'] }, 'incomplete']
	])('%s', (_n, cp, entry, expected) => {
		expect(evaluate(cp, entry).status).toBe(expected);
	});

	it('shows limits in the spec unit and in the entry unit', () => {
		const r = evaluate(wear, { unit: 'in', readings: ['1.0000'] });
		expect(r.readings[0].limits).toEqual({ max: '25.4', unit: 'mm' });
		expect(r.readings[0].limitsInEntryUnit).toEqual({ max: '1', unit: 'in' });
	});

	it('warns when the gauge is coarser than a tenth of the tolerance', () => {
		const r = evaluate(bore, { readings: ['25.01', '25.01', '25.01', '25.01'], zeroed: true, resolution: '0.01' });
		expect(r.warnings.join(' ')).toMatch(/coarser than a tenth/);
	});

	it('rounds display to resolution but judges the exact value', () => {
		// 25.0214 rounds to 25.021 for display, but is 0.0004 mm over the maximum (hand-computed).
		const r = evaluate(bore, { readings: ['25.0214', '25.010', '25.010', '25.010'], zeroed: true });
		expect(r.readings[0].display).toBe('25.021 mm');
		expect(r.readings[0].status).toBe('fail');
	});
});

describe('evaluate clearance', () => {
	const p = mustParse(
		doc(
			block('measure bore-a', 'nominal: 18 mm\ntolerance: H7\nreadings: 2') +
				block('measure piston-a', 'nominal: 18 mm\ntolerance: g6\nreadings: 2') +
				block('clearance fit-a', 'bore: bore-a\nshaft: piston-a\nlimits: 0.010 to 0.040 mm') +
				block('clearance fit-b', 'fit: 25 H7/g6')
		)
	);
	const cps = Object.fromEntries(p.steps[0].checkpoints.map((c) => [c.id, c]));

	it('pairs worst case: min bore − max piston and max bore − min piston (hand-computed)', () => {
		const ctx: EvaluationContext = {
			checkpoints: cps,
			entries: { 'bore-a': { readings: ['18.010', '18.016'] }, 'piston-a': { readings: ['17.990', '17.986'] } }
		};
		const r = evaluate(cps['fit-a'], {}, ctx);
		expect(r.readings.map((x) => [x.key, x.value, x.status])).toEqual([
			['clearance/min', '0.02', 'pass'], // 18.010 − 17.990
			['clearance/max', '0.03', 'pass'] // 18.016 − 17.986
		]);
		const tight = evaluate(
			cps['fit-a'],
			{},
			{
				...ctx,
				entries: { 'bore-a': { readings: ['18.000', '18.016'] }, 'piston-a': { readings: ['17.994', '17.986'] } }
			}
		);
		expect(tight.status).toBe('fail'); // 18.000 − 17.994 = 0.006 < 0.010
		const waiting = evaluate(cps['fit-a'], {}, { checkpoints: cps, entries: {} });
		expect(waiting.status).toBe('incomplete');
	});

	it('25 H7/g6 gives +0.007 to +0.041 mm (ISO 286-2, well-known textbook value, from memory)', () => {
		expect(cps['fit-b'].kind === 'clearance' && cps['fit-b'].limits).toEqual({
			min: '0.007',
			max: '0.041',
			unit: 'mm'
		});
		expect(evaluate(cps['fit-b'], { reading: '0.041' }).status).toBe('pass');
		expect(evaluate(cps['fit-b'], { reading: '0.042' }).status).toBe('fail');
		// 0.0016 in = 0.04064 mm: inside (hand-computed).
		expect(evaluate(cps['fit-b'], { unit: 'in', reading: '0.0016' }).status).toBe('pass');
	});

	it('limits default to the worst-case pair of the two specs (18 H7 − 18 g6 → 0.006 … 0.035 mm, from memory)', () => {
		const q = mustParse(
			doc(
				block('measure b', 'nominal: 18 mm\ntolerance: H7') +
					block('measure s', 'nominal: 18 mm\ntolerance: g6') +
					block('clearance c', 'bore: b\nshaft: s')
			)
		);
		expect(q.steps[0].checkpoints[2].kind === 'clearance' && q.steps[0].checkpoints[2].limits).toEqual({
			min: '0.006',
			max: '0.035',
			unit: 'mm'
		});
	});
});

describe('evaluate the other kinds', () => {
	const p = mustParse(
		doc(
			block(
				'choice disp',
				'prompt: Sensor\noptions:\n  reused: Reused\n  new: Replaced new\n  donor: From a donor unit\nthen:\n  new: [new-part]\n  donor: [new-part, donor-photo]'
			) +
				block('part new-part', 'number: [BX-4410-##@, BX-4411-##@]\nserial: SN-######\nquantity: 1') +
				block('photo donor-photo', 'prompt: Donor label\nmin: 2') +
				block('confirm magnet', 'prompt: Magnet faces the sensor\nphoto: required') +
				block('fluid fill', 'spec: KX-DCF 4 (invented)\nlot: L-####\namount: 5.5 L ±0.2 L') +
				block('fluid level', 'spec: KX-DCF 4 (invented)\nlevel: at the check plug\ntemperature: 35 to 45 °C') +
				block('test leak', 'prompt: Pressure hold\nvalue: 300 to 350 kPa\nqualification: hydraulic test') +
				block('text notes', 'prompt: Findings\nmin-length: 5')
		)
	);
	const c = Object.fromEntries(p.steps[0].checkpoints.map((x) => [x.id, x]));

	it.each([
		['choice: reused', 'disp', { option: 'reused' }, {}, 'pass'],
		['choice: new without the part record', 'disp', { option: 'new' }, { entries: {} }, 'incomplete'],
		['choice: new with the part record', 'disp', { option: 'new' }, { entries: { 'new-part': {} } }, 'pass'],
		['choice: unknown option', 'disp', { option: 'lost' }, {}, 'incomplete'],
		['part: matches second number, serial ok', 'new-part', { number: 'bx-4411-07k', serial: 'SN-123456' }, {}, 'pass'],
		['part: wrong number', 'new-part', { number: 'BX-4412-07K', serial: 'SN-123456' }, {}, 'fail'],
		['part: bad serial', 'new-part', { number: 'BX-4410-07K', serial: 'SN-12345' }, {}, 'incomplete'],
		['part: wrong quantity', 'new-part', { number: 'BX-4410-07K', serial: 'SN-123456', quantity: 2 }, {}, 'fail'],
		['photo: one of two', 'donor-photo', { photos: ['a1'] }, {}, 'incomplete'],
		['photo: the same photo twice counts once', 'donor-photo', { photos: ['a1', 'a1'] }, {}, 'incomplete'],
		['photo: two', 'donor-photo', { photos: ['a1', 'b2'] }, {}, 'pass'],
		['confirm: with photo', 'magnet', { confirmed: true, photos: ['m1'] }, {}, 'pass'],
		['confirm: missing photo', 'magnet', { confirmed: true }, {}, 'incomplete'],
		['confirm: reported not so', 'magnet', { confirmed: false, photos: ['m1'] }, {}, 'fail'],
		[
			'fluid: amount on the limit in mL',
			'fill',
			{ specConfirmed: true, lot: 'L-0042', amount: '5300', unit: 'mL' },
			{},
			'pass'
		],
		['fluid: too little', 'fill', { specConfirmed: true, lot: 'L-0042', amount: '5.2' }, {}, 'fail'],
		// 5.5 L = 5.8118… US qt (231 in³ gallon, hand-computed); 5.81 US qt = 5.498 L inside.
		['fluid: in US quarts', 'fill', { specConfirmed: true, lot: 'L-0042', amount: '5.81', unit: 'US_qt' }, {}, 'pass'],
		['fluid: level ok at temperature', 'level', { specConfirmed: true, level: 'ok', temperature: '40' }, {}, 'pass'],
		['fluid: level read too cold', 'level', { specConfirmed: true, level: 'ok', temperature: '20' }, {}, 'incomplete'],
		['fluid: level low', 'level', { specConfirmed: true, level: 'low', temperature: '40' }, {}, 'fail'],
		['test: pass with value in psi', 'leak', { result: 'pass', reading: '47', unit: 'psi' }, {}, 'pass'], // 47 psi = 324.05 kPa
		['test: recorded fail', 'leak', { result: 'fail', reading: '320' }, {}, 'fail'],
		[
			'test: unqualified person',
			'leak',
			{ result: 'pass', reading: '320' },
			{ qualifications: ['brakes'] },
			'incomplete'
		],
		['text: long enough', 'notes', { text: 'Light scoring in bore 2' }, {}, 'pass'],
		['text: too short', 'notes', { text: 'ok' }, {}, 'incomplete']
	])('%s', (_n, id, entry, ctx, expected) => {
		expect(evaluate(c[id], entry, ctx as EvaluationContext).status).toBe(expected);
	});

	it('a choice lists the checkpoints its option makes required', () => {
		expect(evaluate(c.disp, { option: 'donor' }).requires).toEqual(['new-part', 'donor-photo']);
		expect(c['new-part'].when).toEqual({ choice: 'disp', options: ['new', 'donor'] });
	});

	it.each([null, undefined, 42, 'text', { readings: 'x' }])(
		'an unreadable entry (%s) is incomplete, never a throw',
		(entry) => {
			expect(evaluate(bore, entry).status).toBe('incomplete');
		}
	);
});

describe('roundToResolution', () => {
	it.each([
		['25.0214', '0.001', '25.021'],
		['25.0215', '0.001', '25.022'],
		['-0.0015', '0.001', '-0.002'],
		['25.013', '0.002', '25.014'],
		['1.00004', '0.0001', '1.0000']
	])('%s at %s → %s (hand-computed, half away from zero)', (v, step, expected) => {
		expect(roundToResolution(ex(v), ex(step))).toBe(expected);
	});
});
