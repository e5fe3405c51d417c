// A manager at phone width imports a parts file: a bad row is named by its line, a fixed file goes in.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { Part } from '../../src/lib/server/db/models';
import { seedDemoCatalog } from '../../src/lib/server/demo-catalog';
import { BASE_URL } from '../helpers/client';
import { PHONE, closeBrowsers, openBrowser, screenshotDir, signIn } from '../helpers/browser';
import { createShop } from '../helpers/fixtures';

afterAll(closeBrowsers);

describe('the catalog on a phone', () => {
	it('imports a CSV file through the form and reports a bad row by its line', async () => {
		const shop = await createShop('Phone catalog');
		await seedDemoCatalog(shop.id);
		const page = await (await openBrowser(PHONE)).newPage();
		await signIn(page, shop.staff.manager);

		await page.goto(`${BASE_URL}/catalog`);
		await expect(page.getByRole('link', { name: 'Edit MPC-AH5500' }).isVisible()).resolves.toBe(true);
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
		fs.mkdirSync(screenshotDir, { recursive: true });
		await page.screenshot({ path: path.join(screenshotDir, 'catalog-phone.png'), fullPage: true });

		const parts = page.locator('section#parts');
		await parts.getByText('Import from a CSV file').click();
		const file = parts.getByLabel('CSV file');
		await file.setInputFiles({
			name: 'parts.csv',
			mimeType: 'text/csv',
			buffer: Buffer.from('number,description,cost\nPH-1,Fuel cap,4.20\nPH-2,Choke cable,twelve\n')
		});
		await parts.getByRole('button', { name: 'Import parts' }).click();
		const alert = parts.getByRole('alert');
		await expect(alert.textContent()).resolves.toContain('Line 3, column “cost”');
		expect(await Part.count({ where: { shopId: shop.id, number: 'PH-1' } })).toBe(0);

		await file.setInputFiles({
			name: 'parts.csv',
			mimeType: 'text/csv',
			buffer: Buffer.from('number,description,cost\nPH-1,Fuel cap,4.20\nPH-2,Choke cable,12.00\n')
		});
		await parts.getByRole('button', { name: 'Import parts' }).click();
		await expect(parts.getByRole('status').textContent()).resolves.toContain('2 added, 0 updated, 0 unchanged');
		await expect(parts.getByRole('link', { name: 'Edit PH-2' }).isVisible()).resolves.toBe(true);
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);

		await page.goto(`${BASE_URL}/settings`);
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
		await page.screenshot({ path: path.join(screenshotDir, 'settings-phone.png'), fullPage: true });
	});
});
