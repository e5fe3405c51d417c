import type { PageServerLoad } from './$types';
import { requireRole } from '$lib/server/auth/guard';
import { STAFF } from '$lib/roles';
import * as users from '$lib/server/users';

export const load: PageServerLoad = async () => {
	const user = requireRole(STAFF);
	const team = await users.listTeam(user.shopId);
	return { firstName: user.name.split(' ')[0], teamSize: team.length, role: user.role };
};
