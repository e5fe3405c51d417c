import { randomBytes } from 'node:crypto';
import { hashPassword } from './auth/password';
import { db } from './db';
import { Customer, Shop, User, type Role } from './db/models';

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
	await db().transaction(async (transaction) => {
		const shop = await Shop.create(DEMO_SHOP, { transaction });
		await User.bulkCreate(
			signIns.map((s, i) => ({ shopId: shop.id, name: s.name, email: s.email, role: s.role, passwordHash: hashes[i] })),
			{ transaction }
		);
		await Customer.bulkCreate(DEMO_CUSTOMERS.map((c) => ({ ...c, shopId: shop.id })), { transaction });
	});
	return signIns;
}
