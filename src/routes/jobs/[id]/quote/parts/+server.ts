import { error, json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as catalog from '$lib/server/catalog';
import * as jobs from '$lib/server/jobs';
import * as settings from '$lib/server/settings';
import { partView } from '../masking';

const MATCHES = 60;

/** The typed search, without control characters (PostgreSQL text cannot hold NUL). */
const searchText = (url: URL) => (url.searchParams.get('q') ?? '').replace(/[\u0000-\u001f\u007f]/g, ' ').slice(0, 100);

/** Catalog parts matching ?q=, for the builder's part picker when the shop has more parts than the page loads. */
export const GET: RequestHandler = async ({ locals, params, url }) => {
	if (!locals.user) return json({ message: 'Sign in to continue.' }, { status: 401 });
	const user = requireRole(STAFF);
	if (!(await jobs.get(user.shopId, params.id))) error(404, 'No such job in your shop.');
	const [shop, found] = await Promise.all([settings.get(user.shopId), catalog.list(user.shopId, 'parts', searchText(url))]);
	const seesCosts = settings.seesCosts(user.role, shop);
	return json({
		total: found.total,
		parts: found.rows.slice(0, MATCHES).map((p) => partView(p, shop.pricing, seesCosts))
	});
};
