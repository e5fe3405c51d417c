import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { MANAGERS } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as payments from '$lib/server/payments';

export const GET: RequestHandler = async ({ url }) => {
	const user = requireRole(MANAGERS);
	const parsed = payments.parseFilters(url.searchParams);
	if (!parsed.success) {
		return json(
			{ message: 'Please correct the filters.', issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })) },
			{ status: 400 }
		);
	}
	const body = await payments.exportCsv(user.shopId, parsed.data);
	const date = new Date().toISOString().slice(0, 10);
	return new Response(body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="payments-${date}.csv"`,
			'cache-control': 'private, no-store'
		}
	});
};
