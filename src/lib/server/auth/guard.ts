import { error, redirect } from '@sveltejs/kit';
import { getRequestEvent } from '$app/server';
import type { RoleName } from '../../roles';

export type AuthUser = NonNullable<App.Locals['user']>;

function wantsJson(pathname: string): boolean {
	return pathname.startsWith('/api/') || pathname.endsWith('.pdf') || pathname.endsWith('.csv');
}

/** The signed-in user, or a redirect to sign-in (pages) / 401 (JSON and files). */
export function requireUser(): AuthUser {
	const { locals, url } = getRequestEvent();
	if (!locals.user) {
		if (wantsJson(url.pathname)) error(401, 'Sign in to continue.');
		redirect(303, `/signin?next=${encodeURIComponent(url.pathname + url.search)}`);
	}
	return locals.user;
}

/** The signed-in user if their role is one of `roles`; otherwise 403. */
export function requireRole(roles: readonly RoleName[]): AuthUser {
	const user = requireUser();
	if (!roles.includes(user.role)) {
		error(403, 'Your role does not give access to this. Ask the shop owner if you need it.');
	}
	return user;
}
