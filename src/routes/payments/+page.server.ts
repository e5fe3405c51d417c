import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';
import { MANAGERS } from '$lib/roles';
import { attempt } from '$lib/server/actions';
import { requireRole } from '$lib/server/auth/guard';
import { parseForm } from '$lib/server/forms';
import * as payments from '$lib/server/payments';

const resolveSchema = z.object({ eventId: z.uuid({ error: 'Choose a flagged event from the list.' }) });

/** The newest this many matching payments are listed; the CSV export holds them all. */
const SHOWN = 100;

export const load: PageServerLoad = async ({ url }) => {
	const user = requireRole(MANAGERS);
	const parsed = payments.parseFilters(url.searchParams);
	const filters = parsed.success ? parsed.data : {};
	const problems = parsed.success ? [] : parsed.error.issues.map((i) => i.message);
	const [list, refunds, flagged] = await Promise.all([
		payments.listForShop(user.shopId, filters, SHOWN + 1),
		payments.refundsForShop(user.shopId, filters),
		payments.flaggedForShop(user.shopId)
	]);
	return {
		filters: Object.fromEntries(['status', 'kind', 'method', 'from', 'to', 'job'].map((k) => [k, url.searchParams.get(k) ?? ''])),
		problems,
		csvQuery: parsed.success ? url.searchParams.toString() : '',
		payments: list.slice(0, SHOWN),
		/** More payments match than the page lists: the filters or the CSV reach the rest. */
		more: list.length > SHOWN,
		refunds,
		flagged,
		api: payments.describeApi(),
		testMode: payments.isLocalFake()
	};
};

export const actions: Actions = {
	resolve: async ({ request }) => {
		const user = requireRole(MANAGERS);
		const parsed = parseForm(resolveSchema, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'resolve', message: parsed.errors.eventId });
		const result = await attempt(() => payments.resolveFlag(user, parsed.data.eventId), { action: 'resolve' });
		return result.ok ? { action: 'resolve', done: 'Marked as checked.' } : result.failure;
	}
};
