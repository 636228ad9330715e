import { error, fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { REGISTER_ROLES } from '$lib/registers/access';
import { isoDate } from '$lib/registers/dates';
import { calibrationSchema, toolSchema } from '$lib/registers/schema';
import { hasAnyRole, requireRole } from '$lib/server/access';
import * as tools from '$lib/server/repositories/tools';
import * as toolService from '$lib/server/services/tools.service';

const idSchema = z.uuid();

export const load = async (event) => {
	const user = requireRole(event, ...REGISTER_ROLES.readTools);
	const id = idSchema.safeParse(event.params.id);
	const tool = id.success ? await tools.findSummary(event.locals.em, id.data) : null;
	if (!tool) error(404, 'No such tool.');
	const records = await tools.listCalibrations(event.locals.em, tool.id);
	const entity = await tools.findById(event.locals.em, tool.id);
	return {
		tool,
		records: records.map(tools.toCalibrationRecord),
		registered: event.url.searchParams.has('registered'),
		canEdit: hasAnyRole(user, REGISTER_ROLES.edit),
		// Quality leads get the link to the runs signed with this tool since its last good calibration (issue 8).
		canAudit: hasAnyRole(user, ['quality']),
		detailsForm: await superValidate(
			entity
				? {
						assetTag: entity.assetTag,
						kind: entity.kind,
						description: entity.description,
						rangeMin: String(entity.rangeMin),
						rangeMax: String(entity.rangeMax),
						unit: entity.unit,
						resolution: String(entity.resolution),
						accuracyPct: String(entity.accuracyPct)
					}
				: {},
			zod4(toolSchema),
			{ errors: false, id: 'tool-details' }
		),
		form: await superValidate(
			{ kind: 'calibration', performedOn: isoDate(), asFound: 'in', asLeft: 'in' },
			zod4(calibrationSchema),
			{ errors: false }
		)
	};
};

export const actions = {
	calibration: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const form = await superValidate(event.request, zod4(calibrationSchema));
		if (!form.valid) return fail(400, { form });
		const result = await toolService.recordCalibration(event.locals.em, user, event.params.id, form.data);
		if (!result.ok) {
			if (result.field === 'performedOn' || result.field === 'nextDueOn')
				return setError(form, result.field, result.message);
			return message(form, result.message, { status: 400 });
		}
		return message(form, form.data.kind === 'calibration' ? 'Calibration recorded.' : 'Check recorded.');
	},
	details: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const form = await superValidate(event.request, zod4(toolSchema), { id: 'tool-details' });
		if (!form.valid) return fail(400, { detailsForm: form });
		const result = await toolService.updateTool(event.locals.em, user, event.params.id, form.data);
		if (!result.ok) {
			if (result.field === 'assetTag') return setError(form, 'assetTag', result.message);
			return message(form, result.message, { status: 400 });
		}
		return message(form, 'Details saved.');
	},
	retire: async (event) => {
		const user = requireRole(event, ...REGISTER_ROLES.edit);
		const reason = z
			.string()
			.trim()
			.min(3)
			.max(500)
			.safeParse((await event.request.formData()).get('reason'));
		if (!reason.success) return fail(400, { notice: 'Say why the tool is retired.' });
		const result = await toolService.retireTool(event.locals.em, user, event.params.id, reason.data);
		if (!result.ok) return fail(400, { notice: result.message });
		return { notice: 'Tool retired.' };
	}
};
