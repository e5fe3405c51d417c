// The writer checks a unit in at the counter; the technician records readings on a phone.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { SpecSheet } from '../../src/lib/server/db/models';
import { seedStarterSheets } from '../../src/lib/server/specs';
import { DESKTOP, PHONE, closeBrowsers, openBrowser, signIn } from '../helpers/browser';
import { createShop, type ShopFixture } from '../helpers/fixtures';

let shop: ShopFixture;
afterAll(closeBrowsers);
beforeAll(async () => {
	shop = await createShop('Bench e2e');
	await seedStarterSheets(shop.id);
});


function watchConsole(page: Page) {
	const problems: string[] = [];
	page.on('console', (m) => m.type() === 'error' && problems.push(m.text()));
	page.on('pageerror', (e) => problems.push(e.message));
	return problems;
}

describe('check-in and bench readings', () => {
	it('a writer checks in a no-output portable; the technician records readings at 390 px', async () => {
		const desk = await (await openBrowser(DESKTOP)).newPage();
		const deskProblems = watchConsole(desk);
		await signIn(desk, shop.staff.writer);
		await desk.getByRole('link', { name: 'Customers' }).click();
		await desk.getByRole('button', { name: 'New customer' }).click();
		await desk.getByLabel('Name').fill('Perrin Gallowglass');
		await desk.getByLabel('Phone').fill('555-0188');
		await desk.getByRole('button', { name: 'Save customer' }).click();
		await desk.waitForURL(/\/customers\/[0-9a-f-]{36}$/);
		await desk.getByRole('button', { name: 'Add a unit' }).click();
		await desk.getByLabel('Maker').fill('Harrowgate');
		await desk.getByLabel('Model').fill('PG-5500');
		await desk.getByLabel('Serial number').fill('HG55-E2E');
		await desk.getByLabel('Running watts').fill('5500');
		await desk.getByLabel('Starting watts').fill('6875');
		await desk.getByLabel('Year bought').fill('2021');
		await desk.getByRole('button', { name: 'Save unit' }).click();
		await desk.waitForURL(/\/units\//);
		await desk.getByLabel("Customer's complaint").fill('Runs but gives no output at any outlet');
		await desk.getByLabel('Technician').selectOption({ label: `technician ${shop.name.split(' ').pop()}` });
		await desk.getByRole('button', { name: 'Open the job' }).click();
		await desk.waitForURL(/\/jobs\/[0-9a-f-]{36}$/);
		const jobUrl = desk.url();
		expect(await desk.getByRole('heading', { level: 1 }).textContent()).toMatch(/Job #\d+/);
		expect(deskProblems).toEqual([]);

		const bench = await (await openBrowser(PHONE)).newPage();
		const benchProblems = watchConsole(bench);
		await signIn(bench, shop.staff.technician);
		await bench.goto(jobUrl);
		await bench.getByRole('button', { name: 'Start diagnosis' }).click();
		await bench.getByText('Status updated.').waitFor();
		await bench.getByLabel('Spec sheet').selectOption({ label: '5 kW-class portable, brush-type alternator' });
		await bench.getByText('Before measuring on a running unit').waitFor();
		await bench.getByLabel('Stator main winding 1 resistance in Ω').fill('0.41');
		await bench.getByLabel('Stator main winding 1 resistance in Ω').press('Enter');
		await bench.getByRole('cell', { name: '0.41 Ω' }).waitFor();
		// Saved: the box is empty for the next reading, the value shows beside it as the last one.
		await expect(bench.getByLabel('Stator main winding 1 resistance in Ω').inputValue()).resolves.toBe('');
		// A value that is not a number is refused beside its own line, and stays there to correct.
		await bench.getByLabel('Stator main winding 1 resistance in Ω').fill('0.4.1');
		await bench.getByLabel('Stator main winding 1 resistance in Ω').press('Enter');
		await bench.getByRole('listitem').filter({ hasText: 'Stator main winding 1 resistance' }).getByRole('alert').waitFor();
		await expect(bench.getByLabel('Stator main winding 1 resistance in Ω').inputValue()).resolves.toBe('0.4.1');
		await bench.getByLabel('Stator main winding 1 resistance in Ω').fill('');
		await bench.getByLabel('Rotor field resistance through brushes and slip rings in Ω').fill('OL');
		await bench.getByLabel('Rotor field resistance through brushes and slip rings in Ω').press('Enter');
		await bench.getByRole('cell', { name: 'OL (over range)' }).waitFor();
		const rows = bench.locator('table tbody tr');
		expect(await rows.count()).toBe(2);
		expect(await rows.nth(0).textContent()).toContain('In spec');
		expect(await rows.nth(1).textContent()).toContain('Open circuit');
		await bench.getByLabel('Failed component').fill('Rotor: open field winding');
		await bench.getByRole('button', { name: 'Save findings' }).click();
		await bench.getByText('Findings saved.').waitFor();
		expect(await bench.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
		expect(benchProblems).toEqual([]);
		expect(await SpecSheet.count({ where: { shopId: shop.id } })).toBe(3);
	});
});
