import type { AuthUser } from '$lib/server/auth/guard';
import * as catalog from '$lib/server/catalog';
import * as settings from '$lib/server/settings';

/** One catalog list of the user's shop as a CSV download; costs only for those who may see them. */
export async function csvExport(user: AuthUser, list: catalog.ListName): Promise<Response> {
	const shop = await settings.get(user.shopId);
	const body = await catalog.exportCsv(user.shopId, list, settings.seesCosts(user.role, shop));
	const date = new Date().toISOString().slice(0, 10);
	return new Response(body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="${list}-${date}.csv"`,
			'cache-control': 'private, no-store'
		}
	});
}
