// Customers, units and jobs made directly through the services, for tests that need a job.
import { Customer, type Role } from '../../src/lib/server/db/models';
import * as jobs from '../../src/lib/server/jobs';
import * as units from '../../src/lib/server/units';
import type { ShopFixture } from './fixtures';

export function actor(shop: ShopFixture, role: Role = 'writer') {
	return { id: shop.staff[role].id, shopId: shop.id, role };
}

export async function createJob(shop: ShopFixture, overrides: { complaint?: string; customerName?: string; maker?: string; serial?: string } = {}) {
	const name = overrides.customerName ?? 'Tamsin Yarrow';
	const customer = await Customer.create({ shopId: shop.id, name, phone: '555-0101', searchText: name.toLowerCase() });
	const unit = await units.create(actor(shop), customer.id, {
		kind: 'portable', maker: overrides.maker ?? 'Harrowgate', model: 'PG-5500', serial: overrides.serial ?? 'HG-1', runningWatts: 5500,
		startingWatts: 6875, voltage: '120/240', fuel: 'gasoline', engineHours: '200.0', yearBought: 2021, pricePaid: '899.00',
		condition: 'good', notes: ''
	});
	const job = await jobs.checkIn(actor(shop), unit.id, {
		complaint: overrides.complaint ?? 'Runs but no output', diagnosticFee: '89.00', promisedOn: null, technicianId: shop.staff.technician.id
	});
	return { customer, unit, job };
}
