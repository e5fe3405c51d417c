import { error, fail, redirect } from '@sveltejs/kit';
import { Decimal } from 'decimal.js';
import { formatMoney } from '$lib/pricing/money';
import type { Actions, PageServerLoad } from './$types';
import { FRONT_DESK, STAFF } from '$lib/roles';
import { attempt } from '$lib/server/actions';
import { requireRole } from '$lib/server/auth/guard';
import * as customers from '$lib/server/customers';
import { echo, parseForm } from '$lib/server/forms';
import * as jobs from '$lib/server/jobs';
import * as settings from '$lib/server/settings';
import * as units from '$lib/server/units';

export const load: PageServerLoad = async ({ params }) => {
	const user = requireRole(STAFF);
	const unit = await units.get(user.shopId, params.id);
	if (!unit) error(404, 'No such unit in your shop.');
	const [customer, history, techs, shop] = await Promise.all([
		customers.get(user.shopId, unit.customerId),
		units.history(user.shopId, unit.id),
		jobs.technicians(user.shopId),
		settings.get(user.shopId)
	]);
	return {
		canEdit: FRONT_DESK.includes(user.role),
		unit: unit.get({ plain: true }),
		customer: { id: customer!.id, name: customer!.name },
		technicians: techs.map((t) => ({ id: t.id, name: t.name })),
		/** The check-in form starts from the shop's diagnostic fee. */
		diagnosticFee: settings.moneyField(shop.fees.diagnostic, shop.currency),
		pricePaidText: unit.pricePaid == null ? null : formatMoney(new Decimal(unit.pricePaid), shop.currency),
		history: history.map((j) => ({ id: j.id, number: j.number, status: j.status, complaint: j.complaint, failedComponent: j.failedComponent, openedAt: j.createdAt.toISOString() }))
	};
};

export const actions: Actions = {
	update: async ({ request, params }) => {
		const user = requireRole(FRONT_DESK);
		const form = await request.formData();
		const parsed = parseForm(units.unitSchema, form);
		if (!parsed.ok) return fail(400, { action: 'update', message: parsed.message, errors: parsed.errors, ...echo(form) });
		if (!(await units.update(user, params.id, parsed.data))) error(404, 'No such unit in your shop.');
		return { action: 'update', done: 'Unit saved.' };
	},
	checkIn: async ({ request, params }) => {
		const user = requireRole(FRONT_DESK);
		const form = await request.formData();
		const parsed = parseForm(jobs.checkInSchema, form);
		if (!parsed.ok) return fail(400, { action: 'checkIn', message: parsed.message, errors: parsed.errors, ...echo(form) });
		const result = await attempt(() => jobs.checkIn(user, params.id, parsed.data), { action: 'checkIn', ...echo(form) });
		if (!result.ok) return result.failure;
		redirect(303, `/jobs/${result.value.id}`);
	}
};
