import { createHash } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { Session, User } from '../../src/lib/server/db/models';
import { Client, signedIn } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';

const COOKIE = 'mendwise_session';
let shop: ShopFixture;

beforeAll(async () => {
	shop = await createShop('Sessions');
});

describe('sessions', () => {
	it('sign-in sets an HttpOnly, SameSite=Lax cookie and stores only a hash of its token', async () => {
		const client = new Client();
		const reply = await client.signIn(shop.staff.writer.email, shop.staff.writer.password);
		const setCookie = reply.headers.getSetCookie().find((c) => c.startsWith(COOKIE + '='))!;
		expect(setCookie).toMatch(/HttpOnly/i);
		expect(setCookie).toMatch(/SameSite=Lax/i);
		const token = client.cookies.get(COOKIE)!;
		expect(token.length).toBeGreaterThanOrEqual(20);
		expect(await Session.findByPk(token)).toBeNull();
		const hashed = createHash('sha256').update(token).digest('hex');
		expect(await Session.findByPk(hashed)).not.toBeNull();
	});

	it('every sign-in issues a new session id; a planted cookie is never promoted', async () => {
		const client = new Client();
		client.cookies.set(COOKIE, 'planted-by-someone-else-0123456789');
		await client.signIn(shop.staff.writer.email, shop.staff.writer.password);
		const first = client.cookies.get(COOKIE);
		expect(first).not.toBe('planted-by-someone-else-0123456789');
		await client.signIn(shop.staff.writer.email, shop.staff.writer.password);
		expect(client.cookies.get(COOKIE)).not.toBe(first);
	});

	it('sign-out ends the session: the old cookie no longer works', async () => {
		const client = await signedIn(shop.staff.technician.email, shop.staff.technician.password);
		const token = client.cookies.get(COOKIE)!;
		expect((await client.get('/api/me')).status).toBe(200);
		const out = await client.form('/signout', {});
		expect(out.status).toBe(303);
		const replay = new Client();
		replay.cookies.set(COOKIE, token);
		expect((await replay.get('/api/me')).status).toBe(401);
	});

	it('a password change ends the other sessions and keeps this one', async () => {
		const fixture = await createShop('Password');
		const me = fixture.staff.manager;
		const here = await signedIn(me.email, me.password);
		const elsewhere = await signedIn(me.email, me.password);
		const wrong = await here.form('/account?/password', { current: 'not-it-at-all', next: 'a-new-password-42', confirm: 'a-new-password-42' });
		expect(wrong.status).toBe(400);
		expect(wrong.text).toContain('Your current password is not right.');
		const changed = await here.form('/account?/password', { current: me.password, next: 'a-new-password-42', confirm: 'a-new-password-42' });
		expect(changed.status).toBe(200);
		expect((await here.get('/api/me')).status).toBe(200);
		expect((await elsewhere.get('/api/me')).status).toBe(401);
		expect((await new Client().form('/signin', { email: me.email, password: me.password })).status).toBe(400);
		expect((await new Client().form('/signin', { email: me.email, password: 'a-new-password-42' })).status).toBe(303);
	});

	it('passwords are stored as argon2id with at least m=19456 KiB, t=2, p=1', async () => {
		const user = await User.findByPk(shop.staff.owner.id);
		const match = /^\$argon2id\$v=19\$m=(\d+),t=(\d+),p=(\d+)\$/.exec(user!.passwordHash);
		expect(match).not.toBeNull();
		const [, m, t, p] = match!.map(Number);
		expect(m).toBeGreaterThanOrEqual(19456);
		expect(t).toBeGreaterThanOrEqual(2);
		expect(p).toBeGreaterThanOrEqual(1);
	});

	it('a wrong password and an unknown account get the same clear message', async () => {
		const a = await new Client().form('/signin', { email: shop.staff.owner.email, password: 'wrong-password' });
		const b = await new Client().form('/signin', { email: 'nobody@shop.example', password: 'wrong-password' });
		expect(a.status).toBe(400);
		expect(b.status).toBe(400);
		expect(a.text).toContain('That e-mail and password do not match an account.');
		expect(b.text).toContain('That e-mail and password do not match an account.');
	});

	it('malformed sign-in input is refused with field messages and keeps the e-mail typed', async () => {
		const reply = await new Client().form('/signin', { email: 'not-an-email', password: '' });
		expect(reply.status).toBe(400);
		expect(reply.text).toContain('Enter a valid e-mail address');
		expect(reply.text).toContain('value="not-an-email"');
	});
});
