// Story 2 on a phone: the customer approves through the e-mailed link and pays the deposit on the
// local payment fake's test page; a declined card first, then the card that succeeds.
import { afterAll, describe, expect, it } from 'vitest';
import { Dec, formatMoney } from '../../src/lib/pricing/money';
import { Customer } from '../../src/lib/server/db/models';
import { Payment } from '../../src/lib/server/db/payment-models';
import { PHONE, closeBrowsers, openBrowser, signIn } from '../helpers/browser';
import { BASE_URL } from '../helpers/client';
import { createShop, uniqueEmail } from '../helpers/fixtures';
import { waitForMessage } from '../helpers/mailbox';
import { DECLINED, SUCCEEDS, fakeUrl, until } from '../helpers/payments';
import { sentQuote } from '../helpers/quotes';

afterAll(closeBrowsers);

describe('the deposit in the browser', () => {
	it('approve, a declined card, then pay with the succeeding card; the link, the job and the mailbox show it paid', async () => {
		const shop = await createShop('Deposit browser');
		const email = uniqueEmail('customer');
		const sent = await sentQuote(shop);
		await Customer.update({ email }, { where: { id: sent.customer.id, shopId: shop.id } });
		const option = sent.result.options[0];
		const deposit = formatMoney(new Dec(option.deposit), 'USD');

		const page = await (await openBrowser(PHONE)).newPage();
		const policyViolations: string[] = [];
		page.on('console', (m) => {
			if (/content security policy/i.test(m.text())) policyViolations.push(m.text());
		});
		await page.goto(`${BASE_URL}/q/${sent.token}`);
		await page.getByRole('radio', { name: new RegExp(option.label) }).check();
		await page.getByLabel('Your full name (your signature)').fill('Tamsin Yarrow');
		await page.getByRole('checkbox', { name: /I authorise/ }).check();
		await page.getByRole('button', { name: 'Approve and sign' }).click();
		await page.getByText('Thank you — you approved this estimate').waitFor();

		// A declined card: a clear message on the payment page, and nothing paid back on the link.
		await page.getByRole('button', { name: `Pay the deposit (${deposit}) by card` }).click();
		await page.waitForURL(`${fakeUrl()}/pay/**`);
		expect(await page.getByRole('note').textContent()).toBe('TEST PAYMENT PAGE — local fake, no real money moves');
		await page.getByLabel('Card number').fill(DECLINED);
		await page.getByRole('button', { name: `Pay ${deposit}` }).click();
		await page.getByRole('alert').filter({ hasText: 'Your card was declined. No money was taken.' }).waitFor();
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
		await page.getByRole('link', { name: "Cancel and go back to the shop's page" }).click();
		await page.waitForURL(`${BASE_URL}/q/${sent.token}?payment=cancelled`);
		await page.getByText('The payment was not completed and nothing was charged.').waitFor();
		expect(await page.getByTestId('paid-so-far').textContent()).toBe('$0.00');
		const pending = await Payment.findAll({ where: { jobId: sent.job.id } });
		expect(pending.map((p) => p.status)).toEqual(['pending']);

		// Again, with the card that succeeds: back on the link, paid.
		await page.getByRole('button', { name: `Pay the deposit (${deposit}) by card` }).click();
		await page.waitForURL(`${fakeUrl()}/pay/**`);
		await page.getByLabel('Card number').fill(SUCCEEDS);
		await page.getByRole('button', { name: `Pay ${deposit}` }).click();
		await page.waitForURL(`${BASE_URL}/q/${sent.token}?payment=done&session_id=*`);
		await page.getByText('Payment received — thank you.').waitFor();
		expect(await page.getByTestId('paid-so-far').textContent()).toBe(deposit);
		expect(await page.getByRole('button', { name: /Pay the deposit/ }).count()).toBe(0);
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
		await until('the webhook has recorded it', async () => (await Payment.findOne({ where: { jobId: sent.job.id, status: 'paid' } })) !== null);
		expect(await Payment.count({ where: { jobId: sent.job.id } })).toBe(1);

		// The job shows it paid to the desk.
		const desk = await (await openBrowser(PHONE)).newPage();
		await signIn(desk, shop.staff.writer);
		await desk.goto(`${BASE_URL}/jobs/${sent.job.id}`);
		await desk.getByRole('link', { name: 'Payments' }).click();
		await desk.waitForURL(`**/jobs/${sent.job.id}/payments`);
		const list = desk.getByTestId('payment-list');
		await expect(list.textContent()).resolves.toContain('Deposit · Card (online)');
		await expect(list.textContent()).resolves.toContain('Paid');
		await expect(desk.getByTestId('payment-summary').textContent()).resolves.toContain(deposit);
		expect(await desk.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);

		// The receipt is in the local mailbox.
		const receipt = await waitForMessage(email, { subject: 'Receipt' });
		expect(receipt.subject).toBe(`Receipt: ${deposit} paid for job #${sent.job.number} at ${shop.name}`);
		expect(policyViolations).toEqual([]);
	});
});
