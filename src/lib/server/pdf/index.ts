import { sayDate } from './format';
import { quoteDocument } from './quote-document';
import { renderQuotePdf } from './quote-pdf';
import { Quote } from '../db/models';
import * as quotes from '../quotes';
import { isUuid } from '../validators';

export { quoteDocument, type QuoteDocument } from './quote-document';
export { renderQuotePdf } from './quote-pdf';

export interface QuotePdf {
	bytes: Buffer;
	filename: string;
}

const filenameFor = (jobNumber: number, version: number) => `estimate-${jobNumber}-v${version}.pdf`;

/** Version `number` of a job's quote as a PDF for the job's shop; null when there is no such version in that shop. */
export async function staffPdf(shopId: string, jobId: string, number: number): Promise<QuotePdf | null> {
	if (!isUuid(jobId) || !Number.isSafeInteger(number) || number < 1) return null;
	const quote = await Quote.findOne({ where: { shopId, jobId }, attributes: ['id'] });
	const version = quote ? await quotes.versionByNumber(shopId, quote.id, number) : null;
	const doc = version ? await quoteDocument(shopId, version.id) : null;
	if (!doc) return null;
	return { bytes: await renderQuotePdf(doc), filename: filenameFor(doc.job.number, doc.version.number) };
}

export type CustomerPdf = ({ ok: true } & QuotePdf) | { ok: false; reason: 'revoked' };

/**
 * The version a customer link was sent with, as a PDF; null for an unknown token. A withdrawn link
 * gives nothing. An expired or replaced one still gives its estimate, marked as such: it is the
 * customer's record of what they were sent.
 */
export async function customerPdf(token: string): Promise<CustomerPdf | null> {
	const found = await quotes.byToken(token);
	if (!found) return null;
	if (found.state === 'revoked') return { ok: false, reason: 'revoked' };
	const doc = await quoteDocument(found.quote.shopId, found.version.id);
	if (!doc) return null;
	if (found.state === 'expired') {
		doc.notice = `This estimate expired on ${sayDate(doc.version.validUntil)}. Ask ${doc.shop.name} for a new one before approving any work.`;
	} else if (found.state === 'replaced') {
		doc.notice = `${doc.shop.name} has since sent a newer version (version ${found.latest.number}) of this estimate. Answer the newest one.`;
	}
	return { ok: true, bytes: await renderQuotePdf(doc), filename: filenameFor(doc.job.number, doc.version.number) };
}
