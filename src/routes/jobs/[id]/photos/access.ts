import { error } from '@sveltejs/kit';
import { getRequestEvent } from '$app/server';
import { STAFF } from '$lib/roles';
import { requireRole, type AuthUser } from '$lib/server/auth/guard';

/** Staff of any role. Photo routes answer scripts (XHR, <img>), so anonymous is a 401, not a redirect. */
export function requireStaff(): AuthUser {
	if (!getRequestEvent().locals.user) error(401, 'Sign in to continue.');
	return requireRole(STAFF);
}
