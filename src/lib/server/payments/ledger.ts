// What a job asks for (from the approved quote version, as the engine priced it) and what has been
// paid against it. Every figure is a Decimal here and a fixed decimal string outside.
import { Op, type Transaction } from 'sequelize';
import type { OptionResult, PricingResult } from '../../pricing/evaluate';
import { Dec, ZERO, currencyDigits, formatMoney, toFixedString, type Decimal } from '../../pricing/money';
import { Approval, Customer, Job, Quote, QuoteVersion, Shop, Unit } from '../db/models';
import { Payment, type PaymentStatus } from '../db/payment-models';
import * as settings from '../settings';

/** Statuses in which money reached the shop (some of it may have gone back since). */
export const SETTLED: PaymentStatus[] = ['paid', 'partially_refunded', 'refunded'];

export interface JobTerms {
	quote: Quote | null;
	approval: Approval | null;
	version: QuoteVersion | null;
	/** The option the customer approved, or the decline option (the diagnostic fee) after a decline. */
	option: OptionResult | null;
	currency: string;
}

/** The money terms of a job: its approved (or declined) quote version's option, if any. */
export async function termsOf(shopId: string, jobId: string, transaction?: Transaction): Promise<JobTerms> {
	const quote = await Quote.findOne({ where: { shopId, jobId }, transaction });
	const approval = quote ? await Approval.findOne({ where: { shopId, quoteId: quote.id }, transaction }) : null;
	const version = approval ? await QuoteVersion.findOne({ where: { shopId, id: approval.versionId }, transaction }) : null;
	if (!version || !approval) return { quote, approval, version: null, option: null, currency: (await settings.get(shopId, transaction)).currency };
	const result = version.result as unknown as PricingResult;
	const option =
		approval.decision === 'approved' && approval.optionIndex !== null
			? (result.options[approval.optionIndex] ?? null)
			: (result.options.find((o) => o.kind === 'decline') ?? null);
	return { quote, approval, version, option, currency: result.currency };
}

export interface Summary {
	currency: string;
	optionLabel: string | null;
	/** What the customer authorised; null when nothing was approved yet. */
	total: Decimal | null;
	deposit: Decimal;
	/** Received and kept: payments less refunds. */
	paid: Decimal;
	refunded: Decimal;
	owed: Decimal | null;
	depositOwed: Decimal;
}

export function summarise(terms: JobTerms, payments: Payment[]): Summary {
	const settled = payments.filter((p) => SETTLED.includes(p.status));
	const received = settled.reduce((sum, p) => sum.plus(p.amount), ZERO);
	const refunded = settled.reduce((sum, p) => sum.plus(p.refundedAmount), ZERO);
	const paid = received.minus(refunded);
	const total = terms.option ? new Dec(terms.option.authorised) : null;
	const deposit = terms.option && terms.approval?.decision === 'approved' ? new Dec(terms.option.deposit) : ZERO;
	const floor = (d: Decimal) => (d.isNegative() ? ZERO : d);
	return {
		currency: terms.currency,
		optionLabel: terms.option?.label ?? null,
		total,
		deposit,
		paid,
		refunded,
		owed: total ? floor(total.minus(paid)) : null,
		depositOwed: floor(deposit.minus(paid))
	};
}

export async function summaryFor(shopId: string, jobId: string, transaction?: Transaction) {
	// One after the other: queries inside a transaction share its one connection.
	const terms = await termsOf(shopId, jobId, transaction);
	const payments = await Payment.findAll({ where: { shopId, jobId }, order: [['createdAt', 'ASC']], transaction });
	return { terms, payments, summary: summarise(terms, payments) };
}

export const fixed = (amount: Decimal | string, currency: string) => toFixedString(new Dec(amount), currencyDigits(currency));
export const money = (amount: Decimal | string, currency: string) => formatMoney(new Dec(amount), currency);

/** The summary as strings for pages and JSON. */
export function summaryJson(s: Summary) {
	const show = (d: Decimal | null) => (d === null ? null : { value: fixed(d, s.currency), shown: money(d, s.currency) });
	return {
		currency: s.currency,
		optionLabel: s.optionLabel,
		total: show(s.total),
		deposit: show(s.deposit)!,
		paid: show(s.paid)!,
		refunded: show(s.refunded)!,
		owed: show(s.owed),
		depositOwed: show(s.depositOwed)!
	};
}

/** Job, customer, unit and shop of a payment's job, for e-mails. */
export async function mailContext(shopId: string, jobId: string, transaction?: Transaction) {
	const job = await Job.findOne({ where: { id: jobId, shopId }, transaction });
	if (!job) return null;
	const customer = await Customer.findOne({ where: { id: job.customerId, shopId }, transaction });
	const unit = await Unit.findOne({ where: { id: job.unitId, shopId }, transaction });
	const shop = await Shop.findByPk(shopId, { attributes: ['name', 'phone', 'email', 'address'], transaction });
	return { job, customer: customer!, unit: unit!, shop: shop! };
}

/** Other settled payments of the job, to catch a job paid twice over. */
export function settledOthers(payment: Payment, transaction: Transaction) {
	return Payment.findAll({ where: { shopId: payment.shopId, jobId: payment.jobId, status: { [Op.in]: SETTLED }, id: { [Op.ne]: payment.id } }, transaction });
}
