import { error, fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { MANAGERS, STAFF } from '$lib/roles';
import { attempt } from '$lib/server/actions';
import { requireRole } from '$lib/server/auth/guard';
import { parseObject } from '$lib/server/forms';
import * as specs from '$lib/server/specs';

// "/specs/new" is the blank form; any other id must be one of the shop's sheets.
export const load: PageServerLoad = async ({ params }) => {
	const user = requireRole(STAFF);
	const canEdit = MANAGERS.includes(user.role);
	if (params.id === 'new') {
		if (!canEdit) error(403, 'Your role does not give access to this. Ask the shop owner if you need it.');
		return { canEdit, isNew: true, sheet: { name: '', appliesTo: '', notes: '' }, items: [] };
	}
	const found = await specs.get(user.shopId, params.id);
	if (!found) error(404, 'No such spec sheet in your shop.');
	return {
		canEdit,
		isNew: false,
		sheet: { name: found.sheet.name, appliesTo: found.sheet.appliesTo, notes: found.sheet.notes },
		items: found.items.map((i) => ({
			label: i.label, unit: i.unit, min: i.minValue ?? '', max: i.maxValue ?? '', openAbove: i.openAbove ?? '', shortBelow: i.shortBelow ?? '',
			running: i.running ? 'running' : 'off', source: i.source
		}))
	};
};

export const actions: Actions = {
	save: async ({ request, params }) => {
		const user = requireRole(MANAGERS);
		const raw = specs.rowsFromForm(await request.formData());
		const parsed = parseObject(specs.specSheetSchema, raw);
		if (!parsed.ok) return fail(400, { message: parsed.message, errors: parsed.errors, values: raw });
		const result = await attempt(() => specs.save(user, params.id === 'new' ? null : params.id, parsed.data), { values: raw });
		if (!result.ok) return result.failure;
		redirect(303, `/specs/${result.value.id}`);
	},
	delete: async ({ params }) => {
		const user = requireRole(MANAGERS);
		const result = await attempt(() => specs.remove(user, params.id));
		if (!result.ok) return result.failure;
		redirect(303, '/specs');
	}
};
