// A new shop at phone width: set up, invite a technician, who joins and sees only their pages.
import { afterAll, describe, expect, it } from 'vitest';
import { BASE_URL } from '../helpers/client';
import { PHONE, closeBrowsers, openBrowser } from '../helpers/browser';
import { uniqueEmail } from '../helpers/fixtures';

afterAll(closeBrowsers);

describe('a shop gets started in the browser', () => {
	it('signs up, invites a technician, and the technician joins', async () => {
		const ownerEmail = uniqueEmail('owner');
		const owner = await (await openBrowser(PHONE)).newPage();
		await owner.goto(`${BASE_URL}/signup`);
		await owner.getByLabel('Shop name').fill('Thistle Row Power Repair');
		await owner.getByLabel('Your name').fill('Wren Albury');
		await owner.getByLabel('E-mail').fill(ownerEmail);
		await owner.getByLabel(/^Password/).fill('a-long-owner-password');
		await owner.getByRole('button', { name: 'Create shop' }).click();
		await owner.waitForURL('**/home');
		expect(await owner.getByRole('heading', { level: 1 }).textContent()).toContain('Wren');
		expect(await owner.getByRole('link', { name: 'Team' }).isVisible()).toBe(true);
		// Nothing overflows the phone's width.
		expect(await owner.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);

		await owner.getByRole('link', { name: 'Team' }).click();
		const techEmail = uniqueEmail('tech');
		await owner.getByLabel('E-mail').fill(techEmail);
		await owner.getByLabel('Role').selectOption('technician');
		await owner.getByRole('button', { name: 'Create invite link' }).click();
		const link = await owner.getByTestId('invite-link').inputValue();
		expect(link).toMatch(/\/invite\/[A-Za-z0-9_-]{40,}$/);

		const tech = await (await openBrowser(PHONE)).newPage();
		await tech.goto(link);
		await expect(tech.getByText(techEmail).isVisible()).resolves.toBe(true);
		await tech.getByLabel('Your name').fill('Caddo Frey');
		await tech.getByLabel(/password/i).fill('a-long-tech-password');
		await tech.getByRole('button', { name: 'Join the team' }).click();
		await tech.waitForURL('**/home');
		expect(await tech.getByRole('link', { name: 'Team' }).count()).toBe(0);
		const forbidden = await tech.goto(`${BASE_URL}/team`);
		expect(forbidden?.status()).toBe(403);

		await tech.goto(`${BASE_URL}/home`);
		await tech.getByRole('button', { name: 'Sign out' }).click();
		await tech.waitForURL('**/signin');
		await tech.goto(`${BASE_URL}/home`);
		expect(new URL(tech.url()).pathname).toBe('/signin');
	});
});
