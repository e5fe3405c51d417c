import type { RequestHandler } from './$types';
import { STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import { csvExport } from '../csv-export';

export const GET: RequestHandler = async () => {
	const user = requireRole(STAFF);
	return csvExport(user, 'replacements');
};
