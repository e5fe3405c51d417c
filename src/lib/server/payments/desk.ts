// What the shop does with money by hand: payments taken at the counter, the balance e-mail, and
// refunds (through Stripe for card payments).
import { createHash, randomBytes, randomUUID } from 'node:crypto';
import { z } from 'zod';
import type { RoleName } from '../../roles';
import { Dec, currencyDigits, toMinorUnits, type Decimal } from '../../pricing/money';
import * as audit from '../audit';
import { db } from '../db';
import { Customer, Job, QuoteLink } from '../db/models';
import { Payment, Refund, type RefundStatus } from '../db/payment-models';
import { UserError } from '../errors';
import { isUuid, optionalText, requiredText } from '../validators';
import { SETTLED, fixed, money, summaryFor } from './ledger';
import { METHOD_LABELS, queueBalanceLink, queueReceipt, queueRefundNotice } from './mail';
import { statusAfterRefunds } from './settle';
import { configured, explain, stripe } from './stripe';

interface Actor {
	id: string;
	shopId: string;
	role: RoleName;
}

const amountText = (what: string) =>
	z
		.string({ error: `Enter ${what}.` })
		.trim()
		.min(1, `Enter ${what}.`)
		.regex(/^\d{1,10}(\.\d{1,4})?$/, `Enter ${what} as a number like 120.50.`);

export const counterSchema = z.object({
	kind: z.enum(['deposit', 'balance'], { error: 'Choose whether this is the deposit or the balance.' }),
	method: z.enum(['cash', 'terminal', 'cheque'], { error: 'Choose how the customer paid.' }),
	amount: amountText('the amount received'),
	reference: optionalText(120, 'The reference')
});
export type CounterInput = z.infer<typeof counterSchema>;

export const refundSchema = z.object({
	paymentId: z.uuid({ error: 'Choose the payment to refund.' }),
	amount: amountText('the amount to refund'),
	reason: requiredText(500, 'Say why the money goes back; the customer sees it.')
});
export type RefundInput = z.infer<typeof refundSchema>;

/** An amount typed at the desk, checked against the currency's minor unit. */
function amountIn(text: string, currency: string, field: string): Decimal {
	const value = new Dec(text);
	if (value.isZero()) throw new UserError('The amount must be more than zero.', field);
	const digits = currencyDigits(currency);
	if (value.decimalPlaces() > digits) {
		throw new UserError(digits === 0 ? `${currency} has no decimals: enter whole amounts.` : `${currency} amounts have at most ${digits} decimals.`, field);
	}
	return value;
}

async function jobOf(shopId: string, jobId: string) {
	const job = isUuid(jobId) ? await Job.findOne({ where: { id: jobId, shopId } }) : null;
	if (!job) throw new UserError('No such job in your shop.');
	return job;
}

/** Money taken at the counter (cash, card terminal, cheque), recorded as paid with its reference. */
export async function recordCounterPayment(actor: Actor, jobId: string, input: CounterInput) {
	const job = await jobOf(actor.shopId, jobId);
	if (input.method !== 'cash' && !input.reference) {
		throw new UserError(input.method === 'cheque' ? 'Enter the cheque number.' : 'Enter the slip or approval number from the card terminal.', 'reference');
	}
	return db().transaction(async (transaction) => {
		// The job row lock keeps two desks from recording past what is owed at the same moment.
		await Job.findOne({ where: { id: job.id, shopId: actor.shopId }, lock: transaction.LOCK.UPDATE, transaction });
		const { terms, summary } = await summaryFor(actor.shopId, job.id, transaction);
		const amount = amountIn(input.amount, summary.currency, 'amount');
		if (summary.owed && amount.gt(summary.owed)) {
			throw new UserError(`That is more than the ${money(summary.owed, summary.currency)} still owed on this job.`, 'amount');
		}
		const payment = await Payment.create(
			{
				shopId: actor.shopId,
				jobId: job.id,
				quoteId: terms.quote?.id ?? null,
				kind: input.kind,
				method: input.method,
				amount: fixed(amount, summary.currency),
				currency: summary.currency,
				status: 'paid',
				reference: input.reference,
				createdBy: actor.id,
				paidAt: new Date()
			},
			{ transaction }
		);
		await audit.record(
			{ shopId: actor.shopId, userId: actor.id, action: 'payment.recorded', entity: 'job', entityId: job.id, detail: { paymentId: payment.id, kind: input.kind, method: input.method, amount: payment.amount } },
			transaction
		);
		const after = summary.owed ? summary.owed.minus(amount) : null;
		const receipt = await queueReceipt(payment, after && !after.isZero() ? money(after, summary.currency) : null, transaction);
		return { payment, receipt, label: METHOD_LABELS[input.method] };
	});
}

const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');
const BALANCE_LINK_DAYS = 30;

/**
 * E-mails the customer a fresh link to their approved estimate, where they pay what is owed. The
 * payment page itself is opened only when they tap "Pay", so the e-mail never holds a page that
 * expires.
 */
export async function sendBalanceLink(actor: Actor, jobId: string, origin: string) {
	const job = await jobOf(actor.shopId, jobId);
	if (job.status !== 'ready') throw new UserError('The balance link goes out once the job is ready for pick-up.');
	if (!configured()) throw new UserError('Online payment is not set up, so there is nothing to link to. Take the balance at the counter.');
	const customer = await Customer.findOne({ where: { id: job.customerId, shopId: actor.shopId }, attributes: ['email'] });
	if (!customer?.email) throw new UserError('The customer has no e-mail address. Add one on the customer page, or take the balance at the counter.');
	return db().transaction(async (transaction) => {
		const { terms, summary } = await summaryFor(actor.shopId, job.id, transaction);
		if (terms.approval?.decision !== 'approved' || !terms.version) throw new UserError('This job has no approved estimate to take a payment against.');
		if (!summary.owed || summary.owed.isZero()) throw new UserError('Nothing is owed on this job.');
		const token = randomBytes(32).toString('base64url');
		await QuoteLink.create(
			{
				shopId: actor.shopId,
				quoteId: terms.quote!.id,
				versionId: terms.version.id,
				tokenHash: sha256(token),
				expiresAt: new Date(Date.now() + BALANCE_LINK_DAYS * 86_400_000)
			},
			{ transaction }
		);
		const balance = money(summary.owed, summary.currency);
		const to = await queueBalanceLink(actor.shopId, job.id, balance, `${origin}/q/${token}`, transaction);
		await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'payment.balance_link_sent', entity: 'job', entityId: job.id, detail: { balance: fixed(summary.owed, summary.currency), to } }, transaction);
		return { to, balance };
	});
}

const STRIPE_REFUND_STATUS: Record<string, RefundStatus> = { succeeded: 'succeeded', pending: 'pending', requires_action: 'pending', failed: 'failed', canceled: 'failed' };

/**
 * Gives money back: card payments through Stripe (the refund is recorded only when Stripe accepts
 * it), counter payments recorded as handed back. Under the payment's row lock, so two refunds can
 * never together exceed what was paid.
 */
export async function refund(actor: Actor, paymentId: string, input: Omit<RefundInput, 'paymentId'>, jobId?: string) {
	if (!isUuid(paymentId) || (jobId !== undefined && !isUuid(jobId))) throw new UserError('No such payment in your shop.');
	try {
		return await db().transaction(async (transaction) => {
			const payment = await Payment.findOne({ where: { id: paymentId, shopId: actor.shopId, ...(jobId ? { jobId } : {}) }, lock: transaction.LOCK.UPDATE, transaction });
			if (!payment) throw new UserError('No such payment in your shop.');
			if (!SETTLED.includes(payment.status) || payment.status === 'refunded') {
				throw new UserError(payment.status === 'refunded' ? 'This payment was already refunded in full.' : 'Only a payment that was received can be refunded.');
			}
			const amount = amountIn(input.amount, payment.currency, 'amount');
			const left = new Dec(payment.amount).minus(payment.refundedAmount);
			if (amount.gt(left)) throw new UserError(`At most ${money(left, payment.currency)} of this payment can still be refunded.`, 'amount');
			const refundId = randomUUID();
			let stripeRefundId: string | null = null;
			let status: RefundStatus = 'succeeded';
			if (payment.method === 'card') {
				if (!payment.paymentIntentId) throw new UserError('Stripe has not told us which charge paid this; refund it from the Stripe dashboard.');
				const made = await stripe().refunds.create(
					{
						payment_intent: payment.paymentIntentId,
						amount: toMinorUnits(amount, payment.currency),
						reason: 'requested_by_customer',
						metadata: { refund_id: refundId, payment_id: payment.id, shop_id: payment.shopId, job_id: payment.jobId, reason: input.reason.slice(0, 500) }
					},
					{ idempotencyKey: `mendwise-refund-${refundId}` }
				);
				stripeRefundId = made.id;
				status = STRIPE_REFUND_STATUS[made.status ?? 'pending'] ?? 'pending';
				if (status === 'failed') throw new UserError('Stripe refused the refund. Nothing was refunded; check the payment in Stripe.');
			}
			const row = await Refund.create(
				{ id: refundId, shopId: actor.shopId, paymentId: payment.id, amount: fixed(amount, payment.currency), currency: payment.currency, reason: input.reason, stripeRefundId, status, createdBy: actor.id },
				{ transaction }
			);
			const refunded = new Dec(payment.refundedAmount).plus(amount);
			await payment.update({ refundedAmount: refunded.toFixed(4), status: statusAfterRefunds(payment, refunded) }, { transaction });
			await audit.record(
				{ shopId: actor.shopId, userId: actor.id, action: 'payment.refunded', entity: 'job', entityId: payment.jobId, detail: { paymentId: payment.id, refundId, amount: row.amount, reason: input.reason } },
				transaction
			);
			const notified = await queueRefundNotice(payment, row, transaction);
			return { refund: row, payment, notified };
		});
	} catch (e) {
		if (e instanceof UserError) throw e;
		throw explain(e, false);
	}
}
