// The Stripe webhook: signatures, events stored once, duplicates, late and out-of-order deliveries
// (through the local fake and as signed events made here), amount checks, and 200 concurrent
// deliveries with a third of them repeated.
import { randomBytes, randomUUID } from 'node:crypto';
import Stripe from 'stripe';
import { Op } from 'sequelize';
import { beforeAll, describe, expect, it } from 'vitest';
import { Dec, formatMoney, toMinorUnits } from '../../src/lib/pricing/money';
import { AuditEvent } from '../../src/lib/server/db/models';
import { OutboxMessage } from '../../src/lib/server/db/outbox-model';
import { Payment, PaymentEvent } from '../../src/lib/server/db/payment-models';
import { BASE_URL, Client, signedIn } from '../helpers/client';
import { createShop, uniqueEmail, type ShopFixture } from '../helpers/fixtures';
import {
	SUCCEEDS, approvedQuote, completedSession, control, deliveries, eventId, payAt, postWebhook, signedDelivery, startPayment, until
} from '../helpers/payments';

let shop: ShopFixture;
let other: ShopFixture;

beforeAll(async () => {
	[shop, other] = await Promise.all([createShop('Webhooks'), createShop('Other webhooks')]);
});

const receipts = (jobId: string) => OutboxMessage.count({ where: { jobId, kind: 'payment_receipt' } });
const paymentOf = (session: string) => Payment.findOne({ where: { checkoutSessionId: session } });

/** An approved quote with a checkout session opened at the fake (not paid yet). */
async function openCheckout(target = shop) {
	const q = await approvedQuote(target, { email: uniqueEmail('hook') });
	const started = await startPayment(q.customer, q.token);
	const payment = (await paymentOf(started.session!))!;
	return { ...q, ...started, session: started.session!, checkoutUrl: started.checkoutUrl!, payment };
}

/** Waits until the fake has delivered `count` events for the session and the app took them all. */
async function delivered(session: string, count: number) {
	return until(`${count} deliveries for ${session}`, async () => {
		const list = await deliveries(session);
		return list.length >= count && list.every((d) => d.status === 200) ? list : null;
	});
}

describe('signatures', () => {
	it('a missing, wrong, stale or tampered signature is refused with 400 and changes nothing; a good one is applied at once', async () => {
		const { payment, session } = await openCheckout();
		const expected = toMinorUnits(payment.amount, 'USD');
		const event = { id: eventId(), type: 'checkout.session.completed', object: completedSession(session, expected, 'usd', `pi_test_${randomBytes(6).toString('hex')}`) };
		const good = signedDelivery(event);

		const missing = await postWebhook(good.body, null);
		expect(missing.status).toBe(400);
		expect(missing.body.message).toContain('Stripe-Signature header is missing');
		const otherSecret = signedDelivery(event, `whsec_${randomBytes(16).toString('hex')}`);
		expect((await postWebhook(otherSecret.body, otherSecret.signature)).status).toBe(400);
		expect((await postWebhook(good.body.replace(`"amount_total":${expected}`, `"amount_total":${expected - 1}`), good.signature)).status).toBe(400);
		expect((await postWebhook(good.body, 't=1,v1=deadbeef')).status).toBe(400);
		const stale = Stripe.webhooks.generateTestHeaderString({ payload: good.body, secret: process.env.STRIPE_WEBHOOK_SECRET!, timestamp: Math.floor(Date.now() / 1000) - 3600 });
		expect((await postWebhook(good.body, stale)).status).toBe(400);
		expect((await postWebhook('not json', Stripe.webhooks.generateTestHeaderString({ payload: 'not json', secret: process.env.STRIPE_WEBHOOK_SECRET! }))).status).toBe(400);
		expect(await PaymentEvent.count({ where: { stripeEventId: event.id } })).toBe(0);
		expect((await payment.reload()).status).toBe('pending');

		const started = Date.now();
		const ok = await postWebhook(good.body, good.signature);
		// Answers within the time Stripe allows a webhook, with plenty to spare.
		expect(Date.now() - started).toBeLessThan(3000);
		expect(ok).toMatchObject({ status: 200, body: { received: true, duplicate: false, flagged: false } });
		expect((await payment.reload()).status).toBe('paid');
		const stored = (await PaymentEvent.findOne({ where: { stripeEventId: event.id } }))!;
		expect(stored).toMatchObject({ type: 'checkout.session.completed', shopId: shop.id, paymentId: payment.id, flagged: false });
		expect(stored.processedAt).toBeInstanceOf(Date);
		expect((stored.payload as { data: { object: { id: string } } }).data.object.id).toBe(session);
	});
});

describe('deliveries from the fake: twice, late, out of order', () => {
	it('each event sent three times is stored once and pays once, with one receipt', async () => {
		const { session, checkoutUrl, job } = await openCheckout();
		await control({ session, duplicate: 3 });
		expect((await payAt(checkoutUrl, SUCCEEDS)).status).toBe(303);
		const sent = await delivered(session, 6);
		expect(new Set(sent.map((d) => d.eventId)).size).toBe(2);
		const payment = (await paymentOf(session))!;
		expect(payment.status).toBe('paid');
		expect(await PaymentEvent.count({ where: { paymentId: payment.id } })).toBe(2);
		expect(await receipts(job.id)).toBe(1);
	});

	it('late events find the payment already confirmed by the returning customer, and change nothing', async () => {
		const { session, checkoutUrl, job, customer, token } = await openCheckout();
		await control({ session, delayMs: 2500 });
		const paid = await payAt(checkoutUrl, SUCCEEDS);
		expect((await paymentOf(session))!.status).toBe('pending');
		expect(await deliveries(session)).toHaveLength(0);

		// Back on the link before any webhook: the page asks the payment service and shows it paid.
		const back = await customer.get(paid.location!.replace(BASE_URL, ''));
		expect(back.text).toContain('Payment received');
		expect((await paymentOf(session))!.status).toBe('paid');
		const sent = await delivered(session, 2);
		expect(sent.map((d) => d.status)).toEqual([200, 200]);
		expect(await PaymentEvent.count({ where: { stripeEventId: sent.map((d) => d.eventId) } })).toBe(2);
		expect(await receipts(job.id)).toBe(1);
		expect((await customer.get(`/q/${token}`)).text).toContain('Paid so far');
	});

	it('events in reverse order, and an expiry or a decline after the payment, leave it paid once', async () => {
		const { session, checkoutUrl, job, payment } = await openCheckout();
		await control({ session, reverseOrder: true });
		await payAt(checkoutUrl, SUCCEEDS);
		const sent = await delivered(session, 2);
		expect(sent.map((d) => d.type)).toEqual(['payment_intent.succeeded', 'checkout.session.completed']);
		await payment.reload();
		expect(payment.status).toBe('paid');
		const paidAt = payment.paidAt!.getTime();

		const expired = signedDelivery({ type: 'checkout.session.expired', object: { id: session, object: 'checkout.session', status: 'expired', payment_status: 'unpaid', metadata: {} } });
		expect((await postWebhook(expired.body, expired.signature)).status).toBe(200);
		const failed = signedDelivery({
			type: 'payment_intent.payment_failed',
			object: { id: payment.paymentIntentId, object: 'payment_intent', status: 'requires_payment_method', amount_received: 0, currency: 'usd', metadata: { payment_id: payment.id }, last_payment_error: { message: 'Your card was declined.' } }
		});
		expect((await postWebhook(failed.body, failed.signature)).status).toBe(200);
		await payment.reload();
		expect(payment).toMatchObject({ status: 'paid', lastError: null });
		expect(payment.paidAt!.getTime()).toBe(paidAt);
		expect(await receipts(job.id)).toBe(1);
	});

	it('a completion that arrives after an expiry still records the money that was taken', async () => {
		const { session, payment } = await openCheckout();
		const expired = signedDelivery({ type: 'checkout.session.expired', object: { id: session, object: 'checkout.session', status: 'expired', payment_status: 'unpaid', metadata: {} } });
		expect((await postWebhook(expired.body, expired.signature)).status).toBe(200);
		expect((await payment.reload()).status).toBe('failed');
		const completed = signedDelivery({ type: 'checkout.session.completed', object: completedSession(session, toMinorUnits(payment.amount, 'USD'), 'usd', 'pi_test_latecomer') });
		expect((await postWebhook(completed.body, completed.signature)).status).toBe(200);
		expect(await payment.reload()).toMatchObject({ status: 'paid', paymentIntentId: 'pi_test_latecomer' });
	});
});

describe('amounts that do not match', () => {
	it('are flagged for the manager, never marked paid, and can be marked as checked by a manager only', async () => {
		const { session, payment, job } = await openCheckout();
		const expected = toMinorUnits(payment.amount, 'USD');
		const more = signedDelivery({ type: 'checkout.session.completed', object: completedSession(session, expected + 100, 'usd', 'pi_test_mismatch') });
		const reply = await postWebhook(more.body, more.signature);
		expect(reply).toMatchObject({ status: 200, body: { received: true, flagged: true } });
		const wrongCurrency = signedDelivery({ type: 'checkout.session.completed', object: completedSession(session, expected, 'eur', 'pi_test_mismatch') });
		expect((await postWebhook(wrongCurrency.body, wrongCurrency.signature)).body.flagged).toBe(true);
		await payment.reload();
		expect(payment.status).toBe('pending');
		expect(payment.paidAt).toBeNull();
		expect(await receipts(job.id)).toBe(0);

		const flagged = await PaymentEvent.findAll({ where: { paymentId: payment.id, flagged: true }, order: [['receivedAt', 'ASC']] });
		expect(flagged).toHaveLength(2);
		const shown = (minor: number) => formatMoney(new Dec(minor).div(100), 'USD'); // USD: 100 cents to the dollar
		expect(flagged[0].flagReason).toBe(
			`Amount mismatch: Stripe reported ${shown(expected + 100)} but ${shown(expected)} was expected. Not marked paid; check the payment in Stripe.`
		);
		expect(flagged[1].flagReason).toContain('Stripe reported €');

		const manager = await signedIn(shop.staff.manager.email, shop.staff.manager.password);
		const page = await manager.get('/payments');
		expect(page.text).toContain('Needs checking');
		expect(page.text).toContain(`Stripe reported ${shown(expected + 100)}`);
		const writer = await signedIn(shop.staff.writer.email, shop.staff.writer.password);
		expect((await writer.form('/payments?/resolve', { eventId: flagged[0].id })).status).toBe(403);
		const outsider = await signedIn(other.staff.owner.email, other.staff.owner.password);
		expect((await outsider.form('/payments?/resolve', { eventId: flagged[0].id })).status).toBe(400);
		expect((await outsider.get('/payments')).text).not.toContain('Stripe reported');
		expect((await manager.form('/payments?/resolve', { eventId: flagged[0].id })).status).toBe(200);
		expect((await flagged[0].reload()).resolvedBy).toBe(shop.staff.manager.id);
		expect((await manager.get('/payments')).text).not.toContain(`Stripe reported ${shown(expected + 100)}`);
	});

	it('an event for a checkout Mendwise does not know is flagged when it carries our metadata, and ignored otherwise', async () => {
		const ours = signedDelivery({ type: 'checkout.session.completed', object: completedSession('cs_test_unknown_ours', 500, 'usd', 'pi_test_x', { payment_id: randomUUID(), shop_id: shop.id }) });
		expect((await postWebhook(ours.body, ours.signature)).body.flagged).toBe(true);
		const stranger = signedDelivery({ type: 'checkout.session.completed', object: completedSession('cs_test_unknown_theirs', 500, 'usd', 'pi_test_y') });
		expect((await postWebhook(stranger.body, stranger.signature)).body).toMatchObject({ received: true, flagged: false });
		const unknownType = signedDelivery({ type: 'customer.created', object: { id: 'cus_test_1', object: 'customer' } });
		expect((await postWebhook(unknownType.body, unknownType.signature)).status).toBe(200);
		const flagged = await PaymentEvent.findOne({ where: { shopId: shop.id, flagReason: { [Op.like]: '%cs_test_unknown_ours%' } } });
		expect(flagged?.flagged).toBe(true);
	});
});

describe('under load', () => {
	it('200 concurrent deliveries, a third of them repeats, make exactly one payment per checkout', async () => {
		const email = uniqueEmail('load');
		const q = await approvedQuote(shop, { email });
		const checkouts = 66;
		const tag = randomBytes(4).toString('hex');
		const made = await Payment.bulkCreate(
			Array.from({ length: checkouts }, (_, i) => ({
				shopId: shop.id,
				jobId: q.job.id,
				quoteId: q.link.quoteId,
				kind: 'deposit' as const,
				method: 'card' as const,
				amount: '1.00',
				currency: 'USD',
				checkoutSessionId: `cs_test_load_${tag}_${i}`,
				createdBy: null
			}))
		);
		const unique = made.flatMap((p, i) => {
			const intent = `pi_test_load_${tag}_${i}`;
			return [
				signedDelivery({ type: 'checkout.session.completed', object: completedSession(p.checkoutSessionId!, 100, 'usd', intent) }),
				signedDelivery({
					type: 'payment_intent.succeeded',
					object: { id: intent, object: 'payment_intent', amount: 100, amount_received: 100, currency: 'usd', status: 'succeeded', metadata: { payment_id: p.id } }
				})
			];
		});
		expect(unique).toHaveLength(132);
		const repeats = unique.slice(0, 68);
		const all = [...unique, ...repeats].map((d, i) => ({ d, key: (i * 7919) % 200 })).sort((a, b) => a.key - b.key).map((x) => x.d);
		expect(all).toHaveLength(200);

		const replies = await Promise.all(all.map((d) => postWebhook(d.body, d.signature)));
		expect(replies.filter((r) => r.status !== 200)).toEqual([]);
		expect(replies.filter((r) => r.body.duplicate).length).toBe(68);
		expect(replies.filter((r) => r.body.flagged).length).toBe(0);

		const ids = unique.map((d) => (JSON.parse(d.body) as { id: string }).id);
		expect(await PaymentEvent.count({ where: { stripeEventId: ids } })).toBe(132);
		expect(await PaymentEvent.count({ where: { stripeEventId: ids, processedAt: null } })).toBe(0);
		const payments = await Payment.findAll({ where: { jobId: q.job.id } });
		expect(payments).toHaveLength(checkouts);
		expect(payments.every((p) => p.status === 'paid' && p.paidAt && p.paymentIntentId?.startsWith(`pi_test_load_${tag}_`))).toBe(true);
		expect(await receipts(q.job.id)).toBe(checkouts);
		expect(await AuditEvent.count({ where: { entityId: q.job.id, action: 'payment.received' } })).toBe(checkouts);
		const page = await new Client().get(`/q/${q.token}`);
		expect(page.text).toContain('$66.00');
	});
});
