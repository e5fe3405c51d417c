// A technician prices a failed alternator head on a 5 kW-class portable generator on a phone,
// sees the verdict the engine gives, and sends the quote; on a desktop the options sit side by side.
import fs from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, describe, expect, it } from 'vitest';
import { evaluateRequest } from '../../src/lib/pricing/evaluate';
import { formatFixedMoney } from '../../src/lib/pricing/money';
import { LabourOperation, Part, Quote, QuoteVersion, ReplacementUnit, Shop } from '../../src/lib/server/db/models';
import * as jobs from '../../src/lib/server/jobs';
import * as quotes from '../../src/lib/server/quotes';
import * as settings from '../../src/lib/server/settings';
import { DESKTOP, PHONE, closeBrowsers, openBrowser, screenshotDir, signIn } from '../helpers/browser';
import { BASE_URL } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { actor, createJob } from '../helpers/shopdata';

afterAll(closeBrowsers);

async function generatorJob(shop: ShopFixture) {
	const made = await createJob(shop, { complaint: 'Engine runs, no output at the outlets.' });
	await jobs.transition(actor(shop, 'technician'), made.job.id, 'diagnosing');
	await Part.create({ shopId: shop.id, number: 'HG-AH55', description: 'Alternator head assembly, 5.5 kW', cost: '312.00', specialOrder: true });
	await Part.create({ shopId: shop.id, number: 'HG-BR55', description: 'Brush holder with brushes', cost: '18.75' });
	await LabourOperation.create({ shopId: shop.id, name: 'Replace alternator head (portable)', hours: '2.50' });
	await ReplacementUnit.create({ shopId: shop.id, kind: 'portable', name: 'Harrowgate PG-5500 5.5 kW portable', ratedWatts: 5500, priceNew: '899.00', lifeYears: '10.0', lifeHours: '1500' });
	return made.job;
}


/** Whether the chart's canvas has any pixel painted. */
const canvasDrawn = (page: Page) =>
	page.evaluate(() => {
		const canvas = document.querySelector('canvas');
		if (!canvas || canvas.width === 0 || canvas.height === 0) return false;
		const pixels = canvas.getContext('2d')!.getImageData(0, 0, canvas.width, canvas.height).data;
		for (let i = 3; i < pixels.length; i += 4) if (pixels[i] !== 0) return true;
		return false;
	});

describe('the quote builder in the browser', () => {
	it('a technician on a phone prices the alternator head, sees the verdict and sends the quote', async () => {
		const shop = await createShop('Builder phone');
		const job = await generatorJob(shop);
		const page = await (await openBrowser(PHONE)).newPage();
		const policyViolations: string[] = [];
		page.on('console', (m) => {
			if (/content security policy/i.test(m.text())) policyViolations.push(m.text());
		});
		await signIn(page, shop.staff.technician);

		await page.goto(`${BASE_URL}/jobs/${job.id}`);
		await page.getByRole('link', { name: 'Build the estimate' }).click();
		await page.waitForURL(`**/jobs/${job.id}/quote`);
		await page.getByRole('heading', { name: `Estimate for job #${job.number}` }).waitFor();

		await page.getByLabel('Worth as it is (failed)').fill('60.00');
		const repair = page.locator('article[data-option-kind="repair"]');
		await repair.getByLabel('Find a catalog part').fill('alternator head');
		await expect(repair.getByLabel('Catalog part', { exact: true }).inputValue()).resolves.not.toBe('');
		await repair.getByRole('button', { name: 'Add catalog part' }).click();
		await repair.getByLabel('Labour operation').selectOption({ label: 'Replace alternator head (portable) · 2.50 h' });
		await repair.getByRole('button', { name: 'Add labour' }).click();
		await expect(repair.locator('[data-line-kind="part"]').count()).resolves.toBe(1);
		await expect(repair.locator('[data-line-kind="labour"]').count()).resolves.toBe(1);

		await page.getByRole('button', { name: 'Add a replacement' }).click();
		const replacement = page.locator('article[data-option-kind="replacement"]');
		await replacement.getByLabel('Unit from the replacement catalog').selectOption({ label: 'Harrowgate PG-5500 5.5 kW portable · $899.00' });
		await replacement.getByRole('button', { name: /Use this unit/ }).click();
		await expect(replacement.getByLabel('Price', { exact: true }).inputValue()).resolves.toBe('899.00');
		await expect(replacement.getByLabel('New unit life, engine hours').inputValue()).resolves.toBe('1500');

		// The live verdict appears once the engine has answered for these figures.
		const breakEven = page.getByTestId('break-even');
		await breakEven.waitFor();
		await page.getByText('Unsaved changes').waitFor();
		await page.getByRole('button', { name: 'Save' }).click();
		await page.getByText(/^Saved at/).waitFor();

		// What the page shows is what the engine gives for the saved draft.
		const quote = (await Quote.findOne({ where: { jobId: job.id } }))!;
		const draft = quote.draft as { options: { lines: { kind: string; unitCost?: string }[] }[] };
		expect(draft.options[0].lines.map((l) => l.kind)).toEqual(['part', 'labour']);
		expect(draft.options[0].lines[0].unitCost).toBe('312.00');
		const engine = evaluateRequest({ currency: 'USD', diagnosticFee: '89.00', ...quote.draft }, await settings.pricingOverrides(shop.id));
		expect(engine.ok).toBe(true);
		if (!engine.ok) return;
		const assessment = engine.result.repairs[0];
		await page.waitForFunction(
			(text) => document.querySelector('[data-testid="break-even"]')?.textContent?.includes(text) ?? false,
			`A repair is worth up to ${formatFixedMoney(assessment.comparison!.breakEvenRepair, 'USD')}`
		);
		const verdictWords = { repair: 'Repair it', replace: 'Replace it', 'close-call': 'A close call', 'no-comparison': 'No comparison yet' } as const;
		await page.getByRole('heading', { name: `Verdict: ${verdictWords[engine.result.recommendation.verdict]}` }).waitFor();
		await expect(page.getByText(engine.result.recommendation.reasons[0]).count()).resolves.toBe(1);
		await expect(repair.getByTestId('option-total').textContent()).resolves.toBe(formatFixedMoney(engine.result.options[0].total, 'USD'));
		// The engine's figures: 312.00 × 1.50 (tier up to 500) = 468.00; 2.5 h × 95.00 = 237.50; supplies 5% = 11.88; less the 89.00 fee.
		expect(engine.result.options[0].total).toBe('628.38');
		// The lines the engine adds are listed with the totals, so the card adds up on screen.
		await expect(repair.getByText('Shop supplies', { exact: true }).count()).resolves.toBe(1);
		await expect(repair.getByText('Diagnostic fee credited', { exact: true }).count()).resolves.toBe(1);

		await page.waitForFunction(() => !!document.querySelector('canvas'));
		await expect(canvasDrawn(page)).resolves.toBe(true);
		expect(await page.locator('canvas').getAttribute('aria-label')).toMatch(/^Cumulative cost over \d+ years/);
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
		fs.mkdirSync(screenshotDir, { recursive: true });
		await page.screenshot({ path: path.join(screenshotDir, 'quote-builder-phone.png'), fullPage: true });

		await page.getByRole('button', { name: 'Send to the customer…' }).click();
		await page.getByRole('button', { name: 'Send version 1' }).click();
		await page.getByRole('heading', { name: 'Sent as version 1' }).waitFor();
		// The confirmation, far below the button on a phone, is brought into view and focused.
		await page.waitForFunction(() => {
			const box = document.activeElement;
			if (box?.getAttribute('aria-labelledby') !== 'sent-heading') return false;
			const { top } = box.getBoundingClientRect();
			return top >= 0 && top < window.innerHeight;
		});
		const link = await page.getByLabel('Customer link').inputValue();
		expect(link).toMatch(new RegExp(`^${BASE_URL}/q/[A-Za-z0-9_-]{40,}$`));
		expect(await QuoteVersion.count({ where: { quoteId: quote.id } })).toBe(1);
		await page.getByText('Version 1', { exact: false }).first().waitFor();
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
		expect(policyViolations).toEqual([]);
	});

	it('on a desktop the options sit side by side, and a bad figure is named beside its field', async () => {
		const shop = await createShop('Builder desktop');
		const job = await generatorJob(shop);
		const page = await (await openBrowser(DESKTOP)).newPage();
		await signIn(page, shop.staff.writer);
		await page.goto(`${BASE_URL}/jobs/${job.id}/quote`);
		await page.getByRole('button', { name: 'Add a replacement' }).click();
		const cards = page.locator('article[data-option-kind]');
		await expect(cards.count()).resolves.toBe(3);
		const tops = await cards.evaluateAll((els) => els.map((el) => Math.round(el.getBoundingClientRect().top)));
		expect(new Set(tops).size).toBe(1);

		const repair = page.locator('article[data-option-kind="repair"]');
		await repair.getByRole('button', { name: '+ Typed part' }).click();
		await repair.getByLabel('Unit cost').fill('12,50');
		const error = repair.locator('#f-options-0-lines-0-unitCost-error');
		await error.waitFor();
		await expect(error.textContent()).resolves.toMatch(/unit cost/i);
		await expect(repair.getByLabel('Unit cost').getAttribute('aria-invalid')).resolves.toBe('true');
		await repair.getByLabel('Unit cost').fill('12.50');
		await error.waitFor({ state: 'detached' });
		await page.getByTestId('break-even').waitFor();
		await page.getByRole('button', { name: 'Save' }).click();
		await page.getByText(/^Saved at/).waitFor();

		// A staged diagnosis: two stages with likelihoods, an expected cost and a not-to-exceed.
		await repair.getByRole('button', { name: 'Stage the diagnosis' }).click();
		await expect(repair.getByLabel('Likelihood %').first().inputValue()).resolves.toBe('60');
		await repair.getByText('Expected cost', { exact: true }).waitFor();
		await repair.getByText('Not to exceed', { exact: true }).waitFor();
		await page.getByRole('button', { name: 'Save' }).click();
		await page.getByText(/^Saved at/).waitFor();
		const stagedDraft = (await Quote.findOne({ where: { jobId: job.id } }))!.draft as { options: { stages?: { likelihood: string }[] }[] };
		expect(stagedDraft.options[0].stages?.map((stage) => stage.likelihood)).toEqual(['0.6', '0.4']);
		await page.screenshot({ path: path.join(screenshotDir, 'quote-builder-desktop.png'), fullPage: true });

		// Someone else saves meanwhile: this page's save is refused, its edits stay on screen until "reload theirs".
		const stored = (await Quote.findOne({ where: { jobId: job.id } }))!;
		const theirs = structuredClone(stored.draft) as { options: { label: string }[] };
		theirs.options[0].label = 'Repair as the manager priced it';
		await quotes.saveDraft(actor(shop, 'manager'), job.id, theirs, stored.lockVersion);
		const name = page.getByLabel('Name of option 1');
		await name.fill('My rebuild');
		await page.getByRole('button', { name: 'Save' }).click();
		await page.getByRole('alert').filter({ hasText: 'Someone else saved this estimate' }).waitFor();
		await expect(name.inputValue()).resolves.toBe('My rebuild');
		expect(((await Quote.findOne({ where: { jobId: job.id } }))!.draft as { options: { label: string }[] }).options[0].label).toBe('Repair as the manager priced it');
		await page.getByRole('button', { name: 'Reload theirs (drops my changes)' }).click();
		await page.waitForFunction(() => (document.getElementById('f-options-0-label') as HTMLInputElement | null)?.value === 'Repair as the manager priced it');
		await page.getByText('All changes saved').or(page.getByText('Showing the latest saved estimate.')).first().waitFor();
	});

	it('where technicians may not see costs, the builder prices parts by their sell price and shows no cost or margin', async () => {
		const shop = await createShop('Builder no costs');
		const row = (await Shop.findByPk(shop.id))!;
		row.set({ settings: { techniciansSeeCosts: false } });
		await row.save();
		const job = await generatorJob(shop);
		const page = await (await openBrowser(PHONE)).newPage();
		await signIn(page, shop.staff.technician);
		await page.goto(`${BASE_URL}/jobs/${job.id}/quote`);
		const repair = page.locator('article[data-option-kind="repair"]');
		await repair.getByLabel('Find a catalog part').fill('HG-AH55');
		await repair.getByRole('button', { name: 'Add catalog part' }).click();
		// 312.00 × 1.50 (default tier up to 500) = 468.00 each.
		await expect(repair.getByLabel('Price each', { exact: true }).inputValue()).resolves.toBe('468.00');
		await expect(repair.getByLabel('Unit cost').count()).resolves.toBe(0);
		// 468.00 less the 89.00 diagnostic fee credited; no labour, so no shop supplies.
		await page.waitForFunction(() => document.querySelector('article[data-option-kind="repair"] [data-testid="option-total"]')?.textContent === '$379.00');
		await page.getByRole('heading', { name: 'Verdict: No comparison yet' }).waitFor();
		await expect(page.getByText('Our cost').count()).resolves.toBe(0);
		await expect(page.getByText('Margin', { exact: true }).count()).resolves.toBe(0);
		await expect(page.getByText(/margin \d/i).count()).resolves.toBe(0);
		await page.getByText('The shop keeps part costs and margins from technicians', { exact: false }).waitFor();
		expect(await page.content()).not.toContain('312.00');
		await page.getByRole('button', { name: 'Save' }).click();
		await page.getByText(/^Saved at/).waitFor();
		const line = ((await Quote.findOne({ where: { jobId: job.id } }))!.draft as { options: { lines: Record<string, unknown>[] }[] }).options[0].lines[0];
		expect(line.unitCost).toBe('312.00');
		expect(line.unitPrice).toBeUndefined();
	});
});
