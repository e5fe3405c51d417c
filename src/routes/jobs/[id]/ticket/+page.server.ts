import { error } from '@sveltejs/kit';
import { Decimal } from 'decimal.js';
import type { PageServerLoad } from './$types';
import { formatMoney } from '$lib/pricing/money';
import { STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import { Shop } from '$lib/server/db/models';
import * as jobs from '$lib/server/jobs';
import * as settings from '$lib/server/settings';

export const load: PageServerLoad = async ({ params }) => {
	const user = requireRole(STAFF);
	const found = await jobs.detail(user.shopId, params.id);
	if (!found) error(404, 'No such job in your shop.');
	const [shop, shopSettings] = await Promise.all([Shop.findByPk(user.shopId, { attributes: ['name', 'phone', 'email', 'address'] }), settings.get(user.shopId)]);
	const { job, unit, customer, technician } = found;
	return {
		shop: shop!.get({ plain: true }),
		job: { id: job.id, number: job.number, complaint: job.complaint, diagnosticFee: formatMoney(new Decimal(job.diagnosticFee), shopSettings.currency), promisedOn: job.promisedOn, openedAt: job.createdAt.toISOString() },
		unit: { kind: unit.kind, maker: unit.maker, model: unit.model, serial: unit.serial, runningWatts: unit.runningWatts, engineHours: unit.engineHours, condition: unit.condition },
		customer: { name: customer.name, phone: customer.phone, email: customer.email, address: customer.address },
		technician: technician?.name ?? null
	};
};
