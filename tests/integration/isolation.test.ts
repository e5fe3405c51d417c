// A user of shop A can neither read nor change anything of shop B.
import { beforeAll, describe, expect, it } from 'vitest';
import { Invite, User } from '../../src/lib/server/db/models';
import * as users from '../../src/lib/server/users';
import { signedIn, type Client } from '../helpers/client';
import { createShop, uniqueEmail, type ShopFixture } from '../helpers/fixtures';

let a: ShopFixture;
let b: ShopFixture;
let ownerA: Client;
let ownerB: Client;

beforeAll(async () => {
	[a, b] = await Promise.all([createShop('Isolation A'), createShop('Isolation B')]);
	ownerA = await signedIn(a.staff.owner.email, a.staff.owner.password);
	ownerB = await signedIn(b.staff.owner.email, b.staff.owner.password);
});

describe('shop isolation', () => {
	it("a form field naming another shop's user changes nothing", async () => {
		const reply = await ownerA.form('/team?/remove', { id: b.staff.writer.id });
		expect(reply.status).toBe(400);
		expect(reply.text).toContain('No such teammate in your shop.');
		expect((await User.findByPk(b.staff.writer.id))!.active).toBe(true);
	});

	it("a form field naming another shop's invite changes nothing", async () => {
		await ownerB.form('/team?/invite', { email: uniqueEmail('b-invite'), role: 'technician' });
		const invite = await Invite.findOne({ where: { shopId: b.id } });
		const reply = await ownerA.form('/team?/revoke', { id: invite!.id });
		expect(reply.status).toBe(400);
		expect((await Invite.findByPk(invite!.id))!.revokedAt).toBeNull();
	});

	it("the team page lists only the shop's own people", async () => {
		const page = await ownerA.get('/team');
		expect(page.text).toContain(a.staff.writer.email);
		expect(page.text).not.toContain(b.staff.writer.email);
		expect(page.text).not.toContain(b.name);
	});

	it('the service refuses a cross-shop removal whatever the caller passes', async () => {
		await expect(users.remove({ id: a.staff.owner.id, shopId: a.id, role: 'owner' }, b.staff.manager.id)).rejects.toThrow('No such teammate');
	});

	it('a malformed id is a clear 400, not a server error', async () => {
		const reply = await ownerA.form('/team?/remove', { id: "1' OR '1'='1" });
		expect(reply.status).toBe(400);
		expect(reply.text).toContain('Pick someone from the list.');
	});

	it('/api/me answers with the caller\'s own shop only', async () => {
		expect((await ownerA.get('/api/me')).json().shopId).toBe(a.id);
		expect((await ownerB.get('/api/me')).json().shopId).toBe(b.id);
	});
});
