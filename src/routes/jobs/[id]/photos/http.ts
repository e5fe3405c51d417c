import { error, type RequestEvent } from '@sveltejs/kit';
import { getRequestEvent } from '$app/server';
import { STAFF } from '$lib/roles';
import { requireRole, type AuthUser } from '$lib/server/auth/guard';
import type { PhotoFile } from '$lib/server/photos';

/** Staff of any role. Photo routes answer scripts (XHR, <img>), so anonymous is a 401, not a redirect. */
export function requireStaff(): AuthUser {
	if (!getRequestEvent().locals.user) error(401, 'Sign in to continue.');
	return requireRole(STAFF);
}

/**
 * Reads and drops whatever the handler left of the request body. The Node adapter pauses an
 * unread body, which would stall the next request on the same keep-alive connection after an
 * early refusal (401, 404, 413).
 */
export function drainingBody<E extends RequestEvent>(handler: (event: E) => Promise<Response>) {
	return async (event: E): Promise<Response> => {
		try {
			return await handler(event);
		} finally {
			const body = event.request.body;
			if (body && !event.request.bodyUsed && !body.locked) {
				try {
					const reader = body.getReader();
					while (!(await reader.read()).done);
				} catch {
					// The client went away or the adapter refused the size: nothing left to drain.
				}
			}
		}
	};
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
