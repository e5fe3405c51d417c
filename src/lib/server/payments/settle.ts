// How evidence from Stripe changes one payment, always under that payment's row lock. "Paid" is
// final: a late decline, an expiry or a repeated event after it changes nothing, and money that
// does not match what was asked is flagged for the manager instead of being accepted.
import type Stripe from 'stripe';
import type { Transaction } from 'sequelize';
import { Dec, fromMinorUnits, toMinorUnits } from '../../pricing/money';
import * as audit from '../audit';
import type { Payment } from '../db/payment-models';
import { SETTLED, money, summaryFor } from './ledger';
import { queueReceipt } from './mail';

/** What applying an event found that a person should look at; nothing when all is well. */
export interface Outcome {
	flag?: string;
}

interface Evidence {
	amountMinor: number | null | undefined;
	currency: string | null | undefined;
	paymentIntentId: string | null;
}

function describeMinor(amountMinor: number | null | undefined, currency: string): string {
	if (typeof amountMinor !== 'number') return `no amount in ${currency || 'no currency'}`;
	try {
		return money(fromMinorUnits(amountMinor, currency), currency);
	} catch {
		return `${amountMinor} minor units of "${currency}"`;
	}
}

const intentOf = (value: string | { id: string } | null | undefined) => (typeof value === 'string' ? value : (value?.id ?? null));

export async function markPaid(payment: Payment, evidence: Evidence, transaction: Transaction): Promise<Outcome> {
	if (SETTLED.includes(payment.status)) {
		if (evidence.paymentIntentId && payment.paymentIntentId && evidence.paymentIntentId !== payment.paymentIntentId) {
			return { flag: `A second charge (${evidence.paymentIntentId}) arrived for a checkout already paid by ${payment.paymentIntentId}. Check Stripe and refund one.` };
		}
		return {};
	}
	const currency = (evidence.currency ?? '').toUpperCase();
	const expected = toMinorUnits(payment.amount, payment.currency);
	if (evidence.amountMinor !== expected || currency !== payment.currency) {
		await payment.update(
			{ lastError: 'The shop is checking this payment.', paymentIntentId: payment.paymentIntentId ?? evidence.paymentIntentId },
			{ transaction }
		);
		return {
			flag: `Amount mismatch: Stripe reported ${describeMinor(evidence.amountMinor, currency)} but ${money(payment.amount, payment.currency)} was expected. Not marked paid; check the payment in Stripe.`
		};
	}
	await payment.update(
		{ status: 'paid', paidAt: new Date(), paymentIntentId: evidence.paymentIntentId ?? payment.paymentIntentId, lastError: null },
		{ transaction }
	);
	const { summary } = await summaryFor(payment.shopId, payment.jobId, transaction);
	await audit.record(
		{
			shopId: payment.shopId,
			userId: null,
			action: 'payment.received',
			entity: 'job',
			entityId: payment.jobId,
			detail: { paymentId: payment.id, kind: payment.kind, method: payment.method, amount: payment.amount, currency: payment.currency }
		},
		transaction
	);
	const owed = summary.owed && !summary.owed.isZero() ? money(summary.owed, summary.currency) : null;
	await queueReceipt(payment, owed, transaction);
	if (summary.total && summary.paid.gt(summary.total)) {
		return { flag: `The job is now paid ${money(summary.paid, summary.currency)} against an approved total of ${money(summary.total, summary.currency)}. Refund the difference.` };
	}
	return {};
}

export function settleSession(payment: Payment, session: Stripe.Checkout.Session, transaction: Transaction): Promise<Outcome> {
	const paymentIntentId = intentOf(session.payment_intent);
	if (session.payment_status !== 'paid') {
		// Completed but not yet paid (a bank debit still clearing): remember the intent, wait.
		if (paymentIntentId && !payment.paymentIntentId) return payment.update({ paymentIntentId }, { transaction }).then(() => ({}));
		return Promise.resolve({});
	}
	return markPaid(payment, { amountMinor: session.amount_total, currency: session.currency, paymentIntentId }, transaction);
}

export function settleIntent(payment: Payment, intent: Stripe.PaymentIntent, transaction: Transaction): Promise<Outcome> {
	return markPaid(payment, { amountMinor: intent.amount_received, currency: intent.currency, paymentIntentId: intent.id }, transaction);
}

/** Ends a payment that never happened (page expired, bank refused); paid payments stay paid. */
export async function markFailed(payment: Payment, reason: string, transaction: Transaction): Promise<Outcome> {
	if (payment.status === 'pending') await payment.update({ status: 'failed', lastError: reason }, { transaction });
	return {};
}

/** A declined card: the payment page stays open for another card, so the payment stays pending. */
export async function noteDecline(payment: Payment, message: string, paymentIntentId: string, transaction: Transaction): Promise<Outcome> {
	if (payment.status === 'pending') {
		await payment.update({ lastError: message.slice(0, 500), paymentIntentId: payment.paymentIntentId ?? paymentIntentId }, { transaction });
	}
	return {};
}

/** The payment's status from how much of it went back. */
export function statusAfterRefunds(payment: Payment, refunded: InstanceType<typeof Dec>) {
	if (refunded.isZero()) return 'paid' as const;
	return refunded.gte(payment.amount) ? ('refunded' as const) : ('partially_refunded' as const);
}
