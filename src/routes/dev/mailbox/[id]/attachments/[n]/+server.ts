import { error } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { requireUser } from '$lib/server/auth/guard';
import * as catcher from '$lib/server/mail/catcher';

export const GET: RequestHandler = async ({ params }) => {
	const user = requireUser();
	if (!catcher.catcherUrl()) error(404, 'There is no page at this address.');
	const index = /^\d{1,3}$/.test(params.n) ? Number(params.n) : -1;
	const found = index >= 0 ? await catcher.attachmentForShop(user.shopId, params.id, index).catch(() => null) : null;
	if (!found) error(404, 'No such attachment.');
	const filename = found.filename.replace(/[^\w.\- ]/g, '_');
	return new Response(found.content, {
		headers: {
			'content-type': /^[\w.+-]+\/[\w.+-]+$/.test(found.contentType) ? found.contentType : 'application/octet-stream',
			'content-disposition': `attachment; filename="${filename}"`,
			// Whatever the message carried is downloaded, never run in this origin.
			'content-security-policy': "sandbox; default-src 'none'",
			'cache-control': 'private, no-store'
		}
	});
};
