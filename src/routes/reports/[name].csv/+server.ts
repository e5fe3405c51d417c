import { error, json } from '@sveltejs/kit';
import { stringify } from 'csv-stringify/sync';
import type { RequestHandler } from './$types';
import { MANAGERS } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as reports from '$lib/server/reports';

/** The rows behind a report's chart, one per job (or job and technician), as a spreadsheet file. */
export const GET: RequestHandler = async ({ params, url }) => {
	const user = requireRole(MANAGERS);
	if (!reports.isReportName(params.name)) error(404, 'There is no report by that name.');
	const parsed = reports.parseFilters(url.searchParams);
	if (!parsed.ok) return json({ message: parsed.message, issues: parsed.issues }, { status: 400 });
	const { columns, rows } = await reports.csvRows(user.shopId, params.name, parsed.filters);
	const body = stringify(rows, {
		header: true,
		columns: columns.map((c) => ({ key: c.key, header: c.label })),
		record_delimiter: '\r\n',
		cast: { number: (v) => String(v) }
	});
	return new Response('\ufeff' + body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="${reports.csvFileName(params.name, parsed.filters)}"`,
			'cache-control': 'private, no-store'
		}
	});
};
