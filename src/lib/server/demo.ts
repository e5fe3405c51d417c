import { randomBytes } from 'node:crypto';
import { hashPassword } from './auth/password';
import { db } from './db';
import { Customer, Shop, SpecSheet, Unit, User, type Role } from './db/models';
import * as jobs from './jobs';
import * as quotes from './quotes';
import * as readings from './readings';
import { seedDemoCatalog } from './demo-catalog';
import { seedDemoHistory } from './demo-history';
import { seedStarterSheets } from './specs';

// The demo scenario: an invented shop in an invented town. Every name here is made up.
export const DEMO_SHOP = {
	name: 'Larkspur Engine & Generator Repair',
	phone: '555-0142',
	email: 'desk@larkspur-repair.example',
	address: '18 Foundry Lane, Millbrook'
};

const DEMO_STAFF: { name: string; email: string; role: Role }[] = [
	{ name: 'Maren Oakes', email: 'maren@larkspur-repair.example', role: 'owner' },
	{ name: 'Tobias Wren', email: 'tobias@larkspur-repair.example', role: 'manager' },
	{ name: 'Priya Hollins', email: 'priya@larkspur-repair.example', role: 'writer' },
	{ name: 'Dev Castellano', email: 'dev@larkspur-repair.example', role: 'technician' },
	{ name: 'Ines Marlowe', email: 'ines@larkspur-repair.example', role: 'technician' }
];

const DEMO_CUSTOMERS = [
	{ name: 'Gideon Farrow', phone: '555-0178', email: 'gideon.farrow@example.com', address: '7 Orchard Rise, Millbrook', notes: 'Prefers a call before noon.' },
	{ name: 'Hollis Ridge Farm Supply', phone: '555-0190', email: 'office@hollisridge.example', address: 'Route 4, Kettle Bend', notes: 'Fleet of four portable units for the barn and the stalls.' },
	{ name: 'Ada Quillfeather', phone: '555-0123', email: 'ada.q@example.net', address: '221 Lantern Street, Millbrook', notes: '' }
];

export interface DemoSignIn {
	name: string;
	email: string;
	role: Role;
	password: string;
}

/**
 * Loads the demo scenario once. Returns the sign-ins with fresh random passwords when it created
 * them, or null when the demo shop was already there.
 */
export async function seedDemo(): Promise<DemoSignIn[] | null> {
	const existing = await Shop.findOne({ where: { name: DEMO_SHOP.name } });
	if (existing) return null;
	const signIns = DEMO_STAFF.map((person) => ({ ...person, password: randomBytes(9).toString('base64url') }));
	const hashes = await Promise.all(signIns.map((s) => hashPassword(s.password)));
	const { shop, staff, customers } = await db().transaction(async (transaction) => {
		const shop = await Shop.create(DEMO_SHOP, { transaction });
		const staff = await User.bulkCreate(
			signIns.map((s, i) => ({ shopId: shop.id, name: s.name, email: s.email, role: s.role, passwordHash: hashes[i] })),
			{ transaction, returning: true }
		);
		const customers = await Customer.bulkCreate(
			DEMO_CUSTOMERS.map((c) => ({ ...c, shopId: shop.id, searchText: [c.name, c.phone, c.email, c.address].join(' ').toLowerCase() })),
			{ transaction, returning: true }
		);
		await seedStarterSheets(shop.id, transaction);
		await seedDemoCatalog(shop.id, transaction);
		return { shop, staff, customers };
	});
	await seedDemoJobs(shop.id, staff, customers);
	// Reports: eighteen months of finished jobs (demo-history.ts), so every chart has data.
	await seedDemoHistory(shop.id, { technicians: staff.filter((u) => u.role === 'technician').map((u) => u.id), writer: staff.find((u) => u.role === 'writer')!.id });
	return signIns;
}

/** A few units on the bench so the board and the job pages have something to show. */
async function seedDemoJobs(shopId: string, staff: User[], customers: Customer[]) {
	const person = (role: Role) => staff.find((u) => u.role === role)!;
	const writer = { id: person('writer').id, shopId, role: 'writer' as const };
	const dev = staff.find((u) => u.name.startsWith('Dev'))!;
	const tech = { id: dev.id, shopId, role: 'technician' as const };
	const [gideon, hollis, ada] = customers;
	const unit = (customerId: string, fields: Partial<Unit> & Pick<Unit, 'kind'>) => Unit.create({ shopId, customerId, ...fields });

	const pg5500 = await unit(gideon.id, {
		kind: 'portable', maker: 'Harrowgate', model: 'PG-5500', serial: 'HG55-210447', runningWatts: 5500, startingWatts: 6875,
		voltage: '120/240', fuel: 'gasoline', engineHours: '212.0', yearBought: 2021, pricePaid: '899.00', condition: 'good'
	});
	const tl7000 = await unit(hollis.id, {
		kind: 'portable', maker: 'Ostrander', model: 'TL-7000', serial: 'OS7-88213', runningWatts: 7000, startingWatts: 9000,
		voltage: '120/240', fuel: 'dual_fuel', engineHours: '640.5', yearBought: 2019, pricePaid: '1249.00', condition: 'fair'
	});
	const q2200 = await unit(hollis.id, {
		kind: 'inverter', maker: 'Brevik Power', model: 'Q2200i', serial: 'BQ22-5531', runningWatts: 1800, startingWatts: 2200,
		voltage: '120', fuel: 'gasoline', engineHours: '98.0', yearBought: 2023, pricePaid: '579.00', condition: 'excellent'
	});
	const hs20 = await unit(ada.id, {
		kind: 'standby', maker: 'Kestrel', model: 'HS-20', serial: 'KS20-00917', runningWatts: 20000, startingWatts: 20000,
		voltage: '120/240', fuel: 'natural_gas', engineHours: '1530.0', yearBought: 2016, pricePaid: '5400.00', condition: 'good'
	});

	const sheet = await SpecSheet.findOne({ where: { shopId, name: '5 kW-class portable, brush-type alternator' } });
	const noPower = await jobs.checkIn(writer, pg5500.id, {
		complaint: 'Starts and runs smoothly but there is no power at any outlet. Breakers reset, still nothing.',
		diagnosticFee: '89.00', promisedOn: null, technicianId: dev.id
	});
	await jobs.transition(tech, noPower.id, 'diagnosing');
	await jobs.setSpecSheet(tech, noPower.id, sheet?.id ?? null);
	if (sheet) {
		const items = await sheet.getItems();
		const byLabel = (start: string) => items.find((i) => i.label.startsWith(start))!;
		for (const [label, value] of [
			['Stator main winding 1', '0.42'],
			['Stator main winding 2', '0.44'],
			['Rotor field resistance', 'OL'],
			['Brush length', '11']
		]) {
			await readings.add(tech, noPower.id, { specItemId: byLabel(label).id, label: '', unit: undefined, value, note: '' });
		}
	}
	await jobs.checkIn(writer, tl7000.id, {
		complaint: 'Surges and hunts under load on propane; fine on gasoline.', diagnosticFee: '89.00', promisedOn: null, technicianId: null
	});
	const inverter = await jobs.checkIn(writer, q2200.id, {
		complaint: 'Overload light comes on with a small heater.', diagnosticFee: '69.00', promisedOn: null, technicianId: dev.id
	});
	// Diagnosed, priced against a new inverter, sent, approved by the customer, repaired: ready.
	await jobs.transition(tech, inverter.id, 'diagnosing');
	const { quote } = await quotes.forJob(shopId, inverter.id);
	await quotes.saveDraft(tech, inverter.id, INVERTER_ESTIMATE, quote.lockVersion);
	const sent = await quotes.send(writer, inverter.id);
	await quotes.decide(sent.token, {
		decision: 'approved', optionIndex: 0, signerName: hollis.name, reason: '', clientAddress: '127.0.0.1', userAgent: 'demo data'
	});
	for (const to of ['in_repair', 'ready'] as const) await jobs.transition(tech, inverter.id, to);
	await jobs.checkIn(writer, hs20.id, {
		complaint: 'Weekly exercise runs, but the unit did not take over during the last outage.', diagnosticFee: '149.00', promisedOn: null, technicianId: null
	});
}

/** The demo inverter's estimate: invented parts and prices. */
const INVERTER_ESTIMATE = {
	unit: { description: 'Brevik Power Q2200i', ageYears: '3', engineHours: '98', lifeYears: '8', lifeHours: '1000', condition: 'excellent', asIsValue: '150', annualUpkeep: '0' },
	options: [
		{
			label: 'Replace the inverter module',
			kind: 'repair',
			creditDiagnosticFee: true,
			lines: [
				{ kind: 'part', description: 'Inverter module, 2 kW class', quantity: '1', unitCost: '148.00', specialOrder: true },
				{ kind: 'labour', description: 'Replace inverter module and test under load', hours: '1.5' }
			]
		},
		{
			label: 'New 2.2 kW inverter',
			kind: 'replacement',
			lines: [{ kind: 'unit', description: 'Brevik Power Q2200i, new', cost: '410.00', price: '579.00' }],
			lifeYears: '8',
			lifeHours: '1000'
		},
		{ label: 'Decline the repair', kind: 'decline', lines: [{ kind: 'fee', description: 'Diagnostic fee', amount: '69.00', feeType: 'diagnostic' }] }
	]
};
