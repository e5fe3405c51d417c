import { error, fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { MANAGERS } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as catalog from '$lib/server/catalog';
import { echo } from '$lib/server/forms';
import * as settings from '$lib/server/settings';

const NOT_FOUND = 'There is no such entry in your catalog. It may have been deleted.';

function listParam(value: string): catalog.ListName {
	if (!catalog.isList(value)) error(404, 'There is no page at this address.');
	return value;
}

export const load: PageServerLoad = async ({ params }) => {
	const user = requireRole(MANAGERS);
	const list = listParam(params.list);
	const [row, shop] = await Promise.all([catalog.find(user.shopId, list, params.id), settings.get(user.shopId)]);
	if (!row) error(404, NOT_FOUND);
	return { list, id: params.id, noun: catalog.nounOf(list), currency: shop.currency, values: catalog.formValuesOf(list, row) };
};

export const actions: Actions = {
	save: async ({ request, params }) => {
		const user = requireRole(MANAGERS);
		const list = listParam(params.list);
		const form = await request.formData();
		try {
			if (!(await catalog.update(user, list, params.id, catalog.fieldsFromForm(list, form)))) error(404, NOT_FOUND);
		} catch (e) {
			if (e instanceof catalog.CatalogError) return fail(400, { action: 'save', message: e.message, errors: e.errors, values: echo(form) });
			throw e;
		}
		redirect(303, `/catalog?done=saved#${list}`);
	},
	delete: async ({ request, params }) => {
		const user = requireRole(MANAGERS);
		const list = listParam(params.list);
		const form = await request.formData();
		if (form.get('confirm') !== 'yes') {
			return fail(400, { action: 'delete', message: `Tick the box to confirm that this ${catalog.nounOf(list)} should be deleted.` });
		}
		if (!(await catalog.remove(user, list, params.id))) error(404, NOT_FOUND);
		redirect(303, `/catalog?done=deleted#${list}`);
	}
};
