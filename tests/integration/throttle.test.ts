import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client } from '../helpers/client';
import { startApp, type AppInstance } from '../helpers/app';
import { createShop, uniqueEmail, type ShopFixture } from '../helpers/fixtures';

let shop: ShopFixture;
let app: AppInstance;

beforeAll(async () => {
	shop = await createShop('Throttle');
	// An instance behind a (pretend) proxy, so each test can speak from its own client address.
	app = await startApp({ ADDRESS_HEADER: 'x-forwarded-for', XFF_DEPTH: '1', THROTTLE_ADDRESS_MAX: '8' });
});

afterAll(async () => {
	await app?.stop();
});

const from = (address: string) => new Client(app.url, { 'x-forwarded-for': address });

describe('sign-in throttling', () => {
	it('locks an account after 5 failures, even for the right password, with a clear message', async () => {
		const who = shop.staff.technician;
		for (let i = 0; i < 5; i++) {
			const reply = await from(`198.51.100.${i + 1}`).form('/signin', { email: who.email, password: `wrong-${i}` });
			expect(reply.status).toBe(400);
		}
		const locked = await from('198.51.100.77').form('/signin', { email: who.email, password: who.password });
		expect(locked.status).toBe(429);
		expect(locked.text).toContain('Too many failed sign-ins for this account');
		// Another account is not affected.
		const other = await from('198.51.100.78').form('/signin', { email: shop.staff.writer.email, password: shop.staff.writer.password });
		expect(other.status).toBe(303);
	});

	it('blocks a client address after many failures across accounts, not other addresses', async () => {
		const address = '203.0.113.9';
		for (let i = 0; i < 8; i++) {
			const reply = await from(address).form('/signin', { email: uniqueEmail('spray'), password: 'guess-guess' });
			expect(reply.status).toBe(400);
		}
		const blocked = await from(address).form('/signin', { email: shop.staff.manager.email, password: shop.staff.manager.password });
		expect(blocked.status).toBe(429);
		expect(blocked.text).toContain('Too many failed sign-ins from this network');
		const elsewhere = await from('203.0.113.10').form('/signin', { email: shop.staff.manager.email, password: shop.staff.manager.password });
		expect(elsewhere.status).toBe(303);
	});
});
