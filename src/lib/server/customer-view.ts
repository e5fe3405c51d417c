import { Customer, Job, Shop, Unit } from './db/models';
import type { PricingResult } from '../pricing/evaluate';
import { RESULT_LABELS, describeUnit, type ReadingResult } from '../domain';
import * as photos from './photos';
import type { byToken } from './quotes';
import { forCustomer as readingsForCustomer, show } from './readings';

type Found = NonNullable<Awaited<ReturnType<typeof byToken>>>;

const VERDICT_WORDS = { repair: 'Repair is the better buy', replace: 'Replacing is the better buy', 'close-call': 'A close call', 'no-comparison': 'No comparison' } as const;

/** Money strings from the engine, formatted for people; Intl formats the decimal string exactly. */
export function moneyFormatter(currency: string, digits: number) {
	const format = new Intl.NumberFormat('en-US', { style: 'currency', currency, minimumFractionDigits: digits, maximumFractionDigits: digits });
	return (amount: string | null | undefined) => (amount === null || amount === undefined ? '' : format.format(amount as unknown as number));
}

/** Everything the customer's page shows, and nothing more: no costs, margins or staff names. */
export async function customerView(found: Found) {
	const version = found.state === 'replaced' ? found.latest : found.version;
	const shopId = found.quote.shopId;
	const job = (await Job.findOne({ where: { id: found.quote.jobId, shopId } }))!;
	const [shop, unit, customer, taken, pictures] = await Promise.all([
		Shop.findByPk(shopId, { attributes: ['name', 'phone', 'email', 'address'] }),
		Unit.findOne({ where: { id: job.unitId, shopId } }),
		Customer.findOne({ where: { id: job.customerId, shopId }, attributes: ['name'] }),
		readingsForCustomer(shopId, job),
		photos.listForCustomer(shopId, job.id)
	]);
	const result = version.result as unknown as PricingResult;
	const money = moneyFormatter(result.currency, result.minorDigits);
	const content = version.content as { options: { label: string; kind: string }[] };
	return {
		state: found.state,
		shop: shop!.get({ plain: true }),
		customerName: customer!.name,
		job: { number: job.number, complaint: job.complaint, failedComponent: job.failedComponent, findings: job.findings },
		unit: { label: describeUnit(unit!), serial: unit!.serial },
		readings: taken.map((r) => ({
			label: r.label,
			shown: show(r),
			range: r.minValue !== null && r.maxValue !== null ? `${Number(r.minValue)}–${Number(r.maxValue)} ${r.unit}` : r.minValue !== null ? `at least ${Number(r.minValue)} ${r.unit}` : r.maxValue !== null ? `at most ${Number(r.maxValue)} ${r.unit}` : '',
			result: r.result as ReadingResult,
			resultLabel: RESULT_LABELS[r.result as ReadingResult]
		})),
		photos: pictures.map((p) => ({ id: p.id, caption: p.caption })),
		version: { number: version.number, hash: version.contentHash, validUntil: version.validUntil, sentAt: version.sentAt.toISOString() },
		linkVersion: found.version.number,
		options: result.options.map((o) => ({
			index: o.index,
			label: o.label,
			kind: content.options[o.index]?.kind ?? o.kind,
			lines: o.lines.map((l) => ({
				description: l.description,
				// As on the PDF: labour in hours, parts as a count when more than one.
				quantityShown: l.quantity === null ? null : l.kind === 'labour' ? `${l.quantity} h` : l.quantity === '1' ? null : `× ${l.quantity}`,
				unitPrice: money(l.unitPrice),
				amount: money(l.sell)
			})),
			staged: o.staged
				? {
						stages: o.staged.stages.map((s) => ({ label: s.label, likelihood: s.likelihood, reach: s.reachPercent, total: money(s.total) })),
						expected: money(o.staged.expectedCost),
						worstCase: money(o.staged.worstCase),
						notToExceed: money(o.staged.notToExceed)
					}
				: null,
			subtotal: money(o.subtotal),
			tax: money(o.tax),
			total: money(o.total),
			deposit: money(o.deposit),
			depositRaw: o.deposit,
			balance: money(o.balance),
			recommended: result.recommendation.optionIndex === o.index
		})),
		comparison: {
			verdict: VERDICT_WORDS[result.recommendation.verdict],
			reasons: forCustomer([...result.recommendation.reasons, ...result.repairs.flatMap((r) => r.reasons)])
		},
		approval: found.approval
			? {
					decision: found.approval.decision,
					optionLabel: found.approval.optionLabel,
					optionIndex: found.approval.optionIndex,
					signerName: found.approval.signerName,
					at: found.approval.createdAt.toISOString()
				}
			: null
	};
}

/**
 * The engine's reasons as the customer reads them: each once, without a sentence that only says
 * again the verdict shown above it (the options below mark the one recommended), in the customer's
 * own voice, and without the shop's internal rule of thumb (the fact it is measured on stays).
 */
export function forCustomer(reasons: string[]): string[] {
	const shown = reasons
		.filter((reason) => !/is the better buy\.$|is a better buy than /.test(reason))
		.map((reason) => reason.replace(/; the shop's guide is to repair below [\d.]+%\.$/, '.').replace("the customer's preference decides", 'your preference decides'));
	return [...new Set(shown)];
}
