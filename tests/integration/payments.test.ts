// Deposits and balances through the Stripe SDK against the local payment fake, counter payments,
// refunds, an outage of the payment service, and who may do what on the new pages.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Op } from 'sequelize';
import { beforeAll, describe, expect, it } from 'vitest';
import { Dec, formatMoney, toMinorUnits } from '../../src/lib/pricing/money';
import { Approval, Job, Shop } from '../../src/lib/server/db/models';
import { Payment, PaymentEvent, Refund } from '../../src/lib/server/db/payment-models';
import * as jobs from '../../src/lib/server/jobs';
import * as quotes from '../../src/lib/server/quotes';
import { startPaymentFake } from '../../scripts/payment-fake';
import { freePort, startApp } from '../helpers/app';
import { BASE_URL, Client, signedIn } from '../helpers/client';
import { createShop, uniqueEmail, type ShopFixture } from '../helpers/fixtures';
import { linkIn, listMessages, pathOf, waitForMessage } from '../helpers/mailbox';
import {
	DECLINED, SUCCEEDS, approvedQuote, fakeObject, fakeUrl, payAt, startPayment, until, webhookSecret
} from '../helpers/payments';
import { sampleDraft, sentQuote } from '../helpers/quotes';
import { actor, createJob } from '../helpers/shopdata';

let shop: ShopFixture;
let other: ShopFixture;
const staff = {} as Record<'owner' | 'manager' | 'writer' | 'technician', Client>;

beforeAll(async () => {
	[shop, other] = await Promise.all([createShop('Payments'), createShop('Other payments')]);
	for (const role of ['owner', 'manager', 'writer', 'technician'] as const) staff[role] = await signedIn(shop.staff[role].email, shop.staff[role].password);
});

interface CheckoutSession {
	amount_total: number;
	currency: string;
	metadata: Record<string, string>;
	success_url: string;
	cancel_url: string;
	payment_intent: string | null;
}

const usd = (amount: string) => formatMoney(new Dec(amount), 'USD');
const paymentOf = (session: string) => Payment.findOne({ where: { checkoutSessionId: session } });

/** Approves a quote and pays its deposit with the succeeding card; returns the paid payment. */
async function paidDeposit(target: ShopFixture, email: string) {
	const q = await approvedQuote(target, { email });
	const { checkoutUrl, session } = await startPayment(q.customer, q.token);
	const paid = await payAt(checkoutUrl!, SUCCEEDS);
	expect(paid.status).toBe(303);
	const payment = await until('the deposit is paid', async () => {
		const p = await paymentOf(session!);
		return p?.status === 'paid' ? p : null;
	});
	return { ...q, payment, session: session! };
}

describe('the deposit, paid by card through the SDK and the local fake', () => {
	it('opens a Checkout Session for the engine deposit in minor units, then the webhook marks it paid and a receipt goes out', async () => {
		const email = uniqueEmail('deposit');
		const q = await approvedQuote(shop, { email });
		const deposit = q.option.deposit;
		expect(new Dec(deposit).gt(0)).toBe(true);
		const before = await q.customer.get(`/q/${q.token}`);
		expect(before.text).toContain(`Pay the deposit (${usd(deposit)}) by card`);

		const { checkoutUrl, session } = await startPayment(q.customer, q.token);
		expect(checkoutUrl?.startsWith(`${fakeUrl()}/pay/cs_test_`)).toBe(true);
		const cs = await fakeObject<CheckoutSession>(`checkout/sessions/${session}`);
		// Stripe takes amounts in the currency's smallest unit (cents for USD); the engine converts.
		expect(cs.amount_total).toBe(toMinorUnits(deposit, 'USD'));
		expect(cs.amount_total).toBe(new Dec(deposit).times(100).toNumber());
		expect(cs.currency).toBe('usd');
		expect(cs.metadata).toMatchObject({ quote_id: q.link.quoteId, shop_id: shop.id, job_id: q.job.id, kind: 'deposit' });
		expect(cs.success_url).toBe(`${BASE_URL}/q/${q.token}?payment=done&session_id={CHECKOUT_SESSION_ID}`);
		expect(cs.cancel_url).toBe(`${BASE_URL}/q/${q.token}?payment=cancelled`);
		const pending = (await paymentOf(session!))!;
		expect(pending).toMatchObject({ status: 'pending', kind: 'deposit', method: 'card', currency: 'USD', shopId: shop.id, jobId: q.job.id });

		const fakePage = await (await fetch(checkoutUrl!)).text();
		expect(fakePage).toContain('TEST PAYMENT PAGE — local fake, no real money moves');
		expect(fakePage).toContain(usd(deposit));

		const paid = await payAt(checkoutUrl!, SUCCEEDS);
		expect(paid.status).toBe(303);
		expect(paid.location).toBe(`${BASE_URL}/q/${q.token}?payment=done&session_id=${session}`);
		const payment = await until('the deposit is paid', async () => ((await paymentOf(session!))?.status === 'paid' ? paymentOf(session!) : null));
		expect(new Dec(payment!.amount).eq(deposit)).toBe(true);
		expect(payment!.paymentIntentId).toMatch(/^pi_test_/);
		expect(payment!.paidAt).toBeInstanceOf(Date);

		const back = await q.customer.get(pathOf(paid.location!));
		expect(back.text).toContain('Payment received');
		expect(back.text).not.toContain('Pay the deposit (');

		const receipt = await waitForMessage(email, { subject: 'Receipt' });
		expect(receipt.subject).toContain(usd(deposit));
		expect(receipt.text).toContain(payment!.paymentIntentId!);

		const jobPage = await staff.writer.get(`/jobs/${q.job.id}/payments`);
		expect(jobPage.status).toBe(200);
		expect(jobPage.text).toContain('Paid');
		expect(jobPage.text).toContain(usd(deposit));
		const total = new Dec(q.option.authorised);
		expect(jobPage.text).toContain(usd(total.minus(deposit).toFixed(2)));

		// The job page itself says what was approved, by whom, and that the deposit is in.
		const job = (await staff.writer.get(`/jobs/${q.job.id}`)).text;
		const answer = job.slice(job.indexOf('data-testid="estimate-answer"'));
		expect(answer).toMatch(/Approved<\/strong>: “[^”]+”/);
		expect(answer).toContain(`${usd(deposit)} · paid`);
	});

	it('a declined card leaves the deposit unpaid, says so clearly, and the customer can try again on the same page', async () => {
		const q = await approvedQuote(shop, { email: uniqueEmail('declined') });
		const { checkoutUrl, session } = await startPayment(q.customer, q.token);
		const declined = await payAt(checkoutUrl!, DECLINED);
		expect(declined.status).toBe(402);
		expect(declined.text).toContain('Your card was declined. No money was taken.');
		const payment = await until('the decline reaches the app', async () => {
			const p = await paymentOf(session!);
			return p?.lastError ? p : null;
		});
		expect(payment.status).toBe('pending');
		expect(payment.paidAt).toBeNull();

		const back = await q.customer.get(`/q/${q.token}?payment=cancelled`);
		expect(back.text).toContain('The payment was not completed and nothing was charged.');
		expect(back.text).toContain('Your card was declined.');
		expect(back.text).toContain('Pay the deposit (');

		const again = await startPayment(q.customer, q.token);
		expect(again.session).toBe(session);
		expect(await Payment.count({ where: { jobId: q.job.id } })).toBe(1);
		const other = await payAt(again.checkoutUrl!, '5555 5555 5555 4444');
		expect(other.status).toBe(400);
		expect(other.text).toContain('accepts only the test card numbers');
		expect((await paymentOf(session!))!.status).toBe('pending');
	});

	it('a zero-decimal currency goes to Stripe in whole units (JPY)', async () => {
		const yen = await createShop('Yen payments');
		await Shop.update({ currency: 'JPY', settings: { pricing: { currency: 'JPY', labourRate: '9800' } } }, { where: { id: yen.id } });
		const made = await createJob(yen);
		await Job.update({ diagnosticFee: '8900' }, { where: { id: made.job.id } });
		const draft = sampleDraft();
		(draft.options[0].lines[0] as { unitCost: string }).unitCost = '21240';
		draft.options[1].lines = [{ kind: 'unit', description: 'Harrowgate PG-5500 5.5 kW portable', cost: '64000', price: '89900' }];
		draft.options[2].lines = [{ kind: 'fee', description: 'Diagnostic fee', amount: '8900', feeType: 'diagnostic' }];
		draft.unit.asIsValue = '6000';
		const { quote } = await quotes.forJob(yen.id, made.job.id);
		await quotes.saveDraft(actor(yen, 'technician'), made.job.id, draft, quote.lockVersion);
		const sent = await quotes.send(actor(yen, 'writer'), made.job.id);
		expect(sent.result.currency).toBe('JPY');
		const deposit = sent.result.options[0].deposit;
		expect(deposit).toMatch(/^\d+$/);
		const customer = new Client();
		expect((await customer.form(`/q/${sent.token}?/approve`, { optionIndex: '0', signerName: 'Tamsin Yarrow', consent: 'yes' })).status).toBe(303);

		const { checkoutUrl, session } = await startPayment(customer, sent.token);
		const cs = await fakeObject<CheckoutSession>(`checkout/sessions/${session}`);
		// Stripe's zero-decimal list: JPY amounts are whole yen, not hundredths.
		expect(cs.currency).toBe('jpy');
		expect(cs.amount_total).toBe(Number(deposit));
		expect(cs.amount_total).toBe(toMinorUnits(deposit, 'JPY'));
		expect(await payAt(checkoutUrl!, SUCCEEDS)).toMatchObject({ status: 303 });
		const payment = await until('the yen deposit is paid', async () => ((await paymentOf(session!))?.status === 'paid' ? paymentOf(session!) : null));
		expect(payment!.currency).toBe('JPY');
		expect(new Dec(payment!.amount).eq(deposit)).toBe(true);
		const page = await customer.get(`/q/${sent.token}`);
		expect(page.text).toContain(formatMoney(new Dec(deposit), 'JPY'));
	});
});

describe('refunds', () => {
	it('a manager refunds part and then the rest through the SDK; each is recorded and e-mailed; nobody else may', async () => {
		const email = uniqueEmail('refund');
		const { payment, job } = await paidDeposit(shop, email);
		const deposit = new Dec(payment.amount);
		const url = `/jobs/${job.id}/payments?/refund`;
		const part = '10.00';

		for (const role of ['writer', 'technician'] as const) {
			const refused = await staff[role].form(url, { paymentId: payment.id, amount: part, reason: 'Part arrived cheaper' });
			expect(refused.status).toBe(403);
		}
		const tooMuch = await staff.manager.form(url, { paymentId: payment.id, amount: deposit.plus(1).toFixed(2), reason: 'Too much' });
		expect(tooMuch.status).toBe(400);
		expect(tooMuch.text).toContain(`At most ${usd(deposit.toFixed(2))} of this payment can still be refunded.`);
		const noReason = await staff.manager.form(url, { paymentId: payment.id, amount: part, reason: '' });
		expect(noReason.status).toBe(400);
		expect(await Refund.count({ where: { paymentId: payment.id } })).toBe(0);

		const first = await staff.manager.form(url, { paymentId: payment.id, amount: part, reason: 'Part arrived cheaper' });
		expect(first.status).toBe(200);
		const refund = (await Refund.findOne({ where: { paymentId: payment.id } }))!;
		expect(refund).toMatchObject({ reason: 'Part arrived cheaper', status: 'succeeded', currency: 'USD', shopId: shop.id, createdBy: shop.staff.manager.id });
		expect(refund.stripeRefundId).toMatch(/^re_test_/);
		const atStripe = await fakeObject<{ amount: number; payment_intent: string; metadata: Record<string, string> }>(`refunds/${refund.stripeRefundId}`);
		expect(atStripe.amount).toBe(1000); // 10.00 USD in cents
		expect(atStripe.payment_intent).toBe(payment.paymentIntentId);
		expect(atStripe.metadata.reason).toBe('Part arrived cheaper');
		await payment.reload();
		expect(payment.status).toBe('partially_refunded');
		expect(new Dec(payment.refundedAmount).eq(part)).toBe(true);
		const notice = await waitForMessage(email, { subject: 'Refund' });
		expect(notice.subject).toContain('$10.00');
		expect(notice.text).toContain('Part arrived cheaper');

		const rest = deposit.minus(part).toFixed(2);
		expect((await staff.owner.form(url, { paymentId: payment.id, amount: rest, reason: 'Customer took the unit home unrepaired' })).status).toBe(200);
		await payment.reload();
		expect(payment.status).toBe('refunded');
		const again = await staff.manager.form(url, { paymentId: payment.id, amount: '1.00', reason: 'Once more' });
		expect(again.status).toBe(400);
		expect(again.text).toContain('already refunded in full');
		expect(await Refund.count({ where: { paymentId: payment.id } })).toBe(2);
		await waitForMessage(email, { subject: 'Refund', count: 2 });

		const summary = await staff.manager.get(`/jobs/${job.id}/payments`);
		expect(summary.text).toContain('Refunded so far: ' + usd(deposit.toFixed(2)));
		// The refund events the fake sends afterwards are matched to these refunds, not flagged.
		await until('the refund events are processed', async () => (await PaymentEvent.count({ where: { shopId: shop.id, type: 'refund.created', paymentId: payment.id } })) === 2);
		expect(await PaymentEvent.count({ where: { paymentId: payment.id, flagged: true } })).toBe(0);
	});
});

describe('the balance', () => {
	it('the desk records counter payments with a reference and e-mails a link for what is still owed', async () => {
		const email = uniqueEmail('balance');
		const { job, option, payment: deposit } = await paidDeposit(shop, email);
		const url = (action: string) => `/jobs/${job.id}/payments?/${action}`;

		const early = await staff.writer.form(url('sendBalanceLink'), {});
		expect(early.status).toBe(400);
		expect(early.text).toContain('once the job is ready for pick-up');
		await jobs.transition(actor(shop, 'technician'), job.id, 'in_repair');
		await jobs.transition(actor(shop, 'technician'), job.id, 'ready');

		const total = new Dec(option.authorised);
		const owedAfterDeposit = total.minus(deposit.amount);
		const noSlip = await staff.writer.form(url('recordPayment'), { kind: 'balance', method: 'terminal', amount: '50.00', reference: '' });
		expect(noSlip.status).toBe(400);
		expect(noSlip.text).toContain('Enter the slip or approval number');
		const tooMuch = await staff.writer.form(url('recordPayment'), { kind: 'balance', method: 'cash', amount: owedAfterDeposit.plus('0.01').toFixed(2), reference: '' });
		expect(tooMuch.status).toBe(400);
		expect(tooMuch.text).toContain(`more than the ${usd(owedAfterDeposit.toFixed(2))} still owed`);
		const badAmount = await staff.writer.form(url('recordPayment'), { kind: 'balance', method: 'cash', amount: '12.345', reference: '' });
		expect(badAmount.status).toBe(400);
		expect(await Payment.count({ where: { jobId: job.id } })).toBe(1);

		const cash = await staff.writer.form(url('recordPayment'), { kind: 'balance', method: 'cheque', amount: '50.00', reference: 'Cheque 1042' });
		expect(cash.status).toBe(200);
		const counter = (await Payment.findOne({ where: { jobId: job.id, method: 'cheque' } }))!;
		expect(counter).toMatchObject({ status: 'paid', kind: 'balance', reference: 'Cheque 1042', createdBy: shop.staff.writer.id, checkoutSessionId: null });
		await waitForMessage(email, { subject: 'Receipt', count: 2 });

		const owed = owedAfterDeposit.minus('50.00');
		const sent = await staff.writer.form(url('sendBalanceLink'), {});
		expect(sent.status).toBe(200);
		const mail = await waitForMessage(email, { subject: 'is ready: balance' });
		expect(mail.subject).toContain(usd(owed.toFixed(2)));
		const link = linkIn(mail, '/q/');
		const customer = new Client();
		const page = await customer.get(pathOf(link));
		expect(page.status).toBe(200);
		expect(page.text).toContain(`Pay the balance (${usd(owed.toFixed(2))}) by card`);

		const token = pathOf(link).split('/')[2];
		const { checkoutUrl, session } = await startPayment(customer, token);
		const cs = await fakeObject<CheckoutSession>(`checkout/sessions/${session}`);
		expect(cs.amount_total).toBe(toMinorUnits(owed, 'USD'));
		expect(cs.metadata.kind).toBe('balance');
		await payAt(checkoutUrl!, SUCCEEDS);
		await until('the balance is paid', async () => (await paymentOf(session!))?.status === 'paid');
		const after = await customer.get(pathOf(link));
		expect(after.text).toContain('Nothing is owed. Thank you!');
		const desk = await staff.writer.get(`/jobs/${job.id}/payments`);
		expect(desk.text).toContain(usd(total.toFixed(2)));
		expect(desk.text).toContain('Cheque 1042');
	});
});

describe('the payment service is down while the customer pays', () => {
	it('says so clearly, keeps the approval, and the payment works once it is back (sessions survive a restart)', async () => {
		const fakePort = await freePort();
		const dataFile = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'mendwise-pay-')), 'fake.json');
		const app = await startApp({ STRIPE_API_PORT: String(fakePort) });
		const start = () =>
			startPaymentFake({ port: fakePort, dataFile, webhookUrl: `${app.url}/api/payments/webhook`, webhookSecret: webhookSecret(), apiKey: process.env.STRIPE_SECRET_KEY });
		try {
			const q = await approvedQuote(shop, { email: uniqueEmail('outage'), base: app.url });
			const customer = new Client(app.url);
			const down = await startPayment(customer, q.token);
			expect(down.reply.status).toBe(400);
			expect(down.reply.text).toContain('The payment service is not answering right now. Nothing was charged and your approval is saved.');
			expect(await Approval.count({ where: { quoteId: q.link.quoteId, decision: 'approved' } })).toBe(1);
			expect((await Job.findByPk(q.job.id))!.status).toBe('approved');
			expect(await Payment.count({ where: { jobId: q.job.id } })).toBe(0);

			const fake = await start();
			const first = await startPayment(customer, q.token);
			expect(first.session).toMatch(/^cs_test_/);
			await fake.stop();
			const midway = await startPayment(customer, q.token);
			expect(midway.reply.status).toBe(400);
			expect(midway.reply.text).toContain('The payment service is not answering right now.');

			const back = await start();
			try {
				const resumed = await startPayment(customer, q.token);
				expect(resumed.session).toBe(first.session);
				expect((await payAt(resumed.checkoutUrl!, SUCCEEDS)).status).toBe(303);
				await until('the payment is recorded', async () => (await paymentOf(first.session!))?.status === 'paid');
				expect(await Payment.count({ where: { jobId: q.job.id } })).toBe(1);
			} finally {
				await back.stop();
			}
		} finally {
			await app.stop();
		}
	});
});

describe('roles and shops on the new routes', () => {
	it('the payments page and its CSV are for owners and managers, and show only their shop', async () => {
		const mine = await paidDeposit(shop, uniqueEmail('mine'));
		const theirs = await paidDeposit(other, uniqueEmail('theirs'));
		for (const role of ['owner', 'manager'] as const) {
			const page = await staff[role].get('/payments');
			expect(page.status).toBe(200);
			expect(page.text).toContain(`#${mine.job.number}`);
			expect(page.text).not.toContain(theirs.payment.paymentIntentId!);
			const csv = await staff[role].get('/payments/payments.csv');
			expect(csv.status).toBe(200);
			expect(csv.headers.get('content-type')).toContain('text/csv');
			expect(csv.text).toContain(mine.payment.paymentIntentId!);
			expect(csv.text).not.toContain(theirs.payment.paymentIntentId!);
		}
		for (const role of ['writer', 'technician'] as const) {
			expect((await staff[role].get('/payments')).status).toBe(403);
			expect((await staff[role].get('/payments/payments.csv')).status).toBe(403);
		}
		const anonymous = new Client();
		expect((await anonymous.get('/payments')).status).toBe(303);
		expect((await anonymous.get('/payments/payments.csv')).status).toBe(401);
		expect((await anonymous.get(`/jobs/${mine.job.id}/payments`)).status).toBe(303);

		const filtered = await staff.manager.get('/payments/payments.csv?method=cash');
		expect(filtered.text).not.toContain(mine.payment.paymentIntentId!);
		const bad = await staff.manager.get('/payments/payments.csv?status=bogus');
		expect(bad.status).toBe(400);
		expect(bad.json().issues[0].path).toBe('status');
		const lines = (await staff.manager.get(`/payments/payments.csv?job=${mine.job.number}&kind=deposit`)).text.trim().split('\r\n');
		expect(lines[0].replace(/^\ufeff/, '')).toBe('Created,Job,Customer,Kind,Method,Status,Amount,Refunded,Currency,Reference,Paid at,Checkout session,Payment intent');
		expect(lines).toHaveLength(2);
		expect(lines[1]).toContain(`,${mine.job.number},Tamsin Yarrow,Deposit,Card (online),Paid,${new Dec(mine.payment.amount).toFixed(2)},0.00,USD,`);
	});

	it('every staff role sees the job summary; technicians cannot act; another shop gets nothing', async () => {
		const { job, payment } = await paidDeposit(shop, uniqueEmail('roles'));
		for (const role of ['owner', 'manager', 'writer', 'technician'] as const) {
			const page = await staff[role].get(`/jobs/${job.id}/payments`);
			expect(page.status).toBe(200);
			expect(page.text).toContain(usd(payment.amount));
		}
		const tech = await staff.technician.get(`/jobs/${job.id}/payments`);
		expect(tech.text).not.toContain('data-testid="payment-list"');
		expect(tech.text).not.toContain('Take a payment at the counter');
		const base = `/jobs/${job.id}/payments`;
		expect((await staff.technician.form(`${base}?/recordPayment`, { kind: 'balance', method: 'cash', amount: '5.00', reference: '' })).status).toBe(403);
		expect((await staff.technician.form(`${base}?/sendBalanceLink`, {})).status).toBe(403);
		expect((await staff.technician.form(`${base}?/refund`, { paymentId: payment.id, amount: '1.00', reason: 'No' })).status).toBe(403);

		const outsider = await signedIn(other.staff.manager.email, other.staff.manager.password);
		expect((await outsider.get(base)).status).toBe(404);
		const foreignRecord = await outsider.form(`${base}?/recordPayment`, { kind: 'balance', method: 'cash', amount: '5.00', reference: '' });
		expect([400, 404]).toContain(foreignRecord.status);
		expect((await outsider.form(`${base}?/sendBalanceLink`, {})).status).not.toBe(200);
		// Their own job page, our payment id: not found, nothing refunded.
		const theirJob = await createJob(other);
		const foreignRefund = await outsider.form(`/jobs/${theirJob.job.id}/payments?/refund`, { paymentId: payment.id, amount: '1.00', reason: 'Not theirs' });
		expect(foreignRefund.status).toBe(400);
		expect(foreignRefund.text).toContain('No such payment in your shop.');
		expect(await Payment.count({ where: { jobId: job.id } })).toBe(1);
		expect(await Refund.count({ where: { paymentId: payment.id } })).toBe(0);
		expect(await listMessages({ to: other.staff.manager.email })).toHaveLength(0);
	});

	it('the pay action needs an approved estimate and a link that still works', async () => {
		expect((await new Client().form(`/q/${'x'.repeat(43)}?/pay`, {})).status).toBe(404);
		const declined = await sentQuote(shop);
		const customer = new Client();
		expect((await customer.form(`/q/${declined.token}?/decline`, { reason: 'Buying new' })).status).toBe(303);
		const refused = await startPayment(customer, declined.token);
		expect(refused.reply.status).toBe(400);
		expect(refused.reply.text).toContain('Approve the estimate before paying.');

		const q = await approvedQuote(shop, { email: uniqueEmail('revoked') });
		await quotes.revokeLinks(actor(shop, 'writer'), q.job.id);
		const revoked = await startPayment(new Client(), q.token);
		expect(revoked.reply.status).toBe(400);
		expect(revoked.checkoutUrl).toBeNull();
		expect(await Payment.count({ where: { jobId: { [Op.in]: [q.job.id, declined.job.id] } } })).toBe(0);
	});
});
