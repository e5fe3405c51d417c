import { error, fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { FRONT_DESK, STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as customers from '$lib/server/customers';
import { echo, parseForm } from '$lib/server/forms';
import * as units from '$lib/server/units';

export const load: PageServerLoad = async ({ params }) => {
	const user = requireRole(STAFF);
	const found = await customers.withUnits(user.shopId, params.id);
	if (!found) error(404, 'No such customer in your shop.');
	const { customer, units: list, jobs } = found;
	return {
		canEdit: FRONT_DESK.includes(user.role),
		customer: { id: customer.id, name: customer.name, phone: customer.phone, email: customer.email, address: customer.address, notes: customer.notes },
		units: list.map((u) => ({
			id: u.id, kind: u.kind, maker: u.maker, model: u.model, serial: u.serial, runningWatts: u.runningWatts,
			jobs: jobs.filter((j) => j.unitId === u.id).map((j) => ({ id: j.id, number: j.number, status: j.status, complaint: j.complaint, openedAt: j.createdAt.toISOString() }))
		}))
	};
};

export const actions: Actions = {
	update: async ({ request, params }) => {
		const user = requireRole(FRONT_DESK);
		const form = await request.formData();
		const parsed = parseForm(customers.customerSchema, form);
		if (!parsed.ok) return fail(400, { action: 'update', message: parsed.message, errors: parsed.errors, ...echo(form) });
		if (!(await customers.update(user, params.id, parsed.data))) error(404, 'No such customer in your shop.');
		return { action: 'update', done: 'Customer saved.' };
	},
	addUnit: async ({ request, params }) => {
		const user = requireRole(FRONT_DESK);
		if (!(await customers.get(user.shopId, params.id))) error(404, 'No such customer in your shop.');
		const form = await request.formData();
		const parsed = parseForm(units.unitSchema, form);
		if (!parsed.ok) return fail(400, { action: 'addUnit', message: parsed.message, errors: parsed.errors, ...echo(form) });
		const unit = await units.create(user, params.id, parsed.data);
		redirect(303, `/units/${unit.id}`);
	}
};
