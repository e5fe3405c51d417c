// Card payments the customer makes from their link: a Stripe Checkout Session per attempt, for the
// deposit after approval or for what is owed once the job is ready.
import { randomUUID } from 'node:crypto';
import type Stripe from 'stripe';
import type { Transaction } from 'sequelize';
import { Dec, toMinorUnits, type Decimal } from '../../pricing/money';
import { db } from '../db';
import { Customer, Job, Quote } from '../db/models';
import { Payment, type PaymentKind } from '../db/payment-models';
import { UserError } from '../errors';
import * as quotes from '../quotes';
import { fixed, money, summaryFor, summaryJson, type Summary } from './ledger';
import { PaymentsUnavailable, configured, explain, isLocalFake, stripe } from './stripe';
import { settleSession } from './settle';

type Found = NonNullable<Awaited<ReturnType<typeof quotes.byToken>>>;

/** A session older than this is not offered again; Stripe ends them after 24 hours. */
const REUSE_MS = 23 * 3_600_000;
const READY: string[] = ['ready', 'picked_up'];

/** What the customer can pay now: the deposit before the work, what is owed once it is ready. */
export function dueNow(summary: Summary, jobStatus: string): { kind: PaymentKind; amount: Decimal } | null {
	if (summary.owed === null) return null;
	if (READY.includes(jobStatus)) return summary.owed.isPositive() && !summary.owed.isZero() ? { kind: 'balance', amount: summary.owed } : null;
	if (jobStatus === 'declined') return null;
	return summary.depositOwed.isPositive() && !summary.depositOwed.isZero() ? { kind: 'deposit', amount: summary.depositOwed } : null;
}

async function findOpen(token: string) {
	const found = await quotes.byToken(token);
	if (!found) throw new UserError('This link is not valid.');
	if (found.state === 'revoked') throw new UserError('This link was withdrawn by the shop. Please contact the shop.');
	if (found.approval?.decision !== 'approved') throw new UserError('Approve the estimate before paying.');
	return found;
}

function sessionParams(input: {
	paymentId: string;
	kind: PaymentKind;
	amount: Decimal;
	currency: string;
	job: Job;
	quote: Quote;
	optionLabel: string | null;
	email: string;
	returnTo: string;
}): Stripe.Checkout.SessionCreateParams {
	const metadata = {
		payment_id: input.paymentId,
		kind: input.kind,
		shop_id: input.job.shopId,
		job_id: input.job.id,
		job_number: String(input.job.number),
		quote_id: input.quote.id
	};
	const what = input.kind === 'deposit' ? 'Deposit' : 'Balance';
	return {
		mode: 'payment',
		line_items: [
			{
				quantity: 1,
				price_data: {
					currency: input.currency.toLowerCase(),
					// The only place an amount leaves as minor units, converted by the engine's helper.
					unit_amount: toMinorUnits(input.amount, input.currency),
					product_data: { name: `${what} for job #${input.job.number}`, ...(input.optionLabel ? { description: input.optionLabel } : {}) }
				}
			}
		],
		success_url: `${input.returnTo}?payment=done&session_id={CHECKOUT_SESSION_ID}`,
		cancel_url: `${input.returnTo}?payment=cancelled`,
		client_reference_id: input.paymentId,
		...(input.email ? { customer_email: input.email } : {}),
		metadata,
		payment_intent_data: { metadata, description: `${what} for job #${input.job.number}` }
	};
}

/** An open session of this job for the same amount, to send the customer back to instead of a new one. */
async function reusable(job: Job, kind: PaymentKind, amount: Decimal, returnTo: string, transaction: Transaction): Promise<string | null> {
	const pending = await Payment.findOne({
		where: { shopId: job.shopId, jobId: job.id, method: 'card', kind, status: 'pending' },
		order: [['createdAt', 'DESC']],
		lock: transaction.LOCK.UPDATE,
		transaction
	});
	if (!pending || !new Dec(pending.amount).eq(amount) || Date.now() - pending.createdAt.getTime() > REUSE_MS) return null;
	const session = await stripe().checkout.sessions.retrieve(pending.checkoutSessionId!);
	if (session.status === 'open' && session.url) return session.url;
	if (session.status === 'expired') await pending.update({ status: 'failed', lastError: 'The payment page expired before payment.' }, { transaction });
	if (session.status === 'complete') {
		// Paid while the webhook is still on its way: back to the link, which shows it paid.
		await settleSession(pending, session, transaction);
		return `${returnTo}?payment=done&session_id=${encodeURIComponent(session.id)}`;
	}
	return null;
}

/**
 * Starts (or resumes) the card payment due on the customer's link and returns the address of the
 * payment page. Under the quote's row lock, so a double tap never opens two payments.
 */
export async function startCheckout(token: string, origin: string): Promise<string> {
	const found = await findOpen(token);
	if (!configured()) throw new PaymentsUnavailable('Online payment is not set up at this shop yet. Please pay at the counter.');
	try {
		return await db().transaction(async (transaction) => {
			const quote = (await Quote.findOne({ where: { id: found.quote.id, shopId: found.quote.shopId }, lock: transaction.LOCK.UPDATE, transaction }))!;
			const job = (await Job.findOne({ where: { id: quote.jobId, shopId: quote.shopId }, transaction }))!;
			const { terms, summary } = await summaryFor(quote.shopId, job.id, transaction);
			const due = dueNow(summary, job.status);
			if (!due) throw new UserError('Nothing is due on this job right now. Thank you!');
			const returnTo = `${origin}/q/${token}`;
			const again = await reusable(job, due.kind, due.amount, returnTo, transaction);
			if (again) return again;
			const customer = await Customer.findOne({ where: { id: job.customerId, shopId: job.shopId }, attributes: ['email'], transaction });
			const paymentId = randomUUID();
			const session = await stripe().checkout.sessions.create(
				sessionParams({
					paymentId,
					kind: due.kind,
					amount: due.amount,
					currency: summary.currency,
					job,
					quote,
					optionLabel: terms.option?.label ?? null,
					email: customer?.email ?? '',
					returnTo
				}),
				{ idempotencyKey: `mendwise-checkout-${paymentId}` }
			);
			if (!session.url) throw new PaymentsUnavailable('The payment service gave no payment page. Nothing was charged; please try again.');
			await Payment.create(
				{
					id: paymentId,
					shopId: job.shopId,
					jobId: job.id,
					quoteId: quote.id,
					kind: due.kind,
					method: 'card',
					amount: fixed(due.amount, summary.currency),
					currency: summary.currency,
					checkoutSessionId: session.id,
					createdBy: null
				},
				{ transaction }
			);
			return session.url;
		});
	} catch (e) {
		if (e instanceof UserError) throw e;
		throw explain(e, true);
	}
}

/**
 * The customer is back from the payment page. The webhook is what records a payment; this only
 * asks Stripe early so the page can say "paid" when the webhook is still on its way.
 */
export async function confirmReturn(found: Found, sessionId: string): Promise<void> {
	if (!/^cs_[A-Za-z0-9_]{1,250}$/.test(sessionId) || !configured()) return;
	const pending = await Payment.findOne({ where: { shopId: found.quote.shopId, quoteId: found.quote.id, checkoutSessionId: sessionId, status: 'pending' } });
	if (!pending) return;
	let session: Stripe.Checkout.Session;
	try {
		session = await stripe().checkout.sessions.retrieve(sessionId);
	} catch {
		return;
	}
	if (session.status !== 'complete') return;
	await db().transaction(async (transaction) => {
		const locked = await Payment.findByPk(pending.id, { lock: transaction.LOCK.UPDATE, transaction });
		if (locked) await settleSession(locked, session, transaction);
	});
}

/** What the customer's page shows about paying: what was paid, what is due, how the last try went. */
export async function customerState(found: Found, query: URLSearchParams) {
	if (found.approval?.decision !== 'approved' || found.state === 'revoked') return null;
	const sessionId = query.get('session_id');
	if (query.get('payment') === 'done' && sessionId) await confirmReturn(found, sessionId);
	const job = (await Job.findOne({ where: { id: found.quote.jobId, shopId: found.quote.shopId }, attributes: ['id', 'status', 'shopId'] }))!;
	const { payments, summary } = await summaryFor(job.shopId, job.id);
	const due = dueNow(summary, job.status);
	const returned = sessionId ? payments.find((p) => p.checkoutSessionId === sessionId) : undefined;
	const lastTry = [...payments].reverse().find((p) => p.method === 'card');
	return {
		online: configured(),
		testMode: isLocalFake(),
		summary: summaryJson(summary),
		due: due ? { kind: due.kind, amount: money(due.amount, summary.currency) } : null,
		outcome:
			query.get('payment') === 'cancelled'
				? ('cancelled' as const)
				: returned
					? returned.status === 'pending'
						? ('confirming' as const)
						: returned.status === 'failed'
							? ('cancelled' as const)
							: ('paid' as const)
					: null,
		lastError: lastTry && lastTry.status !== 'paid' && due ? lastTry.lastError : null,
		paid: payments
			.filter((p) => p.status !== 'pending' && p.status !== 'failed')
			.map((p) => ({ kind: p.kind, amount: money(p.amount, p.currency), refunded: new Dec(p.refundedAmount).isZero() ? null : money(p.refundedAmount, p.currency), at: (p.paidAt ?? p.createdAt).toISOString() }))
	};
}
