import { error } from '@sveltejs/kit';
import type { PhotoFile } from '$lib/server/photos';

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
