// The job board in a browser: filters fetch JSON from the API without reloading the page, the
// address bar keeps them, Back undoes them one at a time, and a bookmark brings a view back.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import * as jobs from '../../src/lib/server/jobs';
import { BASE_URL } from '../helpers/client';
import { DESKTOP, closeBrowsers, openBrowser, signIn } from '../helpers/browser';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { actor, createJob } from '../helpers/shopdata';

let shop: ShopFixture;
afterAll(closeBrowsers);
beforeAll(async () => {
	shop = await createShop('Board e2e');
	for (const [name, maker] of [['Orla Penhallow', 'Harrowgate'], ['Bram Tessaly', 'Ostrander'], ['Della Ashcombe', 'Harrowgate'], ['Orrin Vale', 'Kestrel']]) {
		const { job } = await createJob(shop, { customerName: name, maker });
		if (name === 'Della Ashcombe') await jobs.transition(actor(shop, 'technician'), job.id, 'diagnosing');
	}
});

const customers = async (page: Page) => (await page.locator('tbody tr td:nth-child(2)').allTextContents()).map((t) => t.trim());
const params = (page: Page) => Object.fromEntries(new URL(page.url()).searchParams);

describe('the job board', () => {
	it('keeps filters in the address, fetches them from the API, and Back undoes them one by one', async () => {
		const page = await (await openBrowser(DESKTOP)).newPage();
		await signIn(page, shop.staff.writer);
		await page.goto(`${BASE_URL}/jobs`);
		expect(await customers(page)).toHaveLength(4);
		// A mark on the window survives only if the page is never reloaded.
		await page.evaluate(() => ((window as unknown as { stayed: boolean }).stayed = true));

		const fetched: string[] = [];
		page.on('request', (r) => r.url().includes('/api/jobs') && fetched.push(r.url()));
		await page.getByLabel('Search').fill('harrowgate');
		await page.waitForURL(/q=harrowgate/);
		expect((await customers(page)).sort()).toEqual(['Della Ashcombe', 'Orla Penhallow']);

		await page.getByRole('button', { name: /^Diagnosing/ }).click();
		await page.waitForURL(/status=diagnosing/);
		expect(await customers(page)).toEqual(['Della Ashcombe']);

		await page.getByRole('button', { name: /^Customer/ }).click();
		await page.waitForURL(/sort=customer/);
		expect(params(page)).toEqual({ q: 'harrowgate', status: 'diagnosing', sort: 'customer', dir: 'asc' });
		expect(fetched.length).toBeGreaterThanOrEqual(3);
		expect(fetched.every((u) => new URL(u).pathname === '/api/jobs')).toBe(true);

		// Back: the sort, then the status, then the search come off, and the board follows each time.
		await page.goBack();
		await page.waitForURL((u) => !u.searchParams.has('sort'));
		expect(params(page)).toEqual({ q: 'harrowgate', status: 'diagnosing' });
		await page.goBack();
		await page.waitForURL((u) => !u.searchParams.has('status'));
		await expect.poll(() => customers(page).then((c) => c.sort())).toEqual(['Della Ashcombe', 'Orla Penhallow']);
		expect(await page.getByRole('button', { name: /^Diagnosing/ }).getAttribute('aria-pressed')).toBe('false');
		expect(await page.getByLabel('Search').inputValue()).toBe('harrowgate');
		await page.goBack();
		await page.waitForURL((u) => !u.searchParams.has('q'));
		await expect.poll(() => customers(page).then((c) => c.length)).toBe(4);
		expect(await page.getByLabel('Search').inputValue()).toBe('');
		// Forward puts the search back.
		await page.goForward();
		await page.waitForURL(/q=harrowgate/);
		await expect.poll(() => customers(page).then((c) => c.length)).toBe(2);
		expect(await page.evaluate(() => (window as unknown as { stayed?: boolean }).stayed)).toBe(true);
		// The menu's link to the board, followed from a filtered board, shows every job again.
		await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Jobs', exact: true }).click();
		await page.waitForURL((u) => u.pathname === '/jobs' && !u.search);
		await expect.poll(() => customers(page).then((c) => c.length)).toBe(4);
		expect(await page.getByLabel('Search').inputValue()).toBe('');

		// A bookmarked view opens as it was, rendered on the server.
		const bookmarked = await (await openBrowser(DESKTOP)).newPage();
		await bookmarked.context().addCookies(await page.context().cookies());
		await bookmarked.goto(`${BASE_URL}/jobs?q=harrowgate&status=diagnosing&sort=customer&dir=asc`);
		expect(await customers(bookmarked)).toEqual(['Della Ashcombe']);
		expect(await bookmarked.getByRole('button', { name: /^Diagnosing/ }).getAttribute('aria-pressed')).toBe('true');
	});
});
