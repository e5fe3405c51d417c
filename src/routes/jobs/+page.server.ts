import type { PageServerLoad } from './$types';
import { STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as board from '$lib/server/board';
import * as jobs from '$lib/server/jobs';

export const load: PageServerLoad = async ({ url }) => {
	const user = requireRole(STAFF);
	const [first, techs] = await Promise.all([
		board.page(user.shopId, board.parseBoardQuery(url.searchParams)),
		jobs.technicians(user.shopId)
	]);
	return { board: first, technicians: techs.map((t) => ({ id: t.id, name: t.name })), canCheckIn: user.role !== 'technician' };
};
