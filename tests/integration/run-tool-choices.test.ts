import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from '../../src/lib/procedure/parse';
import { isoDate } from '../../src/lib/registers/dates';
import * as tools from '../../src/lib/server/repositories/tools';
import { toolChoices } from '../../src/lib/server/services/run-tool-choices';
import { makeCalibratedTool } from '../factories/registers';
import { migratedAppOrm } from './support/orm';

// Invented (not service data): a 4 N·m ±10 % cover. A click wrench 2–12 N·m is usable from 20 % of 12 = 2.4 N·m
// (ISO 6789-1, DEFAULT_MIN_SHARE) so it fits; one 5–25 N·m starts at 5 N·m, above the target.
const model = parse(`---
title: Tool choices
family: Invented family
purpose: Test.
---

## Tighten

\`\`\`step
tools: [click wrench]
\`\`\`

\`\`\`torque cover
target: 4 N·m
tolerance: ±10 %
fasteners: [C1]
\`\`\`

## Look

\`\`\`confirm look
prompt: Looked.
\`\`\`
`).procedure!;

describe('runner tool choices', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	it('lists usable tools first and the others with the reason in words, per step', async () => {
		const em = orm.em.fork();
		const fits = await makeCalibratedTool(em);
		const wide = await makeCalibratedTool(em, { over: { rangeMin: '5', rangeMax: '25', description: 'Dial 5–25' } });
		const late = await makeCalibratedTool(em, { daysAgo: 400, dueInDays: -3 });
		const dropped = await makeCalibratedTool(em, {
			over: { kind: 'micrometer', unit: 'mm', rangeMin: '0', rangeMax: '25' }
		});
		tools.addCalibration(
			em,
			dropped,
			{ id: crypto.randomUUID(), name: 'Lead' },
			{
				kind: 'check',
				performedOn: isoDate(),
				certificateNo: null,
				asFound: 'out',
				asLeft: null,
				nextDueOn: null,
				notes: 'Reads high.'
			}
		);
		const retired = await makeCalibratedTool(em);
		retired.active = false;
		await em.flush();

		const choices = await toolChoices(orm.em.fork(), model);
		expect(Object.keys(choices)).toEqual(['0']); // only the step that lists tools
		const byId = new Map(choices[0].map((c) => [c.id, c]));
		expect(byId.get(fits.id)?.blocked).toBeNull();
		expect(byId.get(wide.id)?.blocked).toContain("below the tool's usable range of 5–25 N·m");
		expect(byId.get(late.id)?.blocked).toBe('Blocked: calibration past due');
		expect(byId.get(dropped.id)?.blocked).toBe('Blocked: found out of tolerance, not recalibrated since');
		expect(byId.has(retired.id)).toBe(false);
		const firstBlocked = choices[0].findIndex((c) => c.blocked !== null);
		expect(choices[0].slice(firstBlocked).every((c) => c.blocked !== null)).toBe(true);
	});
});
