// The estimate PDF, read back with poppler (pdftotext, pdftoppm): every customer figure is the
// engine's string formatted to the cent, no cost or margin reaches it, it carries the safety
// caution, the validity date and the approval record, and only the right people can fetch it.
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { evaluateRequest, type PricingResult } from '../../src/lib/pricing/evaluate';
import { estimateReference } from '../../src/lib/domain';
import { Job, QuoteLink, QuoteVersion, Reading, Shop } from '../../src/lib/server/db/models';
import * as photos from '../../src/lib/server/photos';
import * as quotes from '../../src/lib/server/quotes';
import { BASE_URL, Client, signedIn } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { actor, createJob } from '../helpers/shopdata';

const work = fs.mkdtempSync(path.join(os.tmpdir(), 'quote-pdf-'));
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

/** Three options: a repair with parts and labour, a staged repair, a replacement. */
function threeOptionDraft() {
	return {
		unit: { description: 'Harrowgate PG-5500', ageYears: '4', engineHours: '210', lifeYears: '10', lifeHours: '1500', condition: 'good', asIsValue: '60', annualUpkeep: '0' },
		options: [
			{
				label: 'Replace the alternator head',
				kind: 'repair',
				creditDiagnosticFee: true,
				lines: [
					{ kind: 'part', description: 'Alternator head assembly, 5.5 kW', quantity: '1', unitCost: '212.43', specialOrder: true },
					{ kind: 'part', description: 'Brush holder with brushes', quantity: '2', unitCost: '18.67' },
					{ kind: 'labour', description: 'Remove and replace the alternator head, then test the output under load', hours: '2.5' }
				]
			},
			{
				label: 'Find and fix in stages',
				kind: 'repair',
				notToExceed: '300.00',
				stages: [
					{ label: 'Clean slip rings, new brushes', likelihood: '0.5', lines: [{ kind: 'part', description: 'Brush set', quantity: '1', unitCost: '17.93' }, { kind: 'labour', description: 'Clean and refit', hours: '1' }] },
					{ label: 'New voltage regulator', likelihood: '0.3', lines: [{ kind: 'part', description: 'Automatic voltage regulator', quantity: '1', unitCost: '64.81' }, { kind: 'labour', description: 'Fit and adjust', hours: '0.75' }] },
					{ label: 'Rewind the stator', likelihood: '0.2', lines: [{ kind: 'sublet', description: 'Stator rewind, outside shop', cost: '141.17', price: '185.00' }] }
				]
			},
			{
				label: 'New 5.5 kW portable',
				kind: 'replacement',
				lines: [{ kind: 'unit', description: 'Ostrander 5500 portable generator', cost: '643.21', price: '899.00' }],
				lifeYears: '10',
				lifeHours: '1500'
			}
		]
	};
}

/** A noisy picture, so the JPEG is a real photo-sized file. */
async function jpeg(width: number, height: number): Promise<Buffer> {
	const raw = Buffer.alloc(width * height * 3);
	for (let i = 0; i < raw.length; i++) raw[i] = (i * 7919 + (i >> 5) * 104729) & 0xff;
	return sharp(raw, { raw: { width, height, channels: 3 } }).jpeg({ quality: 85 }).toBuffer();
}

interface Fetched {
	status: number;
	headers: Headers;
	bytes: Buffer;
}

async function fetchBytes(pathname: string, client?: Client): Promise<Fetched> {
	const res = await fetch(BASE_URL + pathname, { redirect: 'manual', headers: client?.cookies.size ? { cookie: client.cookieHeader } : {} });
	return { status: res.status, headers: res.headers, bytes: Buffer.from(await res.arrayBuffer()) };
}

let fileCount = 0;
/** pdftotext -layout, one string per page. */
function pdfPages(bytes: Buffer): string[] {
	const file = path.join(work, `doc-${++fileCount}.pdf`);
	fs.writeFileSync(file, bytes);
	const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
	return text.split('\f').filter((page) => page.trim() !== '');
}

/** The whole text with runs of white space made single, for sentences that wrap. */
const flat = (pages: string[]) => pages.join('\n').replace(/\s+/g, ' ');

const usd = new Intl.NumberFormat('en-US', { style: 'currency', currency: 'USD', minimumFractionDigits: 2, maximumFractionDigits: 2 });
const money = (amount: string) => usd.format(amount as unknown as number);
const longDate = (iso: string) => new Intl.DateTimeFormat('en-US', { dateStyle: 'long', timeZone: 'UTC' }).format(new Date(`${iso}T12:00:00Z`));

let shop: ShopFixture;
let other: ShopFixture;
let staff: Client;
let technician: Client;
let outsider: Client;

async function sentJob(fixture: ShopFixture) {
	const made = await createJob(fixture, { complaint: 'Runs smoothly but there is no power at any outlet.' });
	await Job.update(
		{ failedComponent: 'Stator (open main winding)', findings: 'Main winding reads open between the outlet terminals; rotor within spec.' },
		{ where: { id: made.job.id } }
	);
	await Reading.bulkCreate([
		{ shopId: fixture.id, jobId: made.job.id, specItemId: null, label: 'Stator main winding T1–T2', unit: 'Ω', value: null, overRange: true, minValue: '0.8', maxValue: '1.2', result: 'open', takenBy: null },
		{ shopId: fixture.id, jobId: made.job.id, specItemId: null, label: 'Rotor field winding', unit: 'Ω', value: '14.2', minValue: '12', maxValue: '16', result: 'pass', takenBy: null },
		{ shopId: fixture.id, jobId: made.job.id, specItemId: null, label: 'Output frequency at no load', unit: 'Hz', value: '58.4', minValue: '61', maxValue: '63', result: 'low', takenBy: null }
	]);
	const shown = await photos.add(actor(fixture, 'technician'), made.job.id, { bytes: await jpeg(640, 480), name: 'stator.jpg' }, 'Burnt insulation at the stator leads');
	await photos.update(actor(fixture, 'technician'), made.job.id, shown.id, { showCustomer: true });
	await photos.add(actor(fixture, 'technician'), made.job.id, { bytes: await jpeg(400, 300), name: 'bench.jpg' }, 'Bench clutter, staff only');
	const { quote } = await quotes.forJob(fixture.id, made.job.id);
	await quotes.saveDraft(actor(fixture, 'technician'), made.job.id, threeOptionDraft(), quote.lockVersion);
	const sent = await quotes.send(actor(fixture, 'writer'), made.job.id);
	return { ...made, ...sent };
}

const decision = (optionIndex: number | null, decision: 'approved' | 'declined' = 'approved') => ({
	decision,
	optionIndex,
	signerName: decision === 'approved' ? 'Tamsin Yarrow' : null,
	reason: decision === 'declined' ? 'Buying a new one' : '',
	clientAddress: '203.0.113.9',
	userAgent: 'quote-pdf test'
});

beforeAll(async () => {
	[shop, other] = await Promise.all([createShop('Fenwick Lane Power'), createShop('Other bench')]);
	await Shop.update(
		{ address: '14 Fenwick Lane, Dunmore', phone: '555-0142', email: 'bench@fenwick.example', settings: { pricing: { taxRate: '0.0725' } } },
		{ where: { id: shop.id } }
	);
	[staff, technician, outsider] = await Promise.all([
		signedIn(shop.staff.writer.email, shop.staff.writer.password),
		signedIn(shop.staff.technician.email, shop.staff.technician.password),
		signedIn(other.staff.owner.email, other.staff.owner.password)
	]);
});

describe('estimate PDF', () => {
	it('shows every customer figure exactly as the engine computed it, and no cost or margin', async () => {
		const sent = await sentJob(shop);
		const result = sent.result as PricingResult;
		// The frozen request, priced again by the engine, gives the same figures that were sent.
		const version = await QuoteVersion.findByPk(sent.version.id);
		const again = evaluateRequest(version!.content);
		expect(again.ok && again.result.options.map((o) => [o.total, o.tax, o.deposit, o.balance])).toEqual(result.options.map((o) => [o.total, o.tax, o.deposit, o.balance]));
		expect(result.options[0].tax).not.toBe('0.00');

		const reply = await fetchBytes(`/jobs/${sent.job.id}/quote/v/1/quote.pdf`, staff);
		expect(reply.status).toBe(200);
		expect(reply.headers.get('content-type')).toBe('application/pdf');
		expect(reply.headers.get('content-disposition')).toBe(`inline; filename="estimate-${sent.job.number}-v1.pdf"`);
		expect(reply.headers.get('cache-control')).toContain('no-store');
		expect(reply.bytes.subarray(0, 5).toString()).toBe('%PDF-');
		const pages = pdfPages(reply.bytes);
		const text = pages.join('\n');

		const shown: string[] = [];
		for (const option of result.options) {
			expect(text).toContain(option.label);
			for (const figure of [option.subtotal, option.tax, option.total, option.deposit, option.balance]) {
				expect(text, `${option.label}: ${figure}`).toContain(money(figure));
				shown.push(figure);
			}
			for (const line of [...option.lines, ...(option.staged?.stages.flatMap((s) => s.lines) ?? [])]) {
				expect(text).toContain(money(line.sell));
				shown.push(line.sell, line.unitPrice ?? '0');
			}
		}
		const staged = result.options[1].staged!;
		for (const figure of [staged.expectedCost, staged.worstCase, staged.notToExceed, ...staged.stages.map((s) => s.total)]) {
			expect(text).toContain(money(figure));
			shown.push(figure);
		}
		const breakEven = result.repairs[0].comparison!.breakEvenRepair;
		expect(flat(pages)).toContain(`A repair is worth up to ${money(breakEven)}`);

		// Costs, gross profit, margins and markups: none may appear (skipping any figure that is also a price).
		const hidden = new Set<string>();
		for (const option of result.options) {
			hidden.add(option.cost).add(option.grossProfit);
			for (const line of [...option.lines, ...(option.staged?.stages.flatMap((s) => s.lines) ?? [])]) hidden.add(line.cost).add(line.grossProfit);
		}
		const checked = [...hidden].filter((figure) => Number(figure) !== 0 && !shown.includes(figure));
		expect(checked.length).toBeGreaterThan(8);
		for (const figure of checked) expect(text, `cost figure ${figure}`).not.toContain(money(figure));
		for (const raw of ['212.43', '18.67', '141.17', '643.21']) expect(text).not.toContain(raw);
		expect(text).not.toMatch(/margin|markup|profit/i);

		expect(flat(pages)).toContain('Burnt insulation at the stator leads');
		expect(text).not.toContain('Bench clutter, staff only');
		expect(text).toContain('Stator (open main winding)');
		expect(text).toMatch(/Stator main winding T1–T2\s+OL \(over range\)\s+0\.8–1\.2 Ω\s+Open circuit/);
		expect(text).toMatch(/Output frequency at no load\s+58\.4 Hz\s+61–63 Hz\s+Low/);
		expect(text).toContain('In spec');
		expect(flat(pages)).toContain('carbon monoxide kills');
		expect(flat(pages)).toContain('transfer switch or interlock installed to local code by a licensed electrician');
		expect(flat(pages)).toContain(`valid until ${longDate(sent.version.validUntil)}`);
		expect(text).toContain('Tax (7.25%)');

		// Every page carries its number, the version and the short content hash.
		const hash = estimateReference(sent.version.contentHash);
		pages.forEach((page, i) => {
			expect(page).toContain(`Page ${i + 1} of ${pages.length}`);
			expect(page).toContain(`version 1`);
			expect(page).toContain(hash);
		});

		// It renders: one non-empty PNG per page.
		const pdfFile = path.join(work, 'render.pdf');
		fs.writeFileSync(pdfFile, reply.bytes);
		execFileSync('pdftoppm', ['-r', '50', '-png', pdfFile, path.join(work, 'page')]);
		const pngs = fs.readdirSync(work).filter((f) => f.startsWith('page') && f.endsWith('.png'));
		expect(pngs).toHaveLength(pages.length);
		for (const png of pngs) {
			const bytes = fs.readFileSync(path.join(work, png));
			expect(bytes.subarray(1, 4).toString()).toBe('PNG');
			const { width, height } = await sharp(bytes).metadata();
			expect(width).toBeGreaterThan(300);
			expect(height).toBeGreaterThan(300);
		}
	});

	it('the customer link serves its version, and the approval block fills in once they approve', async () => {
		const sent = await sentJob(shop);
		const before = await fetchBytes(`/q/${sent.token}/quote.pdf`);
		expect(before.status).toBe(200);
		expect(before.headers.get('content-type')).toBe('application/pdf');
		expect(before.headers.get('content-disposition')).toBe(`inline; filename="estimate-${sent.job.number}-v1.pdf"`);
		expect(before.headers.get('cache-control')).toContain('no-store');
		const unsigned = flat(pdfPages(before.bytes));
		expect(unsigned).toContain('Signature');
		expect(unsigned).not.toContain('Approved by');
		for (const option of (sent.result as PricingResult).options) expect(unsigned).toContain(money(option.total));

		await quotes.decide(sent.token, decision(1));
		const hash = estimateReference(sent.version.contentHash);
		for (const reply of [await fetchBytes(`/q/${sent.token}/quote.pdf`), await fetchBytes(`/jobs/${sent.job.id}/quote/v/1/quote.pdf`, staff)]) {
			expect(reply.status).toBe(200);
			const signed = flat(pdfPages(reply.bytes));
			expect(signed).toContain('Approved by Tamsin Yarrow on');
			expect(signed).toContain('network address 203.0.113.9');
			expect(signed).toContain('option “Find and fix in stages”');
			expect(signed).toContain(`of estimate ${hash}`);
			// The approved option carries the tag now, not the shop's recommendation.
			expect(signed).toMatch(/Option 2: Find and fix in stages\s+Approved/);
			expect(signed).not.toContain('Recommended');
			expect(signed).not.toContain('Signature');
		}
	});

	it('a declined quote says so', async () => {
		const sent = await sentJob(shop);
		await quotes.decide(sent.token, decision(null, 'declined'));
		const text = flat(pdfPages((await fetchBytes(`/jobs/${sent.job.id}/quote/v/1/quote.pdf`, technician)).bytes));
		expect(text).toMatch(/Declined on \w+ \d+, \d{4} at .+ UTC: estimate [0-9a-f]{12}, answered online from network address 203\.0\.113\.9/);
		expect(text).toContain('Reason given: Buying a new one');
		expect(text).not.toContain('Approved by');
	});

	it('expired links still give the customer their record, marked expired; withdrawn and unknown links give nothing', async () => {
		const expired = await sentJob(shop);
		await QuoteLink.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { quoteId: expired.link.quoteId } });
		const record = await fetchBytes(`/q/${expired.token}/quote.pdf`);
		expect(record.status).toBe(200);
		expect(flat(pdfPages(record.bytes))).toContain(`This estimate expired on ${longDate(expired.version.validUntil)}`);

		const revoked = await sentJob(shop);
		await quotes.revokeLinks(actor(shop, 'writer'), revoked.job.id);
		const gone = await fetchBytes(`/q/${revoked.token}/quote.pdf`);
		expect(gone.status).toBe(410);
		expect(gone.headers.get('content-type')).toContain('text/plain');
		expect(gone.bytes.toString()).toContain('withdrawn');

		const flipped = expired.token.slice(0, -1) + (expired.token.endsWith('A') ? 'B' : 'A');
		expect((await fetchBytes(`/q/${flipped}/quote.pdf`)).status).toBe(404);
		expect((await fetchBytes('/q/short/quote.pdf')).status).toBe(404);
	});

	it('only signed-in staff of the job’s shop get the staff PDF', async () => {
		const sent = await sentJob(shop);
		const url = `/jobs/${sent.job.id}/quote/v/1/quote.pdf`;
		const anonymous = await fetchBytes(url);
		expect(anonymous.status).toBe(401);
		expect(anonymous.headers.get('content-type')).not.toBe('application/pdf');
		expect((await fetchBytes(url, technician)).status).toBe(200);
		const foreign = await fetchBytes(url, outsider);
		expect(foreign.status).toBe(404);
		expect(foreign.bytes.toString()).not.toContain(shop.name);
		// Another shop's own job number and version do not open this shop's estimate either.
		const theirs = await sentJob(other);
		expect((await fetchBytes(`/jobs/${theirs.job.id}/quote/v/1/quote.pdf`, staff)).status).toBe(404);
		expect((await fetchBytes(`/jobs/${theirs.job.id}/quote/v/1/quote.pdf`, outsider)).status).toBe(200);
		expect((await fetchBytes(`/jobs/${sent.job.id}/quote/v/2/quote.pdf`, staff)).status).toBe(404);
		expect((await fetchBytes(`/jobs/${sent.job.id}/quote/v/0/quote.pdf`, staff)).status).toBe(404);
		expect((await fetchBytes(`/jobs/not-a-job/quote/v/1/quote.pdf`, staff)).status).toBe(404);
	});
});
