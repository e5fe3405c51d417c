import sharp from 'sharp';
import { CONDITION_LABELS, FUEL_LABELS, RESULT_LABELS, UNIT_KIND_LABELS, VOLTAGE_LABELS, type ReadingResult } from '../../domain';
import type { Verdict } from '../../pricing/economics';
import type { LineResult, OptionResult, PricingResult } from '../../pricing/evaluate';
import { Dec, HUNDRED } from '../../pricing/money';
import { Approval, Customer, Job, Quote, QuoteVersion, Reading, Shop, Unit } from '../db/models';
import * as photos from '../photos';
import { forCustomer as readingsForCustomer, show } from '../readings';
import { isUuid } from '../validators';

/*
 * Everything one estimate PDF shows, gathered in one plain object. It is the customer's document:
 * money is copied field by field from the engine's result, and costs, gross profit, margins and
 * markups are never copied. Figures stay the engine's decimal strings; the renderer only formats.
 */

export interface QuoteLine {
	kind: LineResult['kind'];
	description: string;
	/** Parts: quantity. Labour: hours. Null for fees, credits and the like. */
	quantity: string | null;
	unitPrice: string | null;
	amount: string;
}

export interface QuoteStage {
	label: string;
	/** Chance this stage ends the fault, in percent ("60"). */
	likelihoodPercent: string;
	/** Chance the work gets as far as this stage, in percent ("40.00"). */
	reachPercent: string;
	lines: QuoteLine[];
	total: string;
}

export interface QuoteOption {
	index: number;
	label: string;
	kind: OptionResult['kind'];
	recommended: boolean;
	lines: QuoteLine[];
	staged: { stages: QuoteStage[]; expectedCost: string; worstCase: string; notToExceed: string } | null;
	subtotal: string;
	tax: string;
	total: string;
	/** What the customer authorises: the total, or the not-to-exceed of a staged option. */
	authorised: string;
	deposit: string;
	balance: string;
	specialOrderParts: string;
}

export interface RepairComparison {
	label: string;
	verdict: Verdict | 'no-comparison';
	repairCost: string;
	worstCase: string | null;
	/** The most the repair is worth against the best replacement; null without one. */
	breakEven: string | null;
	replacementLabel: string | null;
	repairToNewPercent: string | null;
	thresholdPercent: string;
	unitValue: string | null;
	reasons: string[];
}

export interface QuoteApproval {
	decision: 'approved' | 'declined';
	optionLabel: string | null;
	optionIndex: number | null;
	signerName: string | null;
	clientAddress: string;
	versionHash: string;
	versionNumber: number;
	/** False when the customer answered another version of the quote. */
	forThisVersion: boolean;
	reason: string;
	at: string;
}

export interface QuoteDocument {
	shop: { name: string; address: string; phone: string; email: string };
	job: { number: number; complaint: string; failedComponent: string; findings: string };
	customer: { name: string; phone: string; email: string };
	unit: { title: string; details: { label: string; value: string }[] };
	version: { number: number; contentHash: string; sentAt: string; validUntil: string };
	currency: string;
	minorDigits: number;
	/** Tax rate in percent ("7.25"), or null when the shop charges none. */
	taxPercent: string | null;
	/** The job's diagnostic fee as sent, or null when there is none. */
	diagnosticFee: string | null;
	diagnosticFeeCredited: boolean;
	readings: { measurement: string; reading: string; spec: string; result: string }[];
	photos: { caption: string; jpeg: Buffer; width: number; height: number }[];
	options: QuoteOption[];
	comparison: { verdict: Verdict | 'no-comparison'; reasons: string[]; repairs: RepairComparison[] };
	approval: QuoteApproval | null;
	/** A line shown above everything else, such as "this estimate has expired". */
	notice: string | null;
}

/** Photos in the PDF: the stored thumbnail (WebP) as a small JPEG, which PDF viewers can show. */
const PHOTO_LONG_SIDE = 480;

const plain = (value: string) => new Dec(value).toString();
const percentOfFraction = (fraction: string) => new Dec(fraction).times(HUNDRED).toString();

function line(result: LineResult): QuoteLine {
	return { kind: result.kind, description: result.description, quantity: result.quantity, unitPrice: result.unitPrice, amount: result.sell };
}

function option(result: OptionResult, recommended: number | null): QuoteOption {
	return {
		index: result.index,
		label: result.label,
		kind: result.kind,
		recommended: recommended === result.index,
		lines: result.lines.map(line),
		staged: result.staged
			? {
					stages: result.staged.stages.map((stage) => ({
						label: stage.label,
						likelihoodPercent: percentOfFraction(stage.likelihood),
						reachPercent: stage.reachPercent,
						lines: stage.lines.map(line),
						total: stage.total
					})),
					expectedCost: result.staged.expectedCost,
					worstCase: result.staged.worstCase,
					notToExceed: result.staged.notToExceed
				}
			: null,
		subtotal: result.subtotal,
		tax: result.tax,
		total: result.total,
		authorised: result.authorised,
		deposit: result.deposit,
		balance: result.balance,
		specialOrderParts: result.specialOrderParts
	};
}

function comparison(result: PricingResult): QuoteDocument['comparison'] {
	const labelOf = (index: number) => result.options.find((o) => o.index === index)?.label ?? null;
	return {
		verdict: result.recommendation.verdict,
		reasons: result.recommendation.reasons,
		repairs: result.repairs.map((repair) => ({
			label: repair.label,
			verdict: repair.verdict,
			repairCost: repair.repairCost,
			worstCase: repair.worstCase,
			breakEven: repair.comparison ? repair.comparison.breakEvenRepair : null,
			replacementLabel: repair.comparison ? labelOf(repair.comparison.replacementOptionIndex) : null,
			repairToNewPercent: repair.repairToNewPercent,
			thresholdPercent: repair.thresholdPercent,
			unitValue: repair.unitValue,
			reasons: repair.reasons
		}))
	};
}

/** The money part of the document, copied from the engine's result without any cost or margin. */
export function pricedPart(result: PricingResult): Pick<QuoteDocument, 'currency' | 'minorDigits' | 'taxPercent' | 'options' | 'comparison'> {
	const taxRate = result.settings?.taxRate ?? '0';
	return {
		currency: result.currency,
		minorDigits: result.minorDigits,
		taxPercent: new Dec(taxRate).isZero() ? null : percentOfFraction(taxRate),
		options: result.options.map((o) => option(o, result.recommendation.optionIndex)),
		comparison: comparison(result)
	};
}

function spec(reading: Reading): string {
	const min = reading.minValue === null ? null : plain(reading.minValue);
	const max = reading.maxValue === null ? null : plain(reading.maxValue);
	if (min !== null && max !== null) return `${min}–${max} ${reading.unit}`;
	if (min !== null) return `at least ${min} ${reading.unit}`;
	if (max !== null) return `at most ${max} ${reading.unit}`;
	return '—';
}

function unitDetails(unit: Unit): QuoteDocument['unit'] {
	const details: { label: string; value: string }[] = [{ label: 'Kind', value: UNIT_KIND_LABELS[unit.kind] ?? unit.kind }];
	if (unit.serial) details.push({ label: 'Serial', value: unit.serial });
	const watts = (n: number) => `${new Intl.NumberFormat('en-US').format(n)} W`;
	if (unit.runningWatts || unit.startingWatts) {
		const parts = [unit.runningWatts ? `${watts(unit.runningWatts)} running` : '', unit.startingWatts ? `${watts(unit.startingWatts)} starting` : ''];
		details.push({ label: 'Rated output', value: parts.filter(Boolean).join(' / ') });
	}
	if (unit.engineHours !== null && unit.engineHours !== undefined) details.push({ label: 'Engine hours', value: plain(unit.engineHours) });
	if (unit.voltage) details.push({ label: 'Voltage', value: VOLTAGE_LABELS[unit.voltage as keyof typeof VOLTAGE_LABELS] ?? unit.voltage });
	if (unit.fuel) details.push({ label: 'Fuel', value: FUEL_LABELS[unit.fuel as keyof typeof FUEL_LABELS] ?? unit.fuel });
	if (unit.yearBought) details.push({ label: 'Bought', value: String(unit.yearBought) });
	if (unit.condition) details.push({ label: 'Condition', value: CONDITION_LABELS[unit.condition as keyof typeof CONDITION_LABELS] ?? unit.condition });
	const title = [unit.maker, unit.model].filter(Boolean).join(' ') || UNIT_KIND_LABELS[unit.kind] || 'Unit';
	return { title, details };
}

async function customerPhotos(shopId: string, jobId: string): Promise<QuoteDocument['photos']> {
	const shown = await photos.listForCustomer(shopId, jobId);
	const converted = await Promise.all(
		shown.map(async (photo) => {
			const file = await photos.readForCustomer(shopId, jobId, photo.id, 'thumb');
			if (!file) return null;
			const { data, info } = await sharp(file.bytes)
				.resize({ width: PHOTO_LONG_SIDE, height: PHOTO_LONG_SIDE, fit: 'inside', withoutEnlargement: true })
				.flatten({ background: '#ffffff' })
				.jpeg({ quality: 80 })
				.toBuffer({ resolveWithObject: true });
			return { caption: photo.caption, jpeg: data, width: info.width, height: info.height };
		})
	);
	return converted.filter((p) => p !== null);
}

/**
 * Gathers one sent version of a quote for its PDF. Every row is looked up within `shopId`; a
 * version of another shop is null, exactly as a missing one.
 */
export async function quoteDocument(shopId: string, versionId: string): Promise<QuoteDocument | null> {
	if (!isUuid(shopId) || !isUuid(versionId)) return null;
	const version = await QuoteVersion.findOne({ where: { id: versionId, shopId } });
	if (!version) return null;
	const quote = await Quote.findOne({ where: { id: version.quoteId, shopId } });
	const job = quote ? await Job.findOne({ where: { id: quote.jobId, shopId } }) : null;
	if (!quote || !job) return null;
	const [shop, customer, unit, readings, pictures, approval] = await Promise.all([
		Shop.findByPk(shopId, { attributes: ['name', 'phone', 'email', 'address'] }),
		Customer.findOne({ where: { id: job.customerId, shopId }, attributes: ['name', 'phone', 'email'] }),
		Unit.findOne({ where: { id: job.unitId, shopId } }),
		readingsForCustomer(shopId, job),
		customerPhotos(shopId, job.id),
		Approval.findOne({ where: { shopId, quoteId: quote.id } })
	]);
	if (!shop || !customer || !unit) return null;
	const answered = approval
		? approval.versionId === version.id
			? version
			: await QuoteVersion.findOne({ where: { id: approval.versionId, shopId }, attributes: ['number'] })
		: null;

	const result = version.result as unknown as PricingResult;
	const content = version.content as { diagnosticFee?: string; options?: { creditDiagnosticFee?: boolean }[] };
	return {
		shop: { name: shop.name, address: shop.address, phone: shop.phone, email: shop.email },
		job: { number: job.number, complaint: job.complaint, failedComponent: job.failedComponent, findings: job.findings },
		customer: { name: customer.name, phone: customer.phone, email: customer.email },
		unit: unitDetails(unit),
		version: { number: version.number, contentHash: version.contentHash, sentAt: version.sentAt.toISOString(), validUntil: version.validUntil },
		...pricedPart(result),
		diagnosticFee: content.diagnosticFee && !new Dec(content.diagnosticFee).isZero() ? content.diagnosticFee : null,
		diagnosticFeeCredited: (content.options ?? []).some((o) => o.creditDiagnosticFee === true),
		readings: readings.map((reading) => ({
			measurement: reading.label,
			reading: show(reading),
			spec: spec(reading),
			result: RESULT_LABELS[reading.result as ReadingResult] ?? reading.result
		})),
		photos: pictures,
		approval: approval
			? {
					decision: approval.decision,
					optionLabel: approval.optionLabel,
					optionIndex: approval.optionIndex,
					signerName: approval.signerName,
					clientAddress: approval.clientAddress,
					versionHash: approval.versionHash,
					versionNumber: answered?.number ?? 0,
					forThisVersion: approval.versionId === version.id,
					reason: approval.reason,
					at: approval.createdAt.toISOString()
				}
			: null,
		notice: null
	};
}
