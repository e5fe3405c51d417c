// Builds shops and staff directly in the test database, each with unique names.
import { randomUUID } from 'node:crypto';
import { hashPassword } from '../../src/lib/server/auth/password';
import { db } from '../../src/lib/server/db/index';
import { Shop, User, type Role } from '../../src/lib/server/db/models';

export const PASSWORD = 'bench-test-password-1';

export interface Staff {
	id: string;
	email: string;
	role: Role;
	password: string;
}

export interface ShopFixture {
	id: string;
	name: string;
	staff: Record<Role, Staff>;
}

let cachedHash: Promise<string> | undefined;

export async function createShop(label = 'Test shop'): Promise<ShopFixture> {
	db();
	cachedHash ??= hashPassword(PASSWORD);
	const passwordHash = await cachedHash;
	const tag = randomUUID().slice(0, 8);
	const shop = await Shop.create({ name: `${label} ${tag}` });
	const staff = {} as Record<Role, Staff>;
	for (const role of ['owner', 'manager', 'writer', 'technician'] as const) {
		const email = `${role}.${tag}@shop.example`;
		const user = await User.create({ shopId: shop.id, email, name: `${role} ${tag}`, role, passwordHash });
		staff[role] = { id: user.id, email, role, password: PASSWORD };
	}
	return { id: shop.id, name: shop.name, staff };
}

export const uniqueEmail = (prefix = 'person') => `${prefix}.${randomUUID().slice(0, 8)}@shop.example`;
