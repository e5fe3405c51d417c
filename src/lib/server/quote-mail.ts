// The e-mails around a quote: the estimate to the customer, and after their answer a signed copy
// to them and a notice to the shop. All go through the durable outbox.
import type { PricingResult } from '../pricing/evaluate';
import { sayDay } from '../dates';
import { describeUnit } from '../domain';
import { moneyFormatter } from './customer-view';
import { Approval, Customer, Job, Quote, QuoteVersion, Shop, Unit, User } from './db/models';
import * as outbox from './mail/outbox';
import * as templates from './mail/templates';
import { quoteDocument, renderQuotePdf } from './pdf';

async function context(shopId: string, jobId: string) {
	const job = (await Job.findOne({ where: { id: jobId, shopId } }))!;
	const [shop, customer, unit] = await Promise.all([
		Shop.findByPk(shopId),
		Customer.findOne({ where: { id: job.customerId, shopId } }),
		Unit.findOne({ where: { id: job.unitId, shopId } })
	]);
	const contact = { name: shop!.name, phone: shop!.phone, email: shop!.email, address: shop!.address };
	return { job, shop: shop!, contact, customer: customer!, unitLabel: describeUnit(unit!) };
}

async function pdfOf(shopId: string, versionId: string, jobNumber: number, versionNumber: number) {
	const doc = await quoteDocument(shopId, versionId);
	return doc ? [{ filename: `estimate-${jobNumber}-v${versionNumber}.pdf`, contentType: 'application/pdf', content: await renderQuotePdf(doc) }] : [];
}

/** Queues the estimate for the customer. Returns why not, when the customer has no e-mail. */
export async function quoteSent(shopId: string, jobId: string, version: QuoteVersion, link: string): Promise<{ queued: boolean; reason?: string }> {
	const { job, contact, customer, unitLabel } = await context(shopId, jobId);
	if (!customer.email) return { queued: false, reason: 'The customer has no e-mail address on file; give them the link another way.' };
	const result = version.result as unknown as PricingResult;
	const money = moneyFormatter(result.currency, result.minorDigits);
	const content = templates.quoteSent({
		shop: contact,
		customerName: customer.name,
		jobNumber: job.number,
		unitLabel,
		link,
		options: result.options.map((o) => ({ label: o.label, total: money(o.total), recommended: o.index === result.recommendation.optionIndex })),
		validUntil: sayDay(version.validUntil, 'long')
	});
	await outbox.enqueue(
		{ to: customer.email, ...content, attachments: await pdfOf(shopId, version.id, job.number, version.number) },
		{ shopId, jobId, kind: 'quote_sent' }
	);
	return { queued: true };
}

/** After the customer answers: a signed copy to them, a notice to the shop's desk. */
export async function decisionMade(shopId: string, approvalId: string, links: { customer: string; job: string }) {
	const approval = (await Approval.findOne({ where: { id: approvalId, shopId } }))!;
	const version = (await QuoteVersion.findOne({ where: { id: approval.versionId, shopId } }))!;
	const { jobId } = (await Quote.findOne({ where: { id: approval.quoteId, shopId }, attributes: ['jobId'] }))!;
	const { job, shop, contact, customer, unitLabel } = await context(shopId, jobId);
	const result = version.result as unknown as PricingResult;
	const money = moneyFormatter(result.currency, result.minorDigits);
	const option = approval.optionIndex === null ? undefined : result.options[approval.optionIndex];
	const signedAt = new Intl.DateTimeFormat('en', { dateStyle: 'long', timeStyle: 'short' }).format(approval.createdAt);
	if (approval.decision === 'approved' && customer.email && option) {
		const content = templates.approvalConfirmation({
			shop: contact,
			customerName: customer.name,
			jobNumber: job.number,
			unitLabel,
			optionLabel: option.label,
			total: money(option.total),
			deposit: Number(option.deposit) > 0 ? money(option.deposit) : null,
			signedBy: approval.signerName ?? customer.name,
			signedAt,
			link: links.customer
		});
		await outbox.enqueue(
			{ to: customer.email, ...content, attachments: await pdfOf(shopId, version.id, job.number, version.number) },
			{ shopId, jobId, kind: 'approval_confirmation' }
		);
	}
	const desk = shop.email || (await User.findOne({ where: { shopId, role: ['writer', 'manager', 'owner'], active: true }, order: [['role', 'DESC']] }))?.email;
	if (desk) {
		const content = templates.decisionNotice({
			shop: contact,
			decision: approval.decision,
			customerName: customer.name,
			customerEmail: customer.email || null,
			jobNumber: job.number,
			unitLabel,
			optionLabel: option?.label ?? null,
			total: option ? money(option.total) : null,
			signedBy: approval.signerName ?? customer.name,
			decidedAt: signedAt,
			jobLink: links.job,
			note: approval.reason || null
		});
		await outbox.enqueue({ to: desk, ...content }, { shopId, jobId, kind: 'decision_notice' });
	}
}
