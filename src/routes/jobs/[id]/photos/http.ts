import { error } from '@sveltejs/kit';
import { getRequestEvent } from '$app/server';
import { STAFF } from '$lib/roles';
import { requireRole, type AuthUser } from '$lib/server/auth/guard';
import type { PhotoFile } from '$lib/server/photos';

/** Staff of any role. Photo routes answer scripts (XHR, <img>), so anonymous is a 401, not a redirect. */
export function requireStaff(): AuthUser {
	if (!getRequestEvent().locals.user) error(401, 'Sign in to continue.');
	return requireRole(STAFF);
}

/** A stored picture as an inline image that only the signed-in browser may cache. */
export function pictureResponse(file: PhotoFile | null, name: string): Response {
	if (!file) error(404, 'There is no such photo in your shop.');
	const ext = file.mime === 'image/webp' ? 'webp' : 'jpg';
	return new Response(new Uint8Array(file.bytes), {
		headers: {
			'Content-Type': file.mime,
			'Content-Length': String(file.bytes.length),
			'Cache-Control': 'private, max-age=3600',
			'X-Content-Type-Options': 'nosniff',
			'Content-Disposition': `inline; filename="${name}.${ext}"`
		}
	});
}
