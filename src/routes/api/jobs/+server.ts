import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as board from '$lib/server/board';

/** The job board as JSON: same filters as the page's address bar. */
export const GET: RequestHandler = async ({ url }) => {
	const user = requireRole(STAFF);
	return json(await board.page(user.shopId, board.parseBoardQuery(url.searchParams)));
};
