import { fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { FRONT_DESK, STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as customers from '$lib/server/customers';
import { echo, parseForm } from '$lib/server/forms';

export const load: PageServerLoad = async ({ url }) => {
	const user = requireRole(STAFF);
	const q = url.searchParams.get('q') ?? '';
	// An odd page number falls back to the first page rather than failing.
	const asked = Number(url.searchParams.get('page') ?? '1');
	const page = Number.isInteger(asked) && asked >= 1 && asked <= 100_000 ? asked : 1;
	let found = await customers.search(user.shopId, q, page);
	if (page > found.pages) found = await customers.search(user.shopId, q, found.pages);
	return {
		q,
		page: Math.min(page, found.pages),
		pages: found.pages,
		total: found.total,
		canCreate: FRONT_DESK.includes(user.role),
		/** Arrived from "Check a unit in": the page says how a check-in goes from here. */
		checkingIn: url.searchParams.has('checkin') && FRONT_DESK.includes(user.role),
		customers: found.rows.map((c) => ({ id: c.id, name: c.name, phone: c.phone, email: c.email, address: c.address }))
	};
};

export const actions: Actions = {
	create: async ({ request }) => {
		const user = requireRole(FRONT_DESK);
		const form = await request.formData();
		const parsed = parseForm(customers.customerSchema, form);
		if (!parsed.ok) return fail(400, { message: parsed.message, errors: parsed.errors, ...echo(form) });
		const customer = await customers.create(user, parsed.data);
		redirect(303, `/customers/${customer.id}`);
	}
};
