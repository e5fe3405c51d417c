import type { PageServerLoad } from './$types';
import { MANAGERS, STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as specs from '$lib/server/specs';

export const load: PageServerLoad = async () => {
	const user = requireRole(STAFF);
	const sheets = await specs.list(user.shopId);
	return { canEdit: MANAGERS.includes(user.role), sheets: sheets.map((s) => ({ id: s.id, name: s.name, appliesTo: s.appliesTo })) };
};
