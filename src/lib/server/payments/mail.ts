// The e-mails payments send, queued in the caller's transaction so they go out exactly when the
// change that caused them commits.
import type { Transaction } from 'sequelize';
import { describeUnit } from '../../domain';
import type { Payment, Refund } from '../db/payment-models';
import * as outbox from '../mail/outbox';
import * as templates from '../mail/templates';
import { mailContext, money } from './ledger';

export const METHOD_LABELS = { card: 'Card (online)', cash: 'Cash', terminal: 'Card terminal', cheque: 'Cheque' } as const;

const day = (d: Date) => new Intl.DateTimeFormat('en', { dateStyle: 'long', timeZone: 'UTC' }).format(d);

function contact(shop: { name: string; phone: string; email: string; address: string }): templates.ShopContact {
	return { name: shop.name, phone: shop.phone, email: shop.email, address: shop.address };
}

/** A receipt to the customer for money received; skipped when the customer has no e-mail address. */
export async function queueReceipt(payment: Payment, balanceDue: string | null, transaction: Transaction): Promise<boolean> {
	const ctx = await mailContext(payment.shopId, payment.jobId, transaction);
	if (!ctx?.customer.email) return false;
	const mail = templates.paymentReceipt({
		shop: contact(ctx.shop),
		customerName: ctx.customer.name,
		jobNumber: ctx.job.number,
		unitLabel: describeUnit(ctx.unit),
		amount: money(payment.amount, payment.currency),
		paidAt: day(payment.paidAt ?? new Date()),
		method: METHOD_LABELS[payment.method],
		reference: payment.reference || payment.paymentIntentId || payment.id.slice(0, 8),
		balanceDue
	});
	await outbox.enqueue({ to: ctx.customer.email, ...mail }, { shopId: payment.shopId, jobId: payment.jobId, kind: 'payment_receipt' }, transaction);
	return true;
}

/** The balance e-mail: a link to the customer's page, where the payment is started. */
export async function queueBalanceLink(shopId: string, jobId: string, balance: string, link: string, transaction: Transaction): Promise<string> {
	const ctx = await mailContext(shopId, jobId, transaction);
	if (!ctx?.customer.email) throw new Error('The customer has no e-mail address.');
	const mail = templates.balancePaymentLink({
		shop: contact(ctx.shop),
		customerName: ctx.customer.name,
		jobNumber: ctx.job.number,
		unitLabel: describeUnit(ctx.unit),
		balance,
		link,
		pickupNote: ctx.shop.address ? `Pick it up at ${ctx.shop.address}.` : null
	});
	await outbox.enqueue({ to: ctx.customer.email, ...mail }, { shopId, jobId, kind: 'balance_link' }, transaction);
	return ctx.customer.email;
}

function escapeHtml(value: string): string {
	return value.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** To the customer: money went back to them, how much, and why. */
export async function queueRefundNotice(payment: Payment, refund: Refund, transaction: Transaction): Promise<boolean> {
	const ctx = await mailContext(payment.shopId, payment.jobId, transaction);
	if (!ctx?.customer.email) return false;
	const amount = money(refund.amount, refund.currency);
	const how =
		payment.method === 'card'
			? 'It goes back to the card you paid with; banks usually show it within 5 to 10 business days.'
			: `It is given back the way you paid (${METHOD_LABELS[payment.method].toLowerCase()}).`;
	const rows: [string, string][] = [
		['Job', `#${ctx.job.number}`],
		['Unit', describeUnit(ctx.unit)],
		['Refunded', amount],
		['Of the payment', `${money(payment.amount, payment.currency)} on ${day(payment.paidAt ?? payment.createdAt)}`],
		['Reason', refund.reason],
		['Reference', refund.stripeRefundId ?? refund.id.slice(0, 8)]
	];
	const hello = ctx.customer.name.trim() ? `Hello ${ctx.customer.name.trim()},` : 'Hello,';
	const lead = `${ctx.shop.name} refunded ${amount} for job #${ctx.job.number}. ${how}`;
	const text = [hello, lead, rows.map(([k, v]) => `${k}: ${v}`).join('\n'), 'Keep this e-mail for your records. Reply to it or call the shop with any question.', ctx.shop.name].join('\n\n');
	const html =
		`<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Refund for job #${ctx.job.number}</title></head>` +
		`<body style="font-family:system-ui,sans-serif;color:#211d1a;background:#f6f3ee;margin:0;padding:24px 16px">` +
		`<div style="max-width:560px;margin:0 auto;background:#fff;border:1px solid #e4ddd3;border-radius:8px;padding:24px">` +
		`<p style="font-weight:700">${escapeHtml(ctx.shop.name)}</p><p>${escapeHtml(hello)}</p><p>${escapeHtml(lead)}</p>` +
		`<table role="presentation" style="border-collapse:collapse">${rows
			.map(([k, v]) => `<tr><td style="padding:4px 12px 4px 0;color:#5b5248">${escapeHtml(k)}</td><td style="font-weight:600">${escapeHtml(v)}</td></tr>`)
			.join('')}</table>` +
		`<p>Keep this e-mail for your records. Reply to it or call the shop with any question.</p></div></body></html>`;
	await outbox.enqueue(
		{ to: ctx.customer.email, subject: `Refund: ${amount} for job #${ctx.job.number} at ${ctx.shop.name}`, text, html, fromName: ctx.shop.name, replyTo: ctx.shop.email || undefined },
		{ shopId: payment.shopId, jobId: payment.jobId, kind: 'payment_receipt' },
		transaction
	);
	return true;
}
