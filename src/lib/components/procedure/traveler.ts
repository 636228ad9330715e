import { limitsText, type Checkpoint } from '$lib/procedure';

/** One blank on the paper traveler: what to write, and the limits it must fall within (computed by the engine). */
export interface Blank {
	label: string;
	limits?: string;
	/** Tick boxes instead of a writing line. */
	boxes?: string[];
}

/** The blanks a checkpoint needs on paper, one row each. */
export function blanksFor(cp: Checkpoint): Blank[] {
	switch (cp.kind) {
		case 'torque': {
			const passes = cp.passes.map((p) => `${p.percent} %: ${limitsText(p.limits)}`).join(' · ');
			return [
				{ label: 'Wrench id / setting', limits: passes },
				...cp.order.map((f) => ({ label: `Fastener ${f}`, limits: limitsText(cp.limits) })),
				...cp.angles.map((a, i) => ({
					label: `Angle stage ${i + 1} (+${a.degrees}°), all fasteners`,
					limits: a.limits ? limitsText(a.limits) : undefined,
					boxes: a.limits ? undefined : ['Turned']
				}))
			];
		}
		case 'measure': {
			const stage = cp.stages.length > 1 ? [{ label: 'Stage used', boxes: cp.stages.map((s) => s.name) }] : [];
			const limits = cp.stages.map((s) => `${cp.stages.length > 1 ? `${s.name}: ` : ''}${limitsText(s.limits)}`);
			return [
				...(cp.zeroCheck ? [{ label: 'Gauge zeroed on its master', boxes: ['Yes'] }] : []),
				...(cp.temperature !== 'off' ? [{ label: 'Part temperature (°C)' }] : []),
				...stage,
				...cp.positions.map((p) => ({ label: `Reading ${p}`, limits: limits.join(' · ') })),
				...(cp.ovality ? [{ label: 'Ovality', limits: limitsText(cp.ovality) }] : []),
				...(cp.taper ? [{ label: 'Taper', limits: limitsText(cp.taper) }] : [])
			];
		}
		case 'clearance':
			return [{ label: 'Clearance', limits: limitsText(cp.limits) }];
		case 'confirm':
			return [
				{ label: 'Confirmed', boxes: ['Yes', 'No'] },
				...(cp.photo !== 'off' ? [{ label: `Photo (${cp.photo})`, boxes: ['Taken'] }] : [])
			];
		case 'choice':
			return [{ label: 'Chosen', boxes: cp.options.map((o) => o.label) }];
		case 'part':
			return [
				{ label: 'Part number', limits: cp.numbers.join(' or ') },
				...(cp.serial ? [{ label: 'Serial number', limits: cp.serial.pattern }] : []),
				...(cp.lot ? [{ label: 'Lot number', limits: cp.lot.pattern }] : []),
				{ label: 'Quantity', limits: String(cp.quantity) }
			];
		case 'fluid':
			return [
				...(cp.lot ? [{ label: 'Fluid lot', limits: cp.lot.pattern }] : []),
				...(cp.amount ? [{ label: 'Amount filled', limits: limitsText(cp.amount) }] : []),
				...(cp.level
					? [
							...(cp.level.temperature
								? [{ label: 'Fluid temperature', limits: limitsText(cp.level.temperature) }]
								: []),
							{ label: 'Level correct', boxes: ['Yes', 'No'] }
						]
					: [])
			];
		case 'test':
			return [
				...(cp.value ? [{ label: 'Value', limits: limitsText(cp.value) }] : []),
				{ label: 'Result', boxes: ['Pass', 'Fail'] }
			];
		case 'text':
			return [{ label: 'Note' }, { label: '' }];
		case 'photo':
			return [{ label: `Photos taken (at least ${cp.min})` }];
	}
}
