import { beforeAll, describe, expect, it } from 'vitest';
import { Invite, User } from '../../src/lib/server/db/models';
import { Client, signedIn } from '../helpers/client';
import { createShop, uniqueEmail, type ShopFixture } from '../helpers/fixtures';

let shop: ShopFixture;
let owner: Client;
let manager: Client;

function inviteLinkFrom(html: string): string {
	const match = /value="(https?:\/\/[^"]+\/invite\/[A-Za-z0-9_-]+)"/.exec(html);
	if (!match) throw new Error('no invite link on the page');
	return new URL(match[1]).pathname;
}

beforeAll(async () => {
	shop = await createShop('Team');
	owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
	manager = await signedIn(shop.staff.manager.email, shop.staff.manager.password);
});

describe('invites and team', () => {
	it('an invite link is single-use and signs the new technician in', async () => {
		const email = uniqueEmail('newtech');
		const created = await owner.form('/team?/invite', { email, role: 'technician' });
		expect(created.status).toBe(200);
		const path = inviteLinkFrom(created.text);

		const visitor = new Client();
		const page = await visitor.get(path);
		expect(page.text).toContain(email);
		const weak = await visitor.form(path, { name: 'Nell Tamsin', password: 'short' });
		expect(weak.status).toBe(400);
		expect(weak.text).toContain('Use at least 10 characters.');
		const joined = await visitor.form(path, { name: 'Nell Tamsin', password: 'long-enough-password' });
		expect(joined.status).toBe(303);
		const me = (await visitor.get('/api/me')).json();
		expect(me).toMatchObject({ role: 'technician', shopId: shop.id, email });

		const again = await new Client().form(path, { name: 'Someone Else', password: 'long-enough-password' });
		expect(again.status).toBe(400);
		expect(again.text).toContain('has been used, withdrawn or has expired');
		expect(await User.count({ where: { email } })).toBe(1);
	});

	it('an expired or withdrawn invite cannot be used', async () => {
		const expired = await owner.form('/team?/invite', { email: uniqueEmail('late'), role: 'writer' });
		const expiredPath = inviteLinkFrom(expired.text);
		await Invite.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { shopId: shop.id, role: 'writer' } });
		expect((await new Client().get(expiredPath)).text).toContain('This invite cannot be used');

		const email = uniqueEmail('withdrawn');
		const made = await owner.form('/team?/invite', { email, role: 'technician' });
		const path = inviteLinkFrom(made.text);
		const invite = await Invite.findOne({ where: { shopId: shop.id, email } });
		expect((await owner.form('/team?/revoke', { id: invite!.id })).status).toBe(200);
		const use = await new Client().form(path, { name: 'Too Late', password: 'long-enough-password' });
		expect(use.status).toBe(400);
	});

	it('a manager may invite floor staff but not an owner or a manager', async () => {
		const reply = await manager.form('/team?/invite', { email: uniqueEmail('boss'), role: 'owner' });
		expect(reply.status).toBe(400);
		expect(reply.text).toContain('A manager cannot invite an owner.');
		const ok = await manager.form('/team?/invite', { email: uniqueEmail('writer'), role: 'writer' });
		expect(ok.status).toBe(200);
	});

	it('bad invite input is refused and nothing is created', async () => {
		const before = await Invite.count({ where: { shopId: shop.id } });
		const reply = await owner.form('/team?/invite', { email: 'nope', role: 'emperor' });
		expect(reply.status).toBe(400);
		expect(reply.text).toContain('Enter a valid e-mail address');
		expect(await Invite.count({ where: { shopId: shop.id } })).toBe(before);
	});

	it('removing a teammate ends their sessions at once', async () => {
		const fixture = await createShop('Removal');
		const boss = await signedIn(fixture.staff.owner.email, fixture.staff.owner.password);
		const tech = await signedIn(fixture.staff.technician.email, fixture.staff.technician.password);
		expect((await tech.get('/api/me')).status).toBe(200);
		expect((await boss.form('/team?/remove', { id: fixture.staff.technician.id })).status).toBe(200);
		expect((await tech.get('/api/me')).status).toBe(401);
		const retry = await new Client().form('/signin', { email: fixture.staff.technician.email, password: fixture.staff.technician.password });
		expect(retry.status).toBe(400);
	});

	it('the last owner cannot be removed and nobody removes themselves', async () => {
		const fixture = await createShop('Owners');
		const boss = await signedIn(fixture.staff.owner.email, fixture.staff.owner.password);
		const self = await boss.form('/team?/remove', { id: fixture.staff.owner.id });
		expect(self.status).toBe(400);
		expect(self.text).toContain('You cannot remove yourself.');
	});

	it('a sign-up creates a shop with its owner, and a taken e-mail is refused', async () => {
		const email = uniqueEmail('founder');
		const visitor = new Client();
		const reply = await visitor.form('/signup', { shopName: 'Quarry Hill Small Engines', name: 'Ora Pell', email, password: 'a-strong-password' });
		expect(reply.status).toBe(303);
		expect((await visitor.get('/api/me')).json()).toMatchObject({ role: 'owner', email });
		const twice = await new Client().form('/signup', { shopName: 'Copy', name: 'Copy', email, password: 'a-strong-password' });
		expect(twice.status).toBe(400);
		expect(twice.text).toContain('already exists');
	});
});
