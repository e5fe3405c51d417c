// Stripe's webhook: verified, stored once by event id, applied under the payment's row lock, all
// in one transaction. A repeated delivery finds its id already stored and changes nothing; if
// applying fails, nothing is stored and Stripe delivers it again.
import Stripe from 'stripe';
import { QueryTypes, type Transaction } from 'sequelize';
import { Dec } from '../../pricing/money';
import { db } from '../db';
import { Shop } from '../db/models';
import { Payment, PaymentEvent, Refund } from '../db/payment-models';
import { isUuid } from '../validators';
import { markFailed, noteDecline, settleIntent, settleSession, statusAfterRefunds, type Outcome } from './settle';
import { webhookSecret } from './stripe';

/** The request is not a genuine Stripe event for this endpoint: answer 400, change nothing. */
export class WebhookRejected extends Error {}
/** This instance has no webhook secret, so it cannot check anything: answer 503. */
export class WebhookNotConfigured extends Error {}
/** The event is ours but what it refers to is still being written: answer 503, Stripe retries. */
export class WebhookRetryLater extends Error {}

interface Applied extends Outcome {
	shopId: string | null;
	paymentId: string | null;
}

type Metadata = Record<string, string> | null | undefined;

export function verify(rawBody: string, signature: string | null): Stripe.Event {
	const secret = webhookSecret();
	if (!secret) throw new WebhookNotConfigured('STRIPE_WEBHOOK_SECRET is not set on this server.');
	if (!signature) throw new WebhookRejected('The Stripe-Signature header is missing.');
	let event: Stripe.Event;
	try {
		event = Stripe.webhooks.constructEvent(rawBody, signature, secret);
	} catch {
		throw new WebhookRejected('The signature does not match this endpoint: check STRIPE_WEBHOOK_SECRET, or the event is too old.');
	}
	const object = (event as { data?: { object?: unknown } }).data?.object;
	if (typeof event.id !== 'string' || !event.id || event.id.length > 255 || typeof event.type !== 'string' || !object || typeof object !== 'object') {
		throw new WebhookRejected('The body is not a Stripe event.');
	}
	return event;
}

async function shopFromMetadata(metadata: Metadata, transaction: Transaction): Promise<string | null> {
	const id = metadata?.shop_id;
	if (!id || !isUuid(id)) return null;
	return (await Shop.findByPk(id, { attributes: ['id'], transaction })) ? id : null;
}

const lockBy = (where: Record<string, string>, transaction: Transaction) =>
	Payment.findOne({ where: { ...where, method: 'card' }, lock: transaction.LOCK.UPDATE, transaction });

async function lockForIntent(intent: Stripe.PaymentIntent, transaction: Transaction) {
	const byIntent = await lockBy({ paymentIntentId: intent.id }, transaction);
	if (byIntent) return byIntent;
	const id = intent.metadata?.payment_id;
	return id && isUuid(id) ? lockBy({ id }, transaction) : null;
}

const found = (payment: Payment, outcome: Outcome): Applied => ({ shopId: payment.shopId, paymentId: payment.id, ...outcome });

/** An event that should have matched one of our payments (it carries our metadata) but did not. */
async function unmatched(metadata: Metadata, what: string, transaction: Transaction): Promise<Applied> {
	const ours = Boolean(metadata?.payment_id);
	return { shopId: await shopFromMetadata(metadata, transaction), paymentId: null, ...(ours ? { flag: `No payment in Mendwise matches ${what}.` } : {}) };
}

async function applyRefundUpdate(object: Stripe.Refund, sentAt: number, transaction: Transaction): Promise<Applied> {
	const refund = await Refund.findOne({ where: { stripeRefundId: object.id }, transaction });
	if (!refund) {
		// Stripe may announce a refund before the request that made it has been recorded here.
		if (object.metadata?.refund_id) {
			if (Date.now() / 1000 - sentAt < 600) throw new WebhookRetryLater(`Refund ${object.id} is not recorded yet.`);
			return unmatched(object.metadata, `refund ${object.id}`, transaction);
		}
		return { shopId: await shopFromMetadata(object.metadata, transaction), paymentId: null };
	}
	const payment = (await Payment.findByPk(refund.paymentId, { lock: transaction.LOCK.UPDATE, transaction }))!;
	await refund.reload({ lock: transaction.LOCK.UPDATE, transaction });
	if (object.status === 'succeeded' && refund.status === 'pending') await refund.update({ status: 'succeeded' }, { transaction });
	if ((object.status === 'failed' || object.status === 'canceled') && refund.status !== 'failed') {
		const refunded = new Dec(payment.refundedAmount).minus(refund.amount);
		await refund.update({ status: 'failed' }, { transaction });
		await payment.update({ refundedAmount: refunded.toFixed(4), status: statusAfterRefunds(payment, refunded) }, { transaction });
		return found(payment, { flag: `Refund ${object.id} of ${refund.amount} ${refund.currency} failed at Stripe; the customer did not get the money back.` });
	}
	return found(payment, {});
}

async function apply(event: Stripe.Event, transaction: Transaction): Promise<Applied> {
	switch (event.type) {
		case 'checkout.session.completed':
		case 'checkout.session.async_payment_succeeded':
		case 'checkout.session.expired':
		case 'checkout.session.async_payment_failed': {
			const session = event.data.object as Stripe.Checkout.Session;
			const payment = await lockBy({ checkoutSessionId: session.id }, transaction);
			if (!payment) return unmatched(session.metadata, `checkout session ${session.id}`, transaction);
			if (event.type === 'checkout.session.expired') return found(payment, await markFailed(payment, 'The payment page expired before payment. Start again from your link.', transaction));
			if (event.type === 'checkout.session.async_payment_failed') return found(payment, await markFailed(payment, 'The bank did not complete the payment.', transaction));
			return found(payment, await settleSession(payment, session, transaction));
		}
		case 'payment_intent.succeeded':
		case 'payment_intent.payment_failed': {
			const intent = event.data.object as Stripe.PaymentIntent;
			const payment = await lockForIntent(intent, transaction);
			if (!payment) return unmatched(intent.metadata, `payment ${intent.id}`, transaction);
			if (event.type === 'payment_intent.succeeded') return found(payment, await settleIntent(payment, intent, transaction));
			const message = intent.last_payment_error?.message ?? 'The card was declined.';
			return found(payment, await noteDecline(payment, `${message} No money was taken.`, intent.id, transaction));
		}
		case 'refund.created':
		case 'refund.updated':
		case 'refund.failed':
			return applyRefundUpdate(event.data.object as Stripe.Refund, event.created, transaction);
		default: {
			const metadata = (event.data.object as { metadata?: Metadata }).metadata;
			return { shopId: await shopFromMetadata(metadata, transaction), paymentId: null };
		}
	}
}

export interface WebhookResult {
	eventId: string;
	duplicate: boolean;
	flagged: boolean;
}

/** Verifies, stores once and applies one delivery. Throws WebhookRejected for a bad signature. */
export async function handleWebhook(rawBody: string, signature: string | null): Promise<WebhookResult> {
	const event = verify(rawBody, signature);
	return db().transaction(async (transaction) => {
		// A concurrent delivery of the same id waits here on the unique index until this one ends.
		const inserted = await db().query<{ id: string }>(
			`INSERT INTO payment_events (stripe_event_id, type, payload) VALUES (:id, :type, CAST(:payload AS jsonb))
			 ON CONFLICT (stripe_event_id) DO NOTHING RETURNING id`,
			{ replacements: { id: event.id, type: event.type.slice(0, 100), payload: JSON.stringify(event) }, type: QueryTypes.SELECT, transaction }
		);
		if (inserted.length === 0) return { eventId: event.id, duplicate: true, flagged: false };
		const applied = await apply(event, transaction);
		await PaymentEvent.update(
			{ processedAt: new Date(), shopId: applied.shopId, paymentId: applied.paymentId, flagged: Boolean(applied.flag), flagReason: applied.flag?.slice(0, 500) ?? null },
			{ where: { id: inserted[0].id }, transaction }
		);
		if (applied.flag) console.warn(`[payments] event ${event.id} (${event.type}) flagged: ${applied.flag}`);
		return { eventId: event.id, duplicate: false, flagged: Boolean(applied.flag) };
	});
}
