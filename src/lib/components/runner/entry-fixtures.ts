/** Checkpoint fixtures shared by the runner entry tests (invented, not service data). */
import { block, doc, mustParse } from '$lib/procedure/test-helpers';

// 8 N·m ±10 % in two passes, so pass 1 is 50 % = 4 N·m (3.6–4.4) and pass 2 is 8 N·m; a part fitted four times;
// a part with a serial; an 8 H7/g6 running clearance; one photo.
const [torque, clips, sensor, clearance, photo] = mustParse(
	doc(
		[
			block('torque cover', 'target: 8 N·m\ntolerance: ±10 %\nfasteners: [C1, C2]\npasses: 50 %, 100 %\ntool: preset'),
			block('part clips', 'number: KL-9901-##\nquantity: 4'),
			block('part sensor', 'number: KL-4410-##@\nserial: PS########'),
			block('clearance pin', 'fit: 8 H7/g6'),
			block('photo plate', 'prompt: Plate.\nmin: 1')
		].join('\n'),
		'All'
	)
).steps[0].checkpoints;

export { clearance, clips, photo, sensor, torque };

/** A click wrench 2–12 N·m ±4 %: usable from 20 % of 12 = 2.4 N·m (ISO 6789-1, DEFAULT_MIN_SHARE). */
export const wrench = { kind: 'preset' as const, max: '12', unit: 'N_m', accuracyPercent: '4' };
