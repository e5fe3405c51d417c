import { fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { setSessionCookie } from '$lib/server/auth/cookies';
import { echo, parseForm, type FieldErrors } from '$lib/server/forms';
import * as users from '$lib/server/users';

export const load: PageServerLoad = ({ locals }) => {
	if (locals.user) redirect(303, '/home');
	return {};
};

export const actions: Actions = {
	default: async ({ request, cookies }) => {
		const form = await request.formData();
		const parsed = parseForm(users.signUpSchema, form);
		if (!parsed.ok) return fail(400, { message: parsed.message, errors: parsed.errors, ...echo(form) });
		try {
			setSessionCookie(cookies, await users.signUp(parsed.data));
		} catch (e) {
			if (e instanceof users.UserError) {
				return fail(400, { message: e.message, errors: (e.field ? { [e.field]: e.message } : {}) as FieldErrors, ...echo(form) });
			}
			throw e;
		}
		redirect(303, '/home');
	}
};
