import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';
import { STAFF } from '$lib/roles';
import { setSessionCookie } from '$lib/server/auth/cookies';
import { requireRole } from '$lib/server/auth/guard';
import { parseForm, type FieldErrors } from '$lib/server/forms';
import * as users from '$lib/server/users';

const passwordSchema = z
	.object({
		current: z.string({ error: 'Enter your current password.' }).min(1, 'Enter your current password.').max(200),
		next: users.newPasswordField,
		confirm: z.string({ error: 'Repeat the new password.' })
	})
	.refine((v) => v.next === v.confirm, { path: ['confirm'], message: 'The two new passwords differ.' });

export const load: PageServerLoad = () => {
	const user = requireRole(STAFF);
	return { email: user.email, name: user.name };
};

export const actions: Actions = {
	password: async ({ request, locals, cookies }) => {
		const user = requireRole(STAFF);
		const parsed = parseForm(passwordSchema, await request.formData());
		if (!parsed.ok) return fail(400, { message: parsed.message, errors: parsed.errors });
		try {
			const session = await users.changePassword(user.id, parsed.data.current, parsed.data.next, locals.session!.id);
			setSessionCookie(cookies, session);
		} catch (e) {
			if (e instanceof users.UserError) return fail(400, { message: e.message, errors: (e.field ? { [e.field]: e.message } : {}) as FieldErrors });
			throw e;
		}
		return { done: 'Password changed. You stay signed in here; every other device must sign in again.' };
	}
};
