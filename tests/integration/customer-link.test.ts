import { beforeAll, describe, expect, it } from 'vitest';
import { Approval, Job, QuoteLink, QuoteVersion } from '../../src/lib/server/db/models';
import { evaluateRequest } from '../../src/lib/pricing/evaluate';
import { forCustomer } from '../../src/lib/server/customer-view';
import * as quotes from '../../src/lib/server/quotes';
import * as settings from '../../src/lib/server/settings';
import { Client } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { sampleDraft, sentQuote } from '../helpers/quotes';
import { actor } from '../helpers/shopdata';

let shop: ShopFixture;

beforeAll(async () => {
	shop = await createShop('Customer link');
});

const approve = (client: Client, token: string, fields: Record<string, string>) => client.form(`/q/${token}?/approve`, fields);

describe('customer link', () => {
	it('shows the estimate with the engine totals and no costs, and records one approval for a double tap', async () => {
		const { token, job, result } = await sentQuote(shop);
		expect(token.length).toBeGreaterThanOrEqual(43); // 32 random bytes = 256 bits, base64url
		const customer = new Client();
		const page = await customer.get(`/q/${token}`);
		expect(page.status).toBe(200);
		expect(page.text).toContain('Replace the alternator head');
		const fmt = new Intl.NumberFormat('en-US', { style: 'currency', currency: 'USD' });
		for (const option of result.options) expect(page.text).toContain(fmt.format(option.total as unknown as number));
		// The engine, called directly with the same frozen request, agrees with what was frozen.
		const version = await QuoteVersion.findOne({ where: { quoteId: (await quotes.forJob(shop.id, job.id)).quote.id } });
		const again = evaluateRequest(version!.content);
		expect(again.ok && again.result.options.map((o) => o.total)).toEqual(result.options.map((o) => o.total));
		expect(page.text).not.toContain('212.40'); // a part's cost never reaches the customer
		expect(page.text).not.toMatch(/margin/i);
		expect(page.text).toContain('carbon monoxide');
		// No option is ticked for the customer when there is a choice to make.
		if (result.options.filter((o) => o.kind !== 'decline').length > 1) expect(page.text).not.toMatch(/name="optionIndex"[^>]*checked/);
		// Labour in hours, as on the PDF (the sample repair quotes 2.5 h).
		expect(page.text).toMatch(/Replace alternator head 2\.50? h/);

		const unsigned = await approve(customer, token, { optionIndex: '0', signerName: '', consent: 'yes' });
		expect(unsigned.status).toBe(400);
		// Said once, beside the field, not again in an alert above the form.
		expect(unsigned.text).toContain('role="alert">Type your full name as your signature.</span>');
		expect(unsigned.text).not.toMatch(/notice-bad[^>]*>Type your full name/);
		const noConsent = await approve(customer, token, { optionIndex: '0', signerName: 'Tamsin Yarrow' });
		expect(noConsent.status).toBe(400);
		expect(await Approval.count({ where: { shopId: shop.id } })).toBe(0);

		const [first, second] = await Promise.all([
			approve(customer, token, { optionIndex: '0', signerName: 'Tamsin Yarrow', consent: 'yes' }),
			approve(new Client(), token, { optionIndex: '0', signerName: 'Tamsin Yarrow', consent: 'yes' })
		]);
		expect([first.status, second.status]).toEqual([303, 303]);
		const approvals = await Approval.findAll({ where: { shopId: shop.id } });
		expect(approvals).toHaveLength(1);
		expect(approvals[0]).toMatchObject({ decision: 'approved', optionIndex: 0, signerName: 'Tamsin Yarrow', versionHash: version!.contentHash });
		expect(approvals[0].clientAddress).toBeTruthy();
		expect((await Job.findByPk(job.id))!.status).toBe('approved');
		const answered = (await customer.get(`/q/${token}`)).text;
		expect(answered).toContain('you approved this estimate');
		// The approved option is the one marked now, not the shop's recommendation.
		expect(answered.split('You approved this</span>')).toHaveLength(2);
		expect(answered).not.toContain('Our recommendation');
	});

	it('cannot approve the decline option or an option that does not exist', async () => {
		const { token } = await sentQuote(shop);
		expect((await approve(new Client(), token, { optionIndex: '2', signerName: 'Tamsin Yarrow', consent: 'yes' })).status).toBe(400);
		expect((await approve(new Client(), token, { optionIndex: '9', signerName: 'Tamsin Yarrow', consent: 'yes' })).status).toBe(400);
	});

	it('a decline is recorded with its reason and moves the job', async () => {
		const { token, job } = await sentQuote(shop);
		const reply = await new Client().form(`/q/${token}?/decline`, { reason: 'Buying a new one elsewhere' });
		expect(reply.status).toBe(303);
		expect((await Job.findByPk(job.id))!.status).toBe('declined');
		const approval = await Approval.findOne({ where: { shopId: shop.id, decision: 'declined' } });
		expect(approval!.reason).toBe('Buying a new one elsewhere');
	});

	it('expired, revoked and tampered links show a clear page and accept nothing', async () => {
		const expired = await sentQuote(shop);
		await QuoteLink.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { quoteId: expired.link.quoteId } });
		const page = await new Client().get(`/q/${expired.token}`);
		expect(page.text).toContain('This estimate has expired');
		expect(page.text).toContain(shop.name.split(' ')[0]);
		expect((await approve(new Client(), expired.token, { optionIndex: '0', signerName: 'Tamsin Yarrow', consent: 'yes' })).status).toBe(400);

		const revoked = await sentQuote(shop);
		await quotes.revokeLinks(actor(shop, 'writer'), revoked.job.id);
		expect((await new Client().get(`/q/${revoked.token}`)).text).toContain('This link was withdrawn by the shop');
		expect((await approve(new Client(), revoked.token, { optionIndex: '0', signerName: 'Tamsin Yarrow', consent: 'yes' })).status).toBe(400);

		const good = await sentQuote(shop);
		const flipped = good.token.slice(0, -1) + (good.token.endsWith('A') ? 'B' : 'A');
		expect((await new Client().get(`/q/${flipped}`)).status).toBe(404);
		expect((await new Client().get('/q/short')).status).toBe(404);
		expect((await approve(new Client(), flipped, { optionIndex: '0', signerName: 'Tamsin Yarrow', consent: 'yes' })).status).toBe(404);
		expect(await Approval.count({ where: { quoteId: good.link.quoteId } })).toBe(0);
	});

	it('a link to a replaced version says so and shows the newest; the old version stays as sent', async () => {
		const first = await sentQuote(shop);
		const v1 = await QuoteVersion.findByPk(first.version.id);
		const draft = sampleDraft();
		(draft.options[0].lines[1] as { hours: string }).hours = '3.0';
		const { quote } = await quotes.forJob(shop.id, first.job.id);
		await quotes.saveDraft(actor(shop, 'technician'), first.job.id, draft, quote.lockVersion);
		const second = await quotes.send(actor(shop, 'writer'), first.job.id);
		expect(second.version.number).toBe(2);
		expect(second.version.contentHash).not.toBe(v1!.contentHash);
		const old = await new Client().get(`/q/${first.token}`);
		expect(old.text).toContain('The link you opened was for version 1');
		expect(old.text).toContain('version 2');
		const v1After = await QuoteVersion.findByPk(first.version.id);
		expect(v1After!.contentHash).toBe(v1!.contentHash);
		expect(v1After!.content).toEqual(v1!.content);
		await expect(QuoteVersion.update({ contentHash: 'x'.repeat(64) }, { where: { id: first.version.id } })).rejects.toThrow(/cannot be changed/);
	});

	it('nothing of another quote is reachable from a token', async () => {
		const mine = await sentQuote(shop);
		const other = await createShop('Other shop');
		const theirs = await sentQuote(other);
		const page = await new Client().get(`/q/${mine.token}`);
		expect(page.text).not.toContain(other.name);
		const photo = await new Client().get(`/q/${mine.token}/photos/${theirs.job.id}`);
		expect(photo.status).toBe(404);
		expect((await settings.get(shop.id)).pricing.currency).toBe('USD');
	});
});

describe('the reasons the customer reads', () => {
	it('keep every fact once, drop sentences that repeat the verdict and the shop\'s rule of thumb, and speak to the customer', () => {
		const priced = evaluateRequest({ currency: 'USD', diagnosticFee: '89.00', ...sampleDraft() });
		expect(priced.ok).toBe(true);
		if (!priced.ok) return;
		const engine = [...priced.result.recommendation.reasons, ...priced.result.repairs.flatMap((r) => r.reasons)];
		// The engine's own words, which the customer page rewrites; if they change, so must forCustomer.
		expect(engine.some((r) => r.includes("the shop's guide is to repair below"))).toBe(true);
		expect(engine.some((r) => r.includes("the customer's preference decides"))).toBe(true);
		const shown = forCustomer([...engine, engine[0], 'The repair costs more than it is worth, so replacing the unit is the better buy.']);
		expect(new Set(shown).size).toBe(shown.length);
		expect(shown.some((r) => /better buy/.test(r))).toBe(false);
		expect(forCustomer(['Replace: "New 5.5 kW portable" is a better buy than any repair offered.', 'A fact.'])).toEqual(['A fact.']);
		expect(shown.join(' ')).not.toMatch(/shop's guide|the customer's/);
		expect(shown).toContain(engine.find((r) => r.startsWith('The repair is ') && r.includes('of the price of a new unit'))!.replace(/; the shop's guide.*$/, '.'));
		expect(shown.some((r) => r.includes('your preference decides'))).toBe(true);
	});
});
