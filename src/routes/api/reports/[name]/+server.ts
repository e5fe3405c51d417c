import { error, json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { MANAGERS } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as reports from '$lib/server/reports';

/** One report's figures as JSON: aggregated rows, totals, column labels and the basis in words. */
export const GET: RequestHandler = async ({ params, url }) => {
	const user = requireRole(MANAGERS);
	if (!reports.isReportName(params.name)) error(404, 'There is no report by that name.');
	const parsed = reports.parseFilters(url.searchParams);
	if (!parsed.ok) return json({ message: parsed.message, issues: parsed.issues }, { status: 400 });
	return json(await reports.run(user.shopId, params.name, parsed.filters), { headers: { 'cache-control': 'private, no-store' } });
};
