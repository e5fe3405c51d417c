import { fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { safeNext, setSessionCookie } from '$lib/server/auth/cookies';
import { echo, parseForm, type FieldErrors } from '$lib/server/forms';
import * as users from '$lib/server/users';

export const load: PageServerLoad = ({ locals, url }) => {
	if (locals.user) redirect(303, safeNext(url.searchParams.get('next')));
	return {};
};

export const actions: Actions = {
	default: async ({ request, cookies, url, getClientAddress }) => {
		const form = await request.formData();
		const parsed = parseForm(users.signInSchema, form);
		if (!parsed.ok) return fail(400, { message: parsed.message, errors: parsed.errors, ...echo(form) });
		try {
			const session = await users.signIn(parsed.data, getClientAddress());
			setSessionCookie(cookies, session);
		} catch (e) {
			if (e instanceof users.UserError) return fail(e.message.startsWith('Too many') ? 429 : 400, { message: e.message, errors: {} as FieldErrors, ...echo(form) });
			throw e;
		}
		redirect(303, safeNext(url.searchParams.get('next')));
	}
};
