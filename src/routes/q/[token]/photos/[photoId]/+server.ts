import { error } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import * as photos from '$lib/server/photos';
import * as quotes from '$lib/server/quotes';

/** A photo the shop marked for the customer, reachable only through that customer's token. */
export const GET: RequestHandler = async ({ params, url }) => {
	const found = await quotes.byToken(params.token);
	if (!found || found.state === 'revoked') error(404, 'Not found');
	const kind = url.searchParams.get('size') === 'thumb' ? 'thumb' : 'full';
	const photo = await photos.readForCustomer(found.quote.shopId, found.quote.jobId, params.photoId, kind);
	if (!photo) error(404, 'Not found');
	return new Response(new Uint8Array(photo.bytes), {
		headers: {
			'content-type': photo.mime,
			'cache-control': 'private, max-age=3600',
			'content-disposition': 'inline',
			'x-content-type-options': 'nosniff'
		}
	});
};
