import type { PageServerLoad } from './$types';
import { requireRole } from '$lib/server/auth/guard';
import type { BoardPage } from '$lib/board-query';
import { JOB_STATUSES, type JobStatus } from '$lib/domain';
import { STAFF } from '$lib/roles';
import * as board from '$lib/server/board';
import * as users from '$lib/server/users';

/** Statuses of a job still in the shop's hands. */
const OPEN: JobStatus[] = JOB_STATUSES.filter((s) => s !== 'picked_up' && s !== 'declined');

export const load: PageServerLoad = async () => {
	const user = requireRole(STAFF);
	const view = (params: Record<string, string>) => board.page(user.shopId, board.parseBoardQuery(new URLSearchParams(params)));
	const [team, counts, waiting, mine] = await Promise.all([
		users.listTeam(user.shopId),
		board.statusCounts(user.shopId),
		// Oldest first: what has sat longest without a step forward.
		view({ age: 'stale', sort: 'changed', dir: 'asc', per: '10' }),
		user.role === 'technician' ? view({ tech: user.id, status: OPEN.join(','), sort: 'promised', dir: 'asc', per: '10' }) : null
	]);
	const brief = (page: BoardPage) => ({
		rows: page.rows.slice(0, 5).map((r) => ({ id: r.id, number: r.number, customer: r.customer, unit: r.unit, status: r.status, promisedOn: r.promisedOn })),
		total: page.total,
		more: page.total === null ? page.hasNext : page.total > 5
	});
	return {
		firstName: user.name.split(' ')[0],
		teamSize: team.length,
		role: user.role,
		userId: user.id,
		counts,
		open: OPEN,
		waiting: brief(waiting),
		mine: mine ? brief(mine) : null
	};
};
