import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { MANAGERS } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as settings from '$lib/server/settings';

export const load: PageServerLoad = async () => {
	const user = requireRole(MANAGERS);
	const values = await settings.formValues(user.shopId);
	return { values, currencies: settings.currencyChoices(values.fields.currency) };
};

export const actions: Actions = {
	save: async ({ request }) => {
		const user = requireRole(MANAGERS);
		const form = await request.formData();
		const parsed = settings.readForm(form);
		if (!parsed.ok) return fail(400, { message: parsed.message, errors: parsed.errors, values: settings.echoForm(form) });
		await settings.update(user, parsed.data);
		return { done: 'Settings saved. New estimates use them from now on.' };
	}
};
