// The manager reviews margin charts: every report draws with data beside its table, a new date
// range redraws them, and the rows behind a chart download as CSV. Also checked at phone width.
import fs from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { Decimal } from 'decimal.js';
import type { Page } from 'playwright-core';
import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { seedDemoHistory } from '../../src/lib/server/demo-history';
import { BASE_URL } from '../helpers/client';
import { DESKTOP, PHONE, closeBrowsers, openBrowser, screenshotDir, signIn } from '../helpers/browser';
import { createShop, type ShopFixture } from '../helpers/fixtures';

const REPORTS = ['revenue', 'margin', 'approval', 'outcomes', 'outcomes-by-kind', 'days-to-approval', 'technicians', 'margin-lost'];

let shop: ShopFixture;

beforeAll(async () => {
	shop = await createShop('Report charts');
	const added = await seedDemoHistory(shop.id, { technicians: [shop.staff.technician.id, shop.staff.manager.id], writer: shop.staff.writer.id });
	expect(added).toBeGreaterThan(300);
});

it('the demo history has nothing after the present: no job opened, moved, sent, answered or worked on later than now', async () => {
	const [late] = await db().query<Record<string, number>>(
		`SELECT (SELECT count(*) FROM jobs WHERE shop_id = :shop AND (created_at > now() OR status_changed_at > now() OR updated_at > now()))::int AS jobs,
		        (SELECT count(*) FROM audit_events WHERE shop_id = :shop AND created_at > now())::int AS events,
		        (SELECT count(*) FROM quote_versions WHERE shop_id = :shop AND sent_at > now())::int AS versions,
		        (SELECT count(*) FROM approvals WHERE shop_id = :shop AND created_at > now())::int AS answers,
		        (SELECT count(*) FROM job_labour WHERE shop_id = :shop AND created_at > now())::int AS labour`,
		{ replacements: { shop: shop.id }, type: QueryTypes.SELECT }
	);
	expect(late).toEqual({ jobs: 0, events: 0, versions: 0, answers: 0, labour: 0 });
});
afterAll(closeBrowsers);


/** Waits until every chart is drawn, and returns how many canvas pixels each one painted. */
async function drawnCharts(page: Page) {
	for (const name of REPORTS) await page.locator(`[data-chart="${name}"][data-drawn="yes"]`).waitFor({ timeout: 30_000 });
	return page.evaluate((names) =>
		Object.fromEntries(
			names.map((name) => {
				const canvas = document.querySelector<HTMLCanvasElement>(`[data-chart="${name}"] canvas`)!;
				const { data } = canvas.getContext('2d')!.getImageData(0, 0, canvas.width, canvas.height);
				let painted = 0;
				for (let i = 3; i < data.length; i += 4) if (data[i] > 0) painted++;
				return [name, painted];
			})
		), REPORTS);
}

describe('the reports page', () => {
	it('draws every chart with its table, redraws for a new date range, and downloads the rows as CSV', async () => {
		const context = await openBrowser(DESKTOP);
		const page = await context.newPage();
		await signIn(page, shop.staff.manager);
		await page.getByRole('link', { name: 'Reports' }).click();
		await page.waitForURL('**/reports');
		expect(await page.getByRole('heading', { level: 1 }).textContent()).toBe('Reports');

		const painted = await drawnCharts(page);
		for (const name of REPORTS) {
			expect(painted[name], `${name} chart painted`).toBeGreaterThan(2000);
			const table = page.locator(`[data-report-table="${name}"]`);
			expect(await table.locator('tbody tr').count(), `${name} table rows`).toBeGreaterThan(0);
			expect(await table.locator('tbody').textContent()).not.toContain('Nothing in this period');
		}
		// The twelve-month default shows twelve months; figures read as money.
		const marginRows = page.locator('[data-report-table="margin"] tbody tr');
		expect(await marginRows.count()).toBe(12);
		expect(await page.locator('[data-report-table="margin"] tfoot').textContent()).toMatch(/\$\d[\d,]*\.\d\d/);
		fs.mkdirSync(screenshotDir, { recursive: true });
		await page.screenshot({ path: path.join(screenshotDir, 'reports-desktop.png'), fullPage: true });

		// Three months instead: every table follows.
		const to = new Date();
		const from = new Date(Date.UTC(to.getUTCFullYear(), to.getUTCMonth() - 2, 1));
		await page.getByLabel('From', { exact: true }).fill(from.toISOString().slice(0, 10));
		await page.getByLabel('To', { exact: true }).fill(to.toISOString().slice(0, 10));
		await page.getByRole('button', { name: 'Show' }).click();
		await page.waitForURL(`**/reports?from=${from.toISOString().slice(0, 10)}*`);
		await page.waitForFunction(() => document.querySelectorAll('[data-report-table="margin"] tbody tr').length === 3);
		await drawnCharts(page);
		expect(await page.locator('[data-report-table="revenue"] tbody tr').count()).toBe(3);

		// The CSV behind the margin chart adds up to the gross profit in its table's total row.
		const marginCard = page.locator('section[data-report="margin"]');
		const [download] = await Promise.all([page.waitForEvent('download'), marginCard.getByRole('link', { name: /Download CSV/ }).click()]);
		expect(download.suggestedFilename()).toBe(`margin-${from.toISOString().slice(0, 10)}-to-${to.toISOString().slice(0, 10)}.csv`);
		const file = await download.path();
		const rows = parse(fs.readFileSync(file!, 'utf8'), { columns: true, bom: true }) as Record<string, string>[];
		expect(rows.length).toBeGreaterThan(10);
		const total = rows.reduce((sum, row) => sum.plus(row['Gross profit']), new Decimal(0));
		const shownTotal = (await marginCard.locator('tfoot td').nth(3).textContent())!.replace(/[$,\s]/g, '');
		expect(total.toFixed(2)).toBe(shownTotal);
		await context.close();
	});

	it('fits a phone: the charts draw and nothing overflows the width', async () => {
		const page = await (await openBrowser(PHONE)).newPage();
		await signIn(page, shop.staff.manager);
		await page.goto(`${BASE_URL}/reports`);
		const painted = await drawnCharts(page);
		expect(Object.values(painted).every((n) => n > 500)).toBe(true);
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
		await page.screenshot({ path: path.join(screenshotDir, 'reports-phone.png'), fullPage: true });
	});
});
