// Every route against every role and an anonymous visitor: allowed, sent to sign-in, or refused.
import { beforeAll, describe, expect, it } from 'vitest';
import { Client, signedIn } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';

type Who = 'anonymous' | 'owner' | 'manager' | 'writer' | 'technician';
type Expect = 'ok' | 'signin' | 'forbidden' | 'unauthorized' | 'home';

// What each visitor should get for each page or endpoint (GET).
const matrix: Record<string, Record<Who, Expect>> = {
	'/home': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/team': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'forbidden', technician: 'forbidden' },
	'/account': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/api/me': { anonymous: 'unauthorized', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/signin': { anonymous: 'ok', owner: 'home', manager: 'home', writer: 'home', technician: 'home' },
	'/signup': { anonymous: 'ok', owner: 'home', manager: 'home', writer: 'home', technician: 'home' },
	'/jobs': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/api/jobs': { anonymous: 'unauthorized', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/customers': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/specs': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/specs/new': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'forbidden', technician: 'forbidden' },
	'/catalog': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/catalog/parts.csv': { anonymous: 'unauthorized', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/settings': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'forbidden', technician: 'forbidden' },
	'/dev/mailbox': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
	'/payments': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'forbidden', technician: 'forbidden' },
	'/payments/payments.csv': { anonymous: 'unauthorized', owner: 'ok', manager: 'ok', writer: 'forbidden', technician: 'forbidden' },
	'/reports': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'forbidden', technician: 'forbidden' },
	'/api/health': { anonymous: 'ok', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' }
};

let shop: ShopFixture;
const clients = {} as Record<Who, Client>;

beforeAll(async () => {
	shop = await createShop('Access');
	clients.anonymous = new Client();
	for (const role of ['owner', 'manager', 'writer', 'technician'] as const) {
		clients[role] = await signedIn(shop.staff[role].email, shop.staff[role].password);
	}
});

describe('route access by role', () => {
	for (const [path, expected] of Object.entries(matrix)) {
		for (const who of Object.keys(expected) as Who[]) {
			it(`${who} → GET ${path} is ${expected[who]}`, async () => {
				const reply = await clients[who].get(path);
				switch (expected[who]) {
					case 'ok':
						expect(reply.status).toBe(200);
						break;
					case 'signin':
						expect(reply.status).toBe(303);
						expect(reply.location).toBe(`/signin?next=${encodeURIComponent(path)}`);
						break;
					case 'home':
						expect(reply.status).toBe(303);
						expect(reply.location).toBe('/home');
						break;
					case 'forbidden':
						expect(reply.status).toBe(403);
						expect(reply.text).toContain('Your role does not give access');
						break;
					case 'unauthorized':
						expect(reply.status).toBe(401);
						break;
				}
			});
		}
	}

	it('the root sends visitors to sign-in and staff to their day', async () => {
		expect((await clients.anonymous.get('/')).location).toBe('/signin');
		expect((await clients.writer.get('/')).location).toBe('/home');
	});

	it('an unknown address is a 404 page with a clear message', async () => {
		const reply = await clients.owner.get('/no-such-page');
		expect(reply.status).toBe(404);
		expect(reply.text).toContain('There is no page at this address.');
	});

	it('writers and technicians cannot use the team actions', async () => {
		for (const who of ['writer', 'technician'] as const) {
			const invite = await clients[who].form('/team?/invite', { email: 'x@shop.example', role: 'technician' });
			expect(invite.status).toBe(403);
			const remove = await clients[who].form('/team?/remove', { id: shop.staff.owner.id });
			expect(remove.status).toBe(403);
		}
	});

	it('anonymous form posts to staff actions are sent to sign-in and change nothing', async () => {
		const reply = await clients.anonymous.form('/team?/remove', { id: shop.staff.writer.id });
		expect(reply.status).toBe(303);
		expect(reply.location).toMatch(/^\/signin/);
		expect((await clients.writer.get('/api/me')).status).toBe(200);
	});

	it('a form posted from another site is refused and changes nothing', async () => {
		const reply = await clients.owner.form('/team?/remove', { id: shop.staff.writer.id }, 'http://elsewhere.example');
		expect(reply.status).toBe(403);
		expect((await clients.writer.get('/api/me')).status).toBe(200);
	});

	it('navigation shows only what the role may open', async () => {
		const ownerHome = await clients.owner.get('/home');
		const techHome = await clients.technician.get('/home');
		expect(ownerHome.text).toContain('href="/team"');
		expect(techHome.text).not.toContain('href="/team"');
	});
});
