// The three stories end to end, as the people in a new shop would live them, in one browser run:
// the owner sets the shop up; the writer checks in a 5 kW-class portable that runs but gives no
// output; the technician measures and prices on a phone and reads the verdict; the writer sends
// the estimate; the customer approves on a phone (by keyboard alone) and pays the deposit; the
// technician records the hours; the writer takes the balance; the manager finds the job in the
// reports. Every distinct page is checked with axe, and every step leaves a screenshot in
// .data/screenshots/story (MENDWISE_GUIDE_IMAGES=1 also refreshes docs/images for the user guide).
import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, describe, expect, it } from 'vitest';
import { evaluateRequest } from '../../src/lib/pricing/evaluate';
import { formatFixedMoney } from '../../src/lib/pricing/money';
import { db } from '../../src/lib/server/db/index';
import { Job, LabourOperation, Part, Quote, QuoteVersion, ReplacementUnit, User } from '../../src/lib/server/db/models';
import { Payment } from '../../src/lib/server/db/payment-models';
import * as settings from '../../src/lib/server/settings';
import { AxeAudit } from '../helpers/axe';
import { DESKTOP, PHONE, closeBrowsers, openBrowser, screenshotDir } from '../helpers/browser';
import { BASE_URL } from '../helpers/client';
import { uniqueEmail } from '../helpers/fixtures';
import { linkIn, waitForMessage } from '../helpers/mailbox';
import { SUCCEEDS, fakeUrl, until } from '../helpers/payments';

afterAll(closeBrowsers);
db();

const SHOTS = path.join(screenshotDir, 'story');
const GUIDE_IMAGES = path.resolve(import.meta.dirname, '..', '..', 'docs', 'images');
fs.rmSync(SHOTS, { recursive: true, force: true });
fs.mkdirSync(path.join(SHOTS, 'guide'), { recursive: true });

/** Each step drives several pages and runs axe on them; a busy machine needs the room. */
const STEP_TIMEOUT = 300_000;

const audit = new AxeAudit();
const audited = new Set<string>();
let shotNumber = 0;

/** What the story carries from one step to the next. */
const story = {
	shopName: 'Kettlewell Generator & Engine',
	owner: { name: 'Marit Okonjo', email: uniqueEmail('owner'), password: 'owner-password-kettlewell' },
	technician: { name: 'Caddo Frey', email: uniqueEmail('tech'), password: 'tech-password-kettlewell' },
	writer: { name: 'Ines Varga', email: uniqueEmail('writer'), password: 'writer-password-kettlewell' },
	customer: { name: 'Tamsin Yarrow', email: uniqueEmail('customer'), phone: '555-0142' },
	shopId: '',
	jobId: '',
	jobNumber: 0,
	customerLink: '',
	repairLabel: 'Fit a new alternator head',
	pages: {} as Record<'owner' | 'technician' | 'writer' | 'customer', Page>
};

/** A screenshot of the step; the first visit to each named page or state is also checked with axe. */
async function step(page: Page, name: string, options: { axe?: string } = {}) {
	await page.waitForLoadState('networkidle');
	shotNumber++;
	const file = path.join(SHOTS, `${String(shotNumber).padStart(2, '0')}-${name}.png`);
	await page.screenshot({ path: file, fullPage: true });
	const key = options.axe ?? name;
	if (!audited.has(key)) {
		audited.add(key);
		await audit.check(page, key);
	}
	const width = page.viewportSize()?.width ?? DESKTOP.width;
	expect(await page.evaluate(() => document.documentElement.scrollWidth), `${name} fits ${width} px`).toBeLessThanOrEqual(width);
}

/** A compressed image for the user guide: the viewport, one element, or a region of the viewport. */
async function guideImage(page: Page, file: string, what?: ReturnType<Page['locator']> | { x: number; y: number; width: number; height: number }) {
	const target = path.join(SHOTS, 'guide', file);
	const options = { path: target, type: 'jpeg' as const, quality: 70 };
	// A picture of one part leaves out the bar that sticks to the bottom of the screen.
	const unstick = '.sticky { position: static !important; }';
	if (what && 'screenshot' in what) await what.screenshot({ ...options, style: unstick });
	else if (what) await page.screenshot({ ...options, clip: what, style: unstick });
	else await page.screenshot(options);
	if (process.env.MENDWISE_GUIDE_IMAGES === '1') {
		fs.mkdirSync(GUIDE_IMAGES, { recursive: true });
		fs.copyFileSync(target, path.join(GUIDE_IMAGES, file));
	}
}

/** Errors each page's console reported; a step ends by expecting none. */
const consoleProblems = new WeakMap<Page, string[]>();

async function newPage(viewport: { width: number; height: number }): Promise<Page> {
	const context: BrowserContext = await openBrowser(viewport);
	const page = await context.newPage();
	const problems: string[] = [];
	consoleProblems.set(page, problems);
	page.on('console', (m) => {
		// The local payment fake's page has no icon; that 404 is not the shop's.
		if (m.type() === 'error' && !m.location().url.endsWith('/favicon.ico')) problems.push(`${m.text()} (${m.location().url})`);
	});
	page.on('pageerror', (e) => problems.push(e.message));
	return page;
}
const problemsOf = (page: Page) => consoleProblems.get(page) ?? [];

/** Presses Tab until the focused element matches `selector`; fails after `max` presses. */
async function tabTo(page: Page, selector: string, max = 80): Promise<number> {
	for (let presses = 1; presses <= max; presses++) {
		await page.keyboard.press('Tab');
		if (await page.evaluate((s) => document.activeElement?.matches(s) ?? false, selector)) return presses;
	}
	throw new Error(`Tab never reached ${selector}`);
}

const focusedIsVisible = (page: Page) =>
	page.evaluate(() => {
		const el = document.activeElement as HTMLElement | null;
		if (!el) return false;
		const style = getComputedStyle(el);
		const rect = el.getBoundingClientRect();
		const ring = style.outlineStyle !== 'none' && style.outlineWidth !== '0px';
		return rect.width > 0 && rect.height > 0 && (ring || style.boxShadow !== 'none');
	});

/** A bench photo of our own making: the rotor's slip rings with the brush holder lifted off. */
async function benchPhoto(): Promise<Buffer> {
	const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="1200" height="900">
		<rect width="1200" height="900" fill="#3b3f45"/>
		<rect x="80" y="360" width="1040" height="180" rx="30" fill="#8a8f96"/>
		<rect x="260" y="300" width="420" height="300" rx="24" fill="#a64b24"/>
		<g stroke="#7a3518" stroke-width="6">${Array.from({ length: 14 }, (_, i) => `<line x1="${280 + i * 28}" y1="305" x2="${280 + i * 28}" y2="595"/>`).join('')}</g>
		<rect x="760" y="380" width="60" height="140" rx="8" fill="#c9a15a"/>
		<rect x="850" y="380" width="60" height="140" rx="8" fill="#c9a15a"/>
		<rect x="950" y="200" width="120" height="90" rx="10" fill="#1d1f22" stroke="#555" stroke-width="4"/>
	</svg>`;
	return sharp(Buffer.from(svg)).jpeg({ quality: 80 }).toBuffer();
}

describe('the three stories, end to end in a new shop', () => {
	it('the owner signs up, sets the labour rate and markup tiers, stocks the catalog and invites the team', async () => {
		const owner = (story.pages.owner = await newPage(DESKTOP));
		await owner.goto(`${BASE_URL}/signup`);
		await step(owner, 'signup', { axe: 'sign-up' });
		await owner.getByLabel('Shop name').fill(story.shopName);
		await owner.getByLabel('Your name').fill(story.owner.name);
		await owner.getByLabel('E-mail').fill(story.owner.email);
		await owner.getByLabel(/^Password/).fill(story.owner.password);
		await owner.getByRole('button', { name: 'Create shop' }).click();
		await owner.waitForURL('**/home');
		await step(owner, 'today', { axe: 'today (owner)' });
		const ownerRow = (await User.findOne({ where: { email: story.owner.email } }))!;
		story.shopId = ownerRow.shopId;

		// The labour rate, the labour cost and three markup tiers.
		await owner.getByRole('link', { name: 'Settings' }).click();
		await owner.waitForURL('**/settings');
		await owner.getByLabel('Labour rate per hour').fill('92.00');
		await owner.getByLabel('Labour cost per hour').fill('38.00');
		const tiers = [
			['50.00', '2.00'],
			['250.00', '1.60'],
			['', '1.35']
		];
		const rows = owner.locator('section[aria-labelledby="tiers-title"] tbody tr');
		while ((await rows.count()) < tiers.length) await owner.getByRole('button', { name: 'Add a tier' }).click();
		while ((await rows.count()) > tiers.length) await owner.getByRole('button', { name: `Remove tier ${await rows.count()}` }).click();
		for (const [i, [upTo, multiplier]] of tiers.entries()) {
			await owner.getByLabel(`Tier ${i + 1}: unit cost up to`).fill(upTo);
			await owner.getByLabel(`Tier ${i + 1}: multiplier`).fill(multiplier);
		}
		await owner.getByRole('button', { name: 'Save settings' }).click();
		await owner.getByText('Settings saved. New estimates use them from now on.').waitFor();
		await step(owner, 'settings');
		await guideImage(owner, 'settings-markup.jpg', owner.locator('section[aria-labelledby="tiers-title"]'));
		const pricing = (await settings.get(story.shopId)).pricing;
		expect(pricing.labourRate.toFixed(2)).toBe('92.00');
		expect(pricing.markupTiers.map((t) => [t.upTo?.toFixed(2) ?? null, t.multiplier.toFixed(2)])).toEqual([
			['50.00', '2.00'],
			['250.00', '1.60'],
			[null, '1.35']
		]);

		// The catalog, typed in by hand: the part, the flat-rate job and a comparable new unit.
		await owner.getByRole('link', { name: 'Catalog' }).click();
		await owner.waitForURL('**/catalog');
		const parts = owner.locator('section#parts');
		await parts.getByText('Add a part').click();
		await parts.getByLabel('Part number').fill('HG-AH55');
		await parts.getByLabel('Description').fill('Alternator head assembly, 5.5 kW (stator, rotor, brushes)');
		await parts.getByLabel('Cost (what the shop pays)').fill('214.00');
		await parts.getByLabel('Supplier').fill('Dunmore Power Parts');
		await parts.getByLabel('In stock').fill('0');
		await parts.getByRole('checkbox', { name: /Special order/ }).check();
		await parts.getByRole('button', { name: 'Add to parts' }).click();
		await parts.getByRole('link', { name: 'Edit HG-AH55' }).waitFor();
		const labour = owner.locator('section#labour');
		await labour.getByText('Add a labour operation').click();
		await labour.getByLabel('Operation').fill('Replace alternator head (portable)');
		await labour.getByLabel('Flat-rate hours').fill('2.00');
		await labour.getByRole('button', { name: 'Add to labour operations' }).click();
		await labour.getByRole('link', { name: 'Edit Replace alternator head (portable)' }).waitFor();
		const units = owner.locator('section#replacements');
		await units.getByText('Add a replacement unit').click();
		await units.getByLabel('Unit name').fill('Harrowgate PG-5500 5.5 kW portable');
		await units.getByLabel('Kind').selectOption({ label: 'Portable generator' });
		await units.getByLabel('Rated running watts').fill('5500');
		await units.getByLabel('Price new').fill('1149.00');
		await units.getByLabel('Expected life (years)').fill('10');
		await units.getByLabel('Expected life (engine hours)').fill('1500');
		await units.getByRole('button', { name: 'Add to replacement units' }).click();
		await units.getByRole('link', { name: 'Edit Harrowgate PG-5500 5.5 kW portable' }).waitFor();
		await step(owner, 'catalog');
		expect(await Part.count({ where: { shopId: story.shopId } })).toBe(1);
		expect(await LabourOperation.count({ where: { shopId: story.shopId } })).toBe(1);
		expect(await ReplacementUnit.count({ where: { shopId: story.shopId } })).toBe(1);

		// Two invites; each one arrives in the local mailbox with its link.
		await owner.getByRole('link', { name: 'Team' }).click();
		await owner.waitForURL('**/team');
		for (const [who, role] of [
			[story.technician, 'technician'],
			[story.writer, 'writer']
		] as const) {
			await owner.getByLabel('E-mail').fill(who.email);
			await owner.getByLabel('Role').selectOption(role);
			await owner.getByRole('button', { name: 'Create invite link' }).click();
			await owner.getByText(`We e-mailed the invite to ${who.email}`).waitFor();
		}
		await step(owner, 'team');
		expect(problemsOf(owner)).toEqual([]);
	}, STEP_TIMEOUT);

	it('the technician and the writer join from the invite e-mails', async () => {
		for (const [who, key, viewport] of [
			[story.technician, 'technician', PHONE],
			[story.writer, 'writer', DESKTOP]
		] as const) {
			const mail = await waitForMessage(who.email, { subject: `invited you to join ${story.shopName}` });
			const page = (story.pages[key] = await newPage(viewport));
			await page.goto(linkIn(mail, '/invite/'));
			await page.getByText(who.email).waitFor();
			await step(page, `invite-${key}`, { axe: 'invite' });
			await page.getByLabel('Your name').fill(who.name);
			await page.getByLabel(/password/i).fill(who.password);
			await page.getByRole('button', { name: 'Join the team' }).click();
			await page.waitForURL('**/home');
			expect(await page.getByRole('link', { name: 'Team' }).count()).toBe(0);
		}
		expect(await User.count({ where: { shopId: story.shopId } })).toBe(3);
	}, STEP_TIMEOUT);

	it('the writer checks in a 5 kW-class portable that runs but gives no output', async () => {
		const desk = story.pages.writer;
		await desk.getByRole('link', { name: 'Customers' }).click();
		await desk.waitForURL('**/customers');
		await desk.getByRole('button', { name: 'New customer' }).click();
		await desk.getByLabel('Name').fill(story.customer.name);
		await desk.getByLabel('Phone').fill(story.customer.phone);
		await desk.getByLabel('E-mail').fill(story.customer.email);
		await desk.getByLabel('Address').fill('14 Orchard Lane, Millbrook');
		await step(desk, 'new-customer', { axe: 'customers' });
		await desk.getByRole('button', { name: 'Save customer' }).click();
		await desk.waitForURL(/\/customers\/[0-9a-f-]{36}$/);

		await desk.getByRole('button', { name: 'Add a unit' }).click();
		await desk.getByLabel('Kind').selectOption({ label: 'Portable generator' });
		await desk.getByLabel('Maker').fill('Harrowgate');
		await desk.getByLabel('Model').fill('PG-5000');
		await desk.getByLabel('Serial number').fill('HG50-21-04417');
		await desk.getByLabel('Running watts').fill('5000');
		await desk.getByLabel('Starting watts').fill('6250');
		await desk.getByLabel('Engine hours').fill('310');
		await desk.getByLabel('Year bought').fill(String(new Date().getFullYear() - 3));
		await desk.getByLabel('Price paid').fill('899.00');
		await desk.getByLabel('Condition').selectOption({ label: 'Good' });
		await step(desk, 'new-unit', { axe: 'customer' });
		await desk.getByRole('button', { name: 'Save unit' }).click();
		await desk.waitForURL(/\/units\/[0-9a-f-]{36}$/);

		await desk.getByLabel("Customer's complaint").fill('Starts and runs smoothly, but no power at any outlet. Breakers checked by the customer.');
		await desk.getByLabel('Technician').selectOption({ label: story.technician.name });
		await step(desk, 'check-in', { axe: 'unit' });
		await guideImage(desk, 'writer-check-in.jpg');
		await desk.getByRole('button', { name: 'Open the job' }).click();
		await desk.waitForURL(/\/jobs\/[0-9a-f-]{36}$/);
		story.jobId = desk.url().split('/').pop()!;
		const job = (await Job.findOne({ where: { id: story.jobId, shopId: story.shopId } }))!;
		story.jobNumber = job.number;
		expect(job.status).toBe('checked_in');
		await desk.getByRole('heading', { level: 1, name: new RegExp(`Job #${job.number}`) }).waitFor();
		await step(desk, 'job-checked-in', { axe: 'job (writer)' });

		await desk.getByRole('link', { name: 'Check-in ticket' }).click();
		await desk.waitForURL(`**/jobs/${story.jobId}/ticket`);
		await step(desk, 'check-in-ticket', { axe: 'check-in ticket' });
		expect(problemsOf(desk)).toEqual([]);
	}, STEP_TIMEOUT);

	it('the technician on a phone records the readings and a photo, prices the repair against a new unit and sees the verdict', async () => {
		const bench = story.pages.technician;
		await bench.getByRole('link', { name: 'Jobs' }).click();
		await bench.waitForURL('**/jobs');
		await bench.getByRole('link', { name: new RegExp(`${story.jobNumber}`) }).first().waitFor();
		await step(bench, 'job-board-phone', { axe: 'job board (technician, phone)' });
		await bench.goto(`${BASE_URL}/jobs/${story.jobId}`);
		await bench.getByRole('button', { name: 'Start diagnosis' }).click();
		await bench.getByText('Status updated.').waitFor();
		await bench.getByLabel('Spec sheet').selectOption({ label: '5 kW-class portable, brush-type alternator' });
		await bench.getByText('Before measuring on a running unit').waitFor();

		const readings: [string, string, string][] = [
			['Stator main winding 1 resistance', 'Ω', '0.41'],
			['Stator main winding 2 resistance', 'Ω', '0.43'],
			['Exciter winding resistance', 'Ω', '1.2'],
			['Rotor field resistance through brushes and slip rings', 'Ω', 'OL'],
			['Brush length', 'mm', '11']
		];
		for (const [label, unit, value] of readings) {
			const input = bench.getByLabel(`${label} in ${unit}`);
			await input.fill(value);
			await input.press('Enter');
			await bench.getByRole('cell', { name: label, exact: true }).waitFor();
		}
		const table = bench.locator('table tbody tr');
		await expect(table.count()).resolves.toBe(5);
		const results = Object.fromEntries(
			await Promise.all(readings.map(async ([label]) => [label, (await table.filter({ hasText: label }).locator('td').nth(2).textContent())?.replace(/^[^A-Za-z]+/, '')]))
		);
		expect(results).toEqual({
			'Stator main winding 1 resistance': 'In spec',
			'Stator main winding 2 resistance': 'In spec',
			'Exciter winding resistance': 'In spec',
			'Rotor field resistance through brushes and slip rings': 'Open circuit',
			'Brush length': 'In spec'
		});

		await bench.getByLabel('Failed component').fill('Rotor: open field winding');
		await bench.getByLabel("Notes in the technician's words").fill(
			'Stator windings and exciter in spec. No continuity through the brushes and slip rings; brushes good, so the rotor field winding is open. A new alternator head is the fix.'
		);
		await bench.getByRole('button', { name: 'Save findings' }).click();
		await bench.getByText('Findings saved.').waitFor();

		await bench.getByLabel('Choose files').setInputFiles([{ name: 'slip-rings.jpg', mimeType: 'image/jpeg', buffer: await benchPhoto() }]);
		await bench.getByText('1 added.').or(bench.getByText('1 added, 0 not added.')).first().waitFor();
		await bench.getByRole('img', { name: 'Photo 1' }).waitFor();
		await bench.getByRole('textbox', { name: 'Caption for photo 1' }).fill('Slip rings and brush holder; no continuity across the rotor');
		await bench.getByRole('button', { name: 'Save caption for photo 1' }).click();
		await bench.getByText('Caption saved.').waitFor();
		await bench.getByRole('checkbox', { name: 'Show the customer photo 1' }).check();
		await bench.getByText('The customer will see this photo.').waitFor();
		await step(bench, 'bench-readings-phone', { axe: 'job (technician, phone)' });
		// The recorded readings, across the card's full width.
		const card = bench.locator('section[aria-labelledby="bench-heading"]');
		const recorded = card.getByRole('heading', { name: 'Recorded' });
		await recorded.evaluate((el) => el.scrollIntoView({ block: 'start' }));
		await bench.evaluate(() => window.scrollBy(0, -12));
		const [box, top, bottom] = [await card.boundingBox(), await recorded.boundingBox(), await card.locator('table').boundingBox()];
		await guideImage(bench, 'technician-readings-phone.jpg', {
			x: box!.x,
			y: top!.y - 8,
			width: box!.width,
			height: bottom!.y + bottom!.height - top!.y + 16
		});

		// The estimate: a new alternator head against a new unit, at the bench.
		await bench.getByRole('link', { name: 'Build the estimate' }).click();
		await bench.waitForURL(`**/jobs/${story.jobId}/quote`);
		await bench.getByLabel('Worth as it is (failed)').fill('120.00');
		const repair = bench.locator('article[data-option-kind="repair"]');
		await repair.getByLabel(/^Name of option/).fill(story.repairLabel);
		await repair.getByLabel('Find a catalog part').fill('alternator head');
		await repair.getByRole('button', { name: 'Add catalog part' }).click();
		await repair.getByLabel('Labour operation').selectOption({ label: 'Replace alternator head (portable) · 2.00 h' });
		await repair.getByRole('button', { name: 'Add labour' }).click();
		await bench.getByRole('button', { name: 'Add a replacement' }).click();
		const replacement = bench.locator('article[data-option-kind="replacement"]');
		await replacement.getByLabel('Unit from the replacement catalog').selectOption({ label: 'Harrowgate PG-5500 5.5 kW portable · $1,149.00' });
		await replacement.getByRole('button', { name: /Use this unit/ }).click();
		await bench.getByTestId('break-even').waitFor();
		await bench.getByRole('button', { name: 'Save' }).click();
		await bench.getByText(/^Saved at/).waitFor();

		// The verdict on the page is the engine's for the saved draft.
		const quote = (await Quote.findOne({ where: { jobId: story.jobId, shopId: story.shopId } }))!;
		const job = (await Job.findByPk(story.jobId))!;
		const engine = evaluateRequest(
			{ currency: 'USD', diagnosticFee: String(job.diagnosticFee), ...quote.draft },
			await settings.pricingOverrides(story.shopId)
		);
		expect(engine.ok).toBe(true);
		if (!engine.ok) return;
		// 214.00 falls in the tier up to 250.00: × 1.60 = 342.40; 2.00 h × 92.00 = 184.00 (set in the first step).
		const repairLines = engine.result.options[0].lines;
		expect(repairLines.filter((l) => l.inputIndex !== null).map((l) => l.sell)).toEqual(['342.40', '184.00']);
		const verdictWords = { repair: 'Repair it', replace: 'Replace it', 'close-call': 'A close call', 'no-comparison': 'No comparison yet' } as const;
		await bench.getByRole('heading', { name: `Verdict: ${verdictWords[engine.result.recommendation.verdict]}` }).waitFor();
		await expect(repair.getByTestId('option-total').textContent()).resolves.toBe(formatFixedMoney(engine.result.options[0].total, 'USD'));
		const comparison = engine.result.repairs[0].comparison!;
		await bench.waitForFunction(
			(text) => document.querySelector('[data-testid="break-even"]')?.textContent?.includes(text) ?? false,
			`A repair is worth up to ${formatFixedMoney(comparison.breakEvenRepair, 'USD')}`
		);
		await step(bench, 'estimate-phone', { axe: 'estimate builder (technician, phone)' });
		await guideImage(bench, 'technician-verdict-phone.jpg', bench.locator('section[aria-labelledby="verdict-heading"]'));
		await bench.locator('article[data-option-kind="repair"]').scrollIntoViewIfNeeded();
		await guideImage(bench, 'technician-repair-option-phone.jpg', repair);
		expect(problemsOf(bench)).toEqual([]);
	}, STEP_TIMEOUT);

	it('the writer sends the estimate, and it reaches the customer by e-mail', async () => {
		const desk = story.pages.writer;
		await desk.goto(`${BASE_URL}/jobs/${story.jobId}/quote`);
		await desk.getByTestId('break-even').waitFor();
		await step(desk, 'estimate-desktop', { axe: 'estimate builder (writer, desktop)' });
		await guideImage(desk, 'writer-estimate-desktop.jpg');
		await desk.getByRole('button', { name: 'Send to the customer…' }).click();
		await desk.getByRole('button', { name: 'Send version 1' }).click();
		await desk.getByRole('heading', { name: 'Sent as version 1' }).waitFor();
		await step(desk, 'estimate-sent', { axe: 'estimate sent' });
		await desk.getByText('The estimate and its PDF are on their way to the customer by e-mail.').waitFor();
		const shown = await desk.getByLabel('Customer link').inputValue();
		const mail = await waitForMessage(story.customer.email, { subject: `Your estimate for job #${story.jobNumber}`, timeoutMs: 30_000 });
		story.customerLink = linkIn(mail, '/q/');
		expect(new URL(story.customerLink).pathname).toMatch(/^\/q\/[A-Za-z0-9_-]{40,}$/);
		// The e-mail carries the very link the page shows for a text message.
		expect(story.customerLink).toBe(shown);
		expect(mail.attachments.map((a) => a.filename)).toEqual([`estimate-${story.jobNumber}-v1.pdf`]);
		expect((await Job.findByPk(story.jobId))!.status).toBe('quoted');
	}, STEP_TIMEOUT);

	it('the customer compares on a phone, approves the repair by keyboard alone and pays the deposit with the test card', async () => {
		const phone = (story.pages.customer = await newPage(PHONE));
		await phone.goto(story.customerLink);
		await phone.getByRole('heading', { name: /Estimate for your/ }).waitFor();
		await step(phone, 'customer-estimate', { axe: 'customer estimate' });
		await guideImage(phone, 'customer-estimate-phone.jpg');
		await phone.getByRole('heading', { name: 'Your options' }).scrollIntoViewIfNeeded();
		await guideImage(phone, 'customer-options-phone.jpg');

		const version = (await QuoteVersion.findOne({ where: { shopId: story.shopId } }))!;
		const result = version.result as unknown as { options: { index: number; label: string; kind: string; total: string; deposit: string; balance: string }[] };
		const chosen = result.options.find((o) => o.label === story.repairLabel)!;
		expect(chosen.kind).toBe('repair');

		// Keyboard alone: Tab to the option, pick the repair with the arrow keys, type the name, tick, approve.
		await phone.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
		await tabTo(phone, 'input[type="radio"][name="optionIndex"]');
		for (let moves = 0; moves < result.options.length; moves++) {
			const label = await phone.evaluate(() => (document.activeElement as HTMLInputElement).closest('label')?.textContent ?? '');
			if (label.includes(story.repairLabel)) break;
			await phone.keyboard.press('ArrowDown');
		}
		await phone.keyboard.press('Space');
		expect(await phone.evaluate(() => (document.activeElement as HTMLInputElement).checked)).toBe(true);
		expect(await phone.evaluate(() => (document.activeElement as HTMLInputElement).value)).toBe(String(chosen.index));
		expect(await focusedIsVisible(phone)).toBe(true);
		await tabTo(phone, 'input[name="signerName"]', 3);
		await phone.keyboard.type(story.customer.name);
		await tabTo(phone, 'input[type="checkbox"][name="consent"]', 3);
		await phone.keyboard.press('Space');
		expect(await phone.evaluate(() => (document.activeElement as HTMLInputElement).checked)).toBe(true);
		await tabTo(phone, 'button', 3);
		expect(await phone.evaluate(() => document.activeElement?.textContent?.trim())).toBe('Approve and sign');
		expect(await focusedIsVisible(phone)).toBe(true);
		await step(phone, 'customer-signing', { axe: 'customer estimate, filled in' });
		await phone.locator('section[aria-labelledby="approve-heading"]').scrollIntoViewIfNeeded();
		await guideImage(phone, 'customer-approve-phone.jpg', phone.locator('section[aria-labelledby="approve-heading"]'));
		await phone.keyboard.press('Enter');
		await phone.getByText('Thank you — you approved this estimate').waitFor();
		expect((await Job.findByPk(story.jobId))!.status).toBe('approved');
		await step(phone, 'customer-approved', { axe: 'customer estimate, approved' });

		// The deposit, also by keyboard as far as the shop's page goes; the card page is the local fake's.
		const deposit = formatFixedMoney(chosen.deposit, 'USD');
		expect(Number(chosen.deposit)).toBeGreaterThan(0);
		await phone.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
		await tabTo(phone, 'button');
		expect(await phone.evaluate(() => document.activeElement?.textContent?.trim())).toBe(`Pay the deposit (${deposit}) by card`);
		await phone.keyboard.press('Enter');
		await phone.waitForURL(`${fakeUrl()}/pay/**`);
		await phone.getByLabel('Card number').fill(SUCCEEDS);
		await phone.screenshot({ path: path.join(SHOTS, `${String(++shotNumber).padStart(2, '0')}-test-card-page.png`) });
		await phone.getByRole('button', { name: `Pay ${deposit}` }).click();
		await phone.waitForURL(`${BASE_URL}/q/**?payment=done&session_id=*`);
		await phone.getByText('Payment received — thank you.').waitFor();
		expect(await phone.getByTestId('paid-so-far').textContent()).toBe(deposit);
		await step(phone, 'customer-paid', { axe: 'customer estimate, deposit paid' });
		await guideImage(phone, 'customer-paid-phone.jpg', phone.getByTestId('pay-panel'));
		await until('the deposit is recorded', async () => (await Payment.findOne({ where: { jobId: story.jobId, status: 'paid', kind: 'deposit' } })) !== null);
		expect(problemsOf(phone)).toEqual([]);
	}, STEP_TIMEOUT);

	it('the technician does the repair and records the hours it really took', async () => {
		const bench = story.pages.technician;
		await bench.goto(`${BASE_URL}/jobs/${story.jobId}`);
		await bench.getByRole('button', { name: 'Start the repair' }).click();
		await bench.getByText('Status updated.').waitFor();
		await bench.getByRole('link', { name: 'Actuals' }).click();
		await bench.waitForURL(`**/jobs/${story.jobId}/actuals`);
		await bench.getByLabel('Hours', { exact: true }).fill('2.75');
		await bench.getByLabel('Note (optional)').fill('Seized rotor bearing made the head slow to part from the engine.');
		await bench.getByRole('button', { name: 'Record hours' }).click();
		await bench.getByText(/2\.75 h · Caddo Frey/).waitFor();
		// Ready for the next entry: hours empty, the day still today's (not blank after the reset).
		expect(await bench.getByLabel('Hours', { exact: true }).inputValue()).toBe('');
		expect(await bench.locator('input[name="workedOn"]').inputValue()).toMatch(/^\d{4}-\d{2}-\d{2}$/);
		await step(bench, 'actuals-phone', { axe: 'actuals (technician, phone)' });
		await bench.evaluate(() => window.scrollTo(0, 0));
		await guideImage(bench, 'technician-actuals-phone.jpg');
		await bench.goto(`${BASE_URL}/jobs/${story.jobId}`);
		await bench.getByRole('button', { name: 'Repair finished' }).click();
		await bench.getByText('Status updated.').waitFor();
		expect((await Job.findByPk(story.jobId))!.status).toBe('ready');
		expect(problemsOf(bench)).toEqual([]);
	}, STEP_TIMEOUT);

	it('the writer takes the balance at the counter and hands the unit back', async () => {
		const desk = story.pages.writer;
		await desk.goto(`${BASE_URL}/jobs/${story.jobId}`);
		await desk.getByRole('link', { name: 'Payments' }).click();
		await desk.waitForURL(`**/jobs/${story.jobId}/payments`);
		const summary = desk.getByTestId('payment-summary');
		const owed = (await summary.locator('div').filter({ hasText: 'Owed' }).locator('dd').textContent())!.trim();
		expect(owed).toMatch(/^\$[\d,]+\.\d{2}$/);
		await desk.getByLabel('For').selectOption({ label: 'Balance' });
		await desk.getByLabel('How').selectOption({ label: 'Card terminal' });
		await desk.getByLabel('Amount (USD)', { exact: true }).fill(owed.replace(/[$,]/g, ''));
		await desk.getByLabel('Reference (slip or cheque number)').fill('T-20931');
		await desk.getByRole('button', { name: 'Record the payment' }).click();
		await desk.getByTestId('payment-list').getByText('Balance · Card terminal').waitFor();
		// The recorded payment's amount and slip number do not linger in the form.
		expect(await desk.getByLabel('Amount (USD)', { exact: true }).inputValue()).toBe('');
		expect(await desk.getByLabel('Reference (slip or cheque number)').inputValue()).toBe('');
		await expect(summary.locator('div').filter({ hasText: 'Owed' }).locator('dd').textContent()).resolves.toBe('$0.00');
		await step(desk, 'payments', { axe: 'payments (writer)' });
		await guideImage(desk, 'writer-payments-desktop.jpg');
		await desk.getByRole('link', { name: `← Job #${story.jobNumber}` }).click();
		await desk.getByRole('button', { name: 'Handed back' }).click();
		await desk.getByText('Status updated.').waitFor();
		expect((await Job.findByPk(story.jobId))!.status).toBe('picked_up');
		const paid = await Payment.findAll({ where: { jobId: story.jobId, status: 'paid' } });
		expect(paid.map((p) => p.kind).sort()).toEqual(['balance', 'deposit']);
		expect(problemsOf(desk)).toEqual([]);
	}, STEP_TIMEOUT);

	it('the manager opens the reports and finds this job in the figures', async () => {
		const owner = story.pages.owner;
		await owner.getByRole('link', { name: 'Reports' }).click();
		await owner.waitForURL('**/reports');
		await owner.locator('[data-report-table="margin-lost"]').waitFor();
		await owner.locator('[data-report-table="technicians"]').waitFor();
		await owner.waitForFunction(() => document.querySelectorAll('section[data-report][aria-busy="false"]').length === document.querySelectorAll('section[data-report]').length);

		// The job lost margin: 0.75 h more than the 2.00 h billed, at the 38.00 labour cost set in step one.
		const lost = owner.locator('[data-report-table="margin-lost"] tbody tr').filter({ has: owner.getByRole('link', { name: `#${story.jobNumber}` }) });
		await expect(lost.count()).resolves.toBe(1);
		await expect(lost.locator('td').last().textContent()).resolves.toBe('$28.50');
		const tech = owner.locator('[data-report-table="technicians"] tbody tr').filter({ hasText: story.technician.name });
		await expect(tech.textContent()).resolves.toContain('2.75');
		const revenue = owner.locator('[data-report-table="revenue"] tfoot tr');
		await expect(revenue.locator('td').first().textContent()).resolves.toBe('1');
		await step(owner, 'reports', { axe: 'reports' });
		await guideImage(owner, 'manager-margin-desktop.jpg', owner.locator('section[data-report="margin"]'));
		await owner.locator('section[data-report="margin-lost"]').scrollIntoViewIfNeeded();
		await guideImage(owner, 'manager-margin-lost-desktop.jpg', owner.locator('section[data-report="margin-lost"]'));
		await owner.getByRole('link', { name: `#${story.jobNumber}` }).click();
		await owner.waitForURL(`**/jobs/${story.jobId}/actuals`);
		await step(owner, 'actuals-manager', { axe: 'actuals (manager)' });

		// Both of the job's payments are in the shop's payment list.
		await owner.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Payments' }).click();
		await owner.waitForURL('**/payments');
		const listed = owner.getByTestId('payments-table').getByRole('link', { name: `#${story.jobNumber}`, exact: true });
		await expect(listed.count()).resolves.toBe(2);
		await step(owner, 'payments-manager', { axe: 'payments (manager)' });
		expect(problemsOf(owner)).toEqual([]);
	}, STEP_TIMEOUT);

	it('axe finds nothing serious or critical on any page of the run, and every control is labelled', () => {
		const serious = audit.serious();
		const report = audit.report([...serious]);
		console.log(`axe checked ${audit.checked.length} pages: ${audit.checked.join('; ')}`);
		if (audit.findings.length) console.log(`axe findings (${audit.minor().length} minor or moderate, ${serious.length} serious or critical):\n${audit.report()}`);
		expect(audit.checked.length).toBeGreaterThanOrEqual(20);
		expect(report, report).toBe('');
		expect(audit.unlabelled, audit.report([])).toEqual([]);
	});
});
