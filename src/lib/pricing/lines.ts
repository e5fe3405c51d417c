import { divideRounded, pow10, rescale, scaledToDecimal, toScaled } from './fixed';
import { currencyDigits, type Decimal, type RoundingMode } from './money';
import type { LineInput } from './schema';
import type { Category, MarkupTier, PricingSettings } from './settings';

/** Money rounded to the currency: a whole number of minor units (cents for USD, yen for JPY). */
export type Minor = bigint;

export type LineKind = 'part' | 'labour' | 'fee' | 'sublet' | 'unit' | 'discount' | 'supplies' | 'diagnostic-credit';
/** A line's category; "option" marks a discount spread over the whole option. */
export type LineCategory = Category | 'option';

export interface PricedLine {
	kind: LineKind;
	category: LineCategory;
	description: string;
	/** Position in the input list; null for lines the engine adds (supplies, credit). */
	inputIndex: number | null;
	/** Parts: quantity. Labour: hours. */
	quantity: Decimal | null;
	/** Parts: sell price per unit. Labour: rate per hour (shown to the minor unit). */
	unitPrice: Minor | null;
	/** Extension, rounded to the minor unit; negative for discounts and credits. */
	sell: Minor;
	cost: Minor;
	taxable: boolean;
	/** The part of `sell` that counts toward the taxable base. */
	taxableAmount: Minor;
	specialOrder: boolean;
}

export interface PricedLines {
	lines: PricedLine[];
	subtotal: Minor;
	taxableBase: Minor;
	tax: Minor;
	total: Minor;
	cost: Minor;
	/** Sell price of special-order parts, before tax. */
	specialOrderParts: Minor;
}

// Scales (decimal places) the schema allows for each kind of input; inputs are exact at these scales.
export const MONEY_SCALE = 6;
export const PERCENT_SCALE = 6;
export const FRACTION_SCALE = 8;
export const QUANTITY_SCALE = 4;
export const MULTIPLIER_SCALE = 4;
const TIER_PRICE_SCALE = MONEY_SCALE + MULTIPLIER_SCALE;

interface FixedTier {
	upTo: bigint | null;
	multiplier: bigint;
	/** Lowest sell price in the tier: the top price of the cheaper tiers, so a dearer part never sells for less. */
	floor: bigint;
}

/** Settings as scaled integers, worked out once per settings object. */
export interface FixedSettings {
	tiers: FixedTier[];
	labourRate: bigint;
	labourCostRate: bigint;
	suppliesPercent: bigint;
	suppliesCap: Minor;
	taxRate: bigint;
	depositPercent: bigint;
	/** Fraction, scale 8. */
	closeCallBand: bigint;
	/** Percent, scale 6. */
	repairThresholdPercent: bigint;
	/** Percent, scale 2. */
	targetMarginPercent: bigint;
}

export interface PricingContext {
	settings: PricingSettings;
	digits: number;
	mode: RoundingMode;
	fixed: FixedSettings;
	/** Job's diagnostic fee, in minor units, for a repair that credits it. */
	diagnosticFee: Minor | null;
}

const fixedCache = new WeakMap<PricingSettings, FixedSettings>();
const tierCache = new WeakMap<MarkupTier[], FixedTier[]>();

function fixedTiers(tiers: MarkupTier[]): FixedTier[] {
	let fixed = tierCache.get(tiers);
	if (fixed) return fixed;
	let highest = 0n;
	fixed = tiers.map((tier) => {
		const upTo = tier.upTo === null ? null : toScaled(tier.upTo, MONEY_SCALE);
		const multiplier = toScaled(tier.multiplier, MULTIPLIER_SCALE);
		const entry = { upTo, multiplier, floor: highest };
		if (upTo !== null && upTo * multiplier > highest) highest = upTo * multiplier;
		return entry;
	});
	tierCache.set(tiers, fixed);
	return fixed;
}

/** Settings objects are treated as immutable: the scaled form is cached against the object. */
export function fixedSettings(settings: PricingSettings): FixedSettings {
	let fixed = fixedCache.get(settings);
	if (fixed) return fixed;
	const digits = currencyDigits(settings.currency);
	const mode = settings.roundingMode;
	fixed = {
		tiers: fixedTiers(settings.markupTiers),
		labourRate: toScaled(settings.labourRate, MONEY_SCALE, mode),
		labourCostRate: toScaled(settings.labourCostRate, MONEY_SCALE, mode),
		suppliesPercent: toScaled(settings.suppliesPercent, PERCENT_SCALE, mode),
		suppliesCap: toScaled(settings.suppliesCap, digits, mode),
		taxRate: toScaled(settings.taxRate, FRACTION_SCALE, mode),
		depositPercent: toScaled(settings.depositPercent, PERCENT_SCALE, mode),
		closeCallBand: toScaled(settings.closeCallBand, FRACTION_SCALE, mode),
		repairThresholdPercent: toScaled(settings.repairThresholdPercent, PERCENT_SCALE, mode),
		targetMarginPercent: toScaled(settings.targetMarginPercent, 2, mode)
	};
	fixedCache.set(settings, fixed);
	return fixed;
}

export function pricingContext(settings: PricingSettings, diagnosticFee: Decimal | null = null): PricingContext {
	const digits = currencyDigits(settings.currency);
	const mode = settings.roundingMode;
	return {
		settings,
		digits,
		mode,
		fixed: fixedSettings(settings),
		diagnosticFee: diagnosticFee === null ? null : toScaled(diagnosticFee, digits, mode)
	};
}

function tierPrice(unitCost: bigint, tiers: FixedTier[]): bigint {
	const last = tiers.length - 1;
	let k = 0;
	while (k < last) {
		const upTo = tiers[k].upTo;
		if (upTo === null || unitCost <= upTo) break;
		k++;
	}
	const price = unitCost * tiers[k].multiplier;
	return price < tiers[k].floor ? tiers[k].floor : price;
}

/**
 * Sell price per unit from the markup tiers, unrounded: cost × the multiplier of the tier the cost
 * falls in (upper bounds inclusive), never below the top price of a cheaper tier.
 */
export function sellPriceForCost(unitCost: Decimal, tiers: MarkupTier[]): Decimal {
	return scaledToDecimal(tierPrice(toScaled(unitCost, MONEY_SCALE), fixedTiers(tiers)), TIER_PRICE_SCALE);
}

const PERCENT_DIVISOR = 100n * pow10(PERCENT_SCALE);
const FRACTION_DIVISOR = pow10(FRACTION_SCALE);

/** amount (minor units) × percent / 100, rounded to minor units. */
function percentOf(amount: Minor, percent: bigint, mode: RoundingMode): Minor {
	return divideRounded(amount * percent, PERCENT_DIVISOR, mode);
}

/**
 * Prices one list of lines. Rounding policy: every extension is rounded to the minor unit; tax is the
 * rate times the sum of the rounded taxable amounts, rounded once.
 */
export function priceLines(inputs: readonly LineInput[], ctx: PricingContext, creditDiagnosticFee = false): PricedLines {
	const { settings, digits, mode, fixed } = ctx;
	const taxable = settings.taxable;
	const lines: PricedLine[] = [];
	const net: Record<Category, Minor> = { parts: 0n, labour: 0n, fees: 0n, sublet: 0n, supplies: 0n, unit: 0n };
	let specialOrderParts = 0n;

	for (let index = 0; index < inputs.length; index++) {
		const line = inputs[index];
		let priced: PricedLine;
		switch (line.kind) {
			case 'part': {
				const unitCost = toScaled(line.unitCost, MONEY_SCALE, mode);
				const quantity = toScaled(line.quantity, QUANTITY_SCALE, mode);
				const unitPrice =
					line.unitPrice !== undefined ? toScaled(line.unitPrice, digits, mode) : rescale(tierPrice(unitCost, fixed.tiers), TIER_PRICE_SCALE, digits, mode);
				const sell = rescale(quantity * unitPrice, QUANTITY_SCALE + digits, digits, mode);
				const cost = rescale(quantity * unitCost, QUANTITY_SCALE + MONEY_SCALE, digits, mode);
				const special = line.specialOrder === true;
				if (special) specialOrderParts += sell;
				priced = basicLine('part', 'parts', line.description, index, sell, cost, taxable.parts);
				priced.quantity = line.quantity;
				priced.unitPrice = unitPrice;
				priced.specialOrder = special;
				break;
			}
			case 'labour': {
				const hours = toScaled(line.hours, QUANTITY_SCALE, mode);
				const rate = line.rate !== undefined ? toScaled(line.rate, MONEY_SCALE, mode) : fixed.labourRate;
				const costRate = line.costRate !== undefined ? toScaled(line.costRate, MONEY_SCALE, mode) : fixed.labourCostRate;
				const scale = QUANTITY_SCALE + MONEY_SCALE;
				priced = basicLine('labour', 'labour', line.description, index, rescale(hours * rate, scale, digits, mode), rescale(hours * costRate, scale, digits, mode), taxable.labour);
				priced.quantity = line.hours;
				priced.unitPrice = rescale(rate, MONEY_SCALE, digits, mode);
				break;
			}
			case 'fee':
				priced = basicLine('fee', 'fees', line.description, index, toScaled(line.amount, digits, mode), line.cost !== undefined ? toScaled(line.cost, digits, mode) : 0n, taxable.fees);
				break;
			case 'sublet':
				priced = basicLine('sublet', 'sublet', line.description, index, toScaled(line.price, digits, mode), toScaled(line.cost, digits, mode), taxable.sublet);
				break;
			case 'unit':
				priced = basicLine('unit', 'unit', line.description, index, toScaled(line.price, digits, mode), toScaled(line.cost, digits, mode), taxable.unit);
				break;
			case 'discount':
				continue;
		}
		net[priced.category as Category] += priced.sell;
		lines.push(priced);
	}

	// Category discounts come off their category, so they also come off that category's taxable base.
	for (let index = 0; index < inputs.length; index++) {
		const line = inputs[index];
		if (line.kind !== 'discount' || line.appliesTo === 'option') continue;
		const category = line.appliesTo;
		const base = net[category];
		const wanted = line.percent !== undefined ? percentOf(base, toScaled(line.percent, PERCENT_SCALE, mode), mode) : toScaled(line.amount!, digits, mode);
		const amount = wanted > base ? base : wanted;
		net[category] = base - amount;
		lines.push(basicLine('discount', category, line.description, index, -amount, 0n, taxable[category]));
	}

	// Shop supplies follow labour after labour discounts, capped.
	if (fixed.suppliesPercent > 0n && net.labour > 0n) {
		const wanted = percentOf(net.labour, fixed.suppliesPercent, mode);
		const supplies = wanted > fixed.suppliesCap ? fixed.suppliesCap : wanted;
		if (supplies > 0n) {
			net.supplies = supplies;
			lines.push(basicLine('supplies', 'supplies', 'Shop supplies', null, supplies, 0n, taxable.supplies));
		}
	}

	let subtotal = 0n;
	let taxableBase = 0n;
	for (const line of lines) {
		subtotal += line.sell;
		taxableBase += line.taxableAmount;
	}

	// The credit never takes the option below zero.
	if (creditDiagnosticFee && ctx.diagnosticFee !== null && ctx.diagnosticFee > 0n && subtotal > 0n) {
		const credit = ctx.diagnosticFee > subtotal ? subtotal : ctx.diagnosticFee;
		const priced = basicLine('diagnostic-credit', 'fees', 'Diagnostic fee credited', null, -credit, 0n, taxable.fees);
		lines.push(priced);
		subtotal -= credit;
		taxableBase += priced.taxableAmount;
	}

	// A whole-option discount lowers the taxable base in proportion to the taxable share of the subtotal
	// (a percentage comes off the taxable base directly, so a dearer part can never lower the tax).
	for (let index = 0; index < inputs.length; index++) {
		const line = inputs[index];
		if (line.kind !== 'discount' || line.appliesTo !== 'option') continue;
		const base = taxableBase > 0n ? taxableBase : 0n;
		let amount: Minor;
		let share: Minor;
		if (line.percent !== undefined) {
			const percent = toScaled(line.percent, PERCENT_SCALE, mode);
			amount = percentOf(subtotal, percent, mode);
			share = percentOf(base, percent, mode);
		} else {
			const wanted = toScaled(line.amount!, digits, mode);
			amount = wanted > subtotal ? subtotal : wanted;
			share = subtotal > 0n ? divideRounded(amount * base, subtotal, mode) : 0n;
		}
		if (amount > subtotal) amount = subtotal;
		if (share > base) share = base;
		const priced = basicLine('discount', 'option', line.description, index, -amount, 0n, share > 0n);
		priced.taxableAmount = -share;
		lines.push(priced);
		subtotal -= amount;
		taxableBase -= share;
	}

	if (taxableBase < 0n) taxableBase = 0n;
	const tax = divideRounded(taxableBase * fixed.taxRate, FRACTION_DIVISOR, mode);
	let cost = 0n;
	for (const line of lines) cost += line.cost;
	return { lines, subtotal, taxableBase, tax, total: subtotal + tax, cost, specialOrderParts };
}

function basicLine(
	kind: LineKind,
	category: LineCategory,
	description: string,
	inputIndex: number | null,
	sell: Minor,
	cost: Minor,
	isTaxable: boolean
): PricedLine {
	return {
		kind,
		category,
		description,
		inputIndex,
		quantity: null,
		unitPrice: null,
		sell,
		cost,
		taxable: isTaxable,
		taxableAmount: isTaxable ? sell : 0n,
		specialOrder: false
	};
}

/** Deposit on the amount the customer authorises: a percentage, or the special-order parts when larger. */
export function depositFor(basis: Minor, specialOrderParts: Minor, ctx: PricingContext): Minor {
	let deposit = percentOf(basis, ctx.fixed.depositPercent, ctx.mode);
	if (ctx.settings.depositRule === 'greater-of-percent-and-special-order' && specialOrderParts > deposit) {
		deposit = specialOrderParts;
	}
	return deposit > basis ? basis : deposit;
}

/** Sums the totals of several priced lists (the stages of a staged option). */
export function sumPriced(parts: readonly PricedLines[]): PricedLines {
	const sum: PricedLines = { lines: [], subtotal: 0n, taxableBase: 0n, tax: 0n, total: 0n, cost: 0n, specialOrderParts: 0n };
	for (const part of parts) {
		sum.subtotal += part.subtotal;
		sum.taxableBase += part.taxableBase;
		sum.tax += part.tax;
		sum.total += part.total;
		sum.cost += part.cost;
		sum.specialOrderParts += part.specialOrderParts;
	}
	return sum;
}
