import { redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { clearSessionCookie } from '$lib/server/auth/cookies';
import { lucia } from '$lib/server/auth/lucia';

export const load: PageServerLoad = () => {
	redirect(303, '/');
};

export const actions: Actions = {
	default: async ({ locals, cookies }) => {
		if (locals.session) await lucia.invalidateSession(locals.session.id);
		clearSessionCookie(cookies);
		redirect(303, '/signin');
	}
};
