import { error, fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { BENCH, STAFF } from '$lib/roles';
import { attempt } from '$lib/server/actions';
import * as actuals from '$lib/server/actuals';
import { requireRole } from '$lib/server/auth/guard';
import { UserError } from '$lib/server/errors';
import { echo, parseForm } from '$lib/server/forms';

export const load: PageServerLoad = async ({ params }) => {
	const user = requireRole(STAFF);
	let found: Awaited<ReturnType<typeof actuals.view>>;
	try {
		found = await actuals.view(user.shopId, params.id);
	} catch (e) {
		if (e instanceof UserError) error(404, e.message);
		throw e;
	}
	const canRecord = BENCH.includes(user.role);
	const forOthers = actuals.recordsForOthers(user.role);
	// Hours are most often the assigned technician's: the desk or a manager recording them starts there.
	const assigned = found.job.technicianId && found.people.some((p) => p.id === found.job.technicianId) ? found.job.technicianId : null;
	return {
		worker: forOthers ? (assigned ?? user.id) : user.id,
		canRecord,
		forOthers,
		job: { id: found.job.id, number: found.job.number, status: found.job.status },
		recordable: found.recordable,
		labour: found.labour.map((l) => ({ ...l, removable: canRecord && (forOthers || l.technicianId === user.id) })),
		hoursByPerson: found.hoursByPerson,
		parts: found.parts.map((p) => ({ ...p, removable: canRecord && (forOthers || p.recordedBy === user.id) })),
		approved: found.approved,
		people: forOthers ? found.people : found.people.filter((p) => p.id === user.id)
	};
};

export const actions: Actions = {
	hours: async ({ request, params }) => {
		const user = requireRole(BENCH);
		const form = await request.formData();
		const parsed = parseForm(actuals.hoursSchema, form);
		if (!parsed.ok) return fail(400, { action: 'hours', message: parsed.message, errors: parsed.errors, ...echo(form) });
		const result = await attempt(() => actuals.recordHours(user, params.id, parsed.data), { action: 'hours', ...echo(form) });
		return result.ok ? { action: 'hours', done: 'Hours recorded.' } : result.failure;
	},
	removeHours: async ({ request, params }) => {
		const user = requireRole(BENCH);
		const parsed = parseForm(actuals.entrySchema, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'removeHours', message: parsed.errors.entryId });
		const result = await attempt(() => actuals.removeHours(user, params.id, parsed.data.entryId), { action: 'removeHours' });
		return result.ok ? { action: 'removeHours', done: 'Hours removed.' } : result.failure;
	},
	part: async ({ request, params }) => {
		const user = requireRole(BENCH);
		const form = await request.formData();
		const parsed = parseForm(actuals.partSchema, form);
		if (!parsed.ok) return fail(400, { action: 'part', message: parsed.message, errors: parsed.errors, ...echo(form) });
		const result = await attempt(() => actuals.recordPart(user, params.id, parsed.data), { action: 'part', ...echo(form) });
		return result.ok ? { action: 'part', done: 'Part recorded.' } : result.failure;
	},
	removePart: async ({ request, params }) => {
		const user = requireRole(BENCH);
		const parsed = parseForm(actuals.entrySchema, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'removePart', message: parsed.errors.entryId });
		const result = await attempt(() => actuals.removePart(user, params.id, parsed.data.entryId), { action: 'removePart' });
		return result.ok ? { action: 'removePart', done: 'Part removed.' } : result.failure;
	}
};
