// Two app instances on one database, on different ports, as behind a load balancer: a session
// made on one is valid on the other, a write on one is read on the other, and a sign-out on one
// ends the session on both.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApp, type AppInstance } from '../helpers/app';
import { Client, signedIn } from '../helpers/client';
import { createShop, PASSWORD, type ShopFixture } from '../helpers/fixtures';

let one: AppInstance;
let two: AppInstance;
let shop: ShopFixture;

beforeAll(async () => {
	shop = await createShop('Two instances');
	[one, two] = await Promise.all([startApp(), startApp()]);
}, 60_000);

afterAll(async () => {
	await Promise.all([one?.stop(), two?.stop()]);
});

/** The same cookie jar, pointed at another instance. */
function sameSessionOn(client: Client, base: string): Client {
	const moved = new Client(base);
	for (const [k, v] of client.cookies) moved.cookies.set(k, v);
	return moved;
}

describe('two app instances on one database', () => {
	it('listen on different ports', () => {
		expect(new URL(one.url).port).not.toBe(new URL(two.url).port);
	});

	it('a session made on one is valid on the other', async () => {
		const onOne = await signedIn(shop.staff.writer.email, PASSWORD, one.url);
		const onTwo = sameSessionOn(onOne, two.url);
		const me = await onTwo.get('/api/me');
		expect(me.status).toBe(200);
		expect(me.json().email).toBe(shop.staff.writer.email);
		expect((await onTwo.get('/jobs')).status).toBe(200);
	});

	it('a write on one is read on the other', async () => {
		const onOne = await signedIn(shop.staff.writer.email, PASSWORD, one.url);
		const onTwo = sameSessionOn(onOne, two.url);
		const created = await onOne.form('/customers?/create', { name: 'Oriel Brackenbury', phone: '555-0199', email: '', address: '', notes: '' });
		expect(created.status).toBe(303);
		const id = created.location!.split('/').pop()!;
		const page = await onTwo.get(`/customers/${id}`);
		expect(page.status).toBe(200);
		expect(page.text).toContain('Oriel Brackenbury');
		// And back: an edit on two shows on one.
		const edited = await onTwo.form(`/customers/${id}?/update`, { name: 'Oriel Brackenbury', phone: '555-0142', email: '', address: '', notes: '' });
		expect(edited.status).toBe(200);
		expect((await onOne.get(`/customers/${id}`)).text).toContain('555-0142');
	});

	it('a sign-out on one ends the session on the other', async () => {
		const onOne = await signedIn(shop.staff.technician.email, PASSWORD, one.url);
		const onTwo = sameSessionOn(onOne, two.url);
		expect((await onTwo.get('/api/me')).status).toBe(200);
		await onOne.form('/signout', {});
		expect((await onTwo.get('/api/me')).status).toBe(401);
	});

	it('a form signed for one origin is refused by the other (each instance checks its own ORIGIN)', async () => {
		const onTwo = await signedIn(shop.staff.writer.email, PASSWORD, two.url);
		const reply = await onTwo.form('/customers?/create', { name: 'Wrong Door', phone: '', email: '', address: '', notes: '' }, one.url);
		expect(reply.status).toBe(403);
	});
});
