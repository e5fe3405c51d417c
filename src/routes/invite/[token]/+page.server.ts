import { fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { ROLE_LABELS } from '$lib/roles';
import { setSessionCookie } from '$lib/server/auth/cookies';
import { echo, parseForm, type FieldErrors } from '$lib/server/forms';
import * as invites from '$lib/server/invites';
import { UserError } from '$lib/server/users';

// Public on purpose: the token is the credential. Nothing but the invite's own shop name,
// e-mail and role is shown.
export const load: PageServerLoad = async ({ params }) => {
	const found = await invites.findOpen(params.token);
	if (!found) return { open: false as const };
	return { open: true as const, shopName: found.shopName, email: found.invite.email, role: ROLE_LABELS[found.invite.role] };
};

export const actions: Actions = {
	default: async ({ request, params, cookies }) => {
		const form = await request.formData();
		const parsed = parseForm(invites.acceptSchema, form);
		if (!parsed.ok) return fail(400, { message: parsed.message, errors: parsed.errors, ...echo(form) });
		try {
			setSessionCookie(cookies, await invites.accept(params.token, parsed.data));
		} catch (e) {
			if (e instanceof UserError) return fail(400, { message: e.message, errors: {} as FieldErrors, ...echo(form) });
			throw e;
		}
		redirect(303, '/home');
	}
};
