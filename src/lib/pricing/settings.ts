import { z } from 'zod';
import {
	currencyField,
	decimalField,
	fractionField,
	moneyField,
	percentField,
	yearsField,
	MAX_MONEY
} from './fields';
import { Dec, type Decimal } from './money';

export const conditions = ['excellent', 'good', 'fair', 'poor'] as const;
export type Condition = (typeof conditions)[number];

export const categories = ['parts', 'labour', 'fees', 'sublet', 'supplies', 'unit'] as const;
export type Category = (typeof categories)[number];

const markupTierSchema = z.strictObject({
	upTo: decimalField({ min: 0, minExclusive: true, max: MAX_MONEY, maxDecimals: 6, what: 'the top of a cost tier' }).nullable(),
	multiplier: decimalField({ min: 0, minExclusive: true, max: 100, maxDecimals: 4, what: 'a markup multiplier' })
});

const markupTiersSchema = z
	.array(markupTierSchema)
	.min(1, { error: 'Add at least one markup tier.' })
	.max(20, { error: 'Use at most 20 markup tiers.' })
	.superRefine((tiers, ctx) => {
		for (let k = 0; k < tiers.length; k++) {
			const upTo = tiers[k].upTo;
			const last = k === tiers.length - 1;
			if (last && upTo !== null) {
				ctx.addIssue({ code: 'custom', path: [k, 'upTo'], message: 'The last markup tier must have no upper bound (upTo: null).' });
			}
			if (!last && upTo === null) {
				ctx.addIssue({ code: 'custom', path: [k, 'upTo'], message: 'Only the last markup tier may have no upper bound.' });
			}
			const before = k > 0 ? tiers[k - 1].upTo : null;
			if (upTo !== null && before !== null && upTo.lte(before)) {
				ctx.addIssue({ code: 'custom', path: [k, 'upTo'], message: 'Markup tiers must be in order of rising unit cost.' });
			}
		}
	});

const taxableSchema = z.strictObject({
	parts: z.boolean(),
	labour: z.boolean(),
	fees: z.boolean(),
	sublet: z.boolean(),
	supplies: z.boolean(),
	unit: z.boolean()
});

const factor = () => fractionField('a condition factor between 0 and 1');
const conditionFactorsSchema = z.strictObject({
	excellent: factor(),
	good: factor(),
	fair: factor(),
	poor: factor()
});

const settingsShape = {
	currency: currencyField,
	roundingMode: z.enum(['half-up', 'half-even'], { error: 'Choose the rounding mode "half-up" or "half-even".' }),
	labourRate: moneyField('a labour rate per hour'),
	labourCostRate: moneyField('a labour cost per hour'),
	markupTiers: markupTiersSchema,
	suppliesPercent: percentField('the shop-supplies percentage'),
	suppliesCap: moneyField('the shop-supplies cap'),
	taxRate: fractionField('a tax rate as a fraction, such as 0.0725'),
	taxable: taxableSchema,
	depositPercent: percentField('the deposit percentage'),
	depositRule: z.enum(['percent', 'greater-of-percent-and-special-order'], {
		error: 'Choose the deposit rule "percent" or "greater-of-percent-and-special-order".'
	}),
	discountRate: fractionField('a discount rate as a fraction, such as 0.08'),
	annualHours: decimalField({ min: 0, minExclusive: true, max: 8784, maxDecimals: 2, what: 'engine hours per year' }),
	salvageFloorPercent: percentField('the salvage floor percentage'),
	conditionFactors: conditionFactorsSchema,
	repairThresholdPercent: percentField('the repair threshold percentage'),
	closeCallBand: fractionField('a close-call band as a fraction, such as 0.10', '0.5'),
	minimumLifeAfterRepair: yearsField('a minimum life after repair in years'),
	targetMarginPercent: decimalField({ min: 0, max: '99.99', maxDecimals: 2, what: 'a target margin percentage' })
};

/** Validates a complete set of shop pricing settings. */
export const pricingSettingsSchema = z.strictObject(settingsShape);

/** Validates partial overrides (a shop's saved settings, or per-request settings). Arrays replace, objects merge. */
export const pricingSettingsOverridesSchema = z.strictObject(settingsShape).partial().extend({
	taxable: taxableSchema.partial().optional(),
	conditionFactors: conditionFactorsSchema.partial().optional()
});

/** Settings as the engine uses them: numbers are Decimal. JSON.stringify turns them into strings. */
export type PricingSettings = z.output<typeof pricingSettingsSchema>;
/** Settings as stored or typed in a form: numbers as decimal strings (or JSON numbers). */
export type PricingSettingsInput = z.input<typeof pricingSettingsSchema>;
export type PricingSettingsOverrides = z.output<typeof pricingSettingsOverridesSchema>;
export type PricingSettingsOverridesInput = z.input<typeof pricingSettingsOverridesSchema>;
export type MarkupTier = PricingSettings['markupTiers'][number];

/** Settings with every number as a decimal string, safe to send to a page or store as JSON. */
export type PricingSettingsJson = {
	[K in keyof PricingSettings]: PricingSettings[K] extends Decimal
		? string
		: PricingSettings[K] extends MarkupTier[]
			? { upTo: string | null; multiplier: string }[]
			: PricingSettings[K] extends Record<string, Decimal>
				? Record<keyof PricingSettings[K], string>
				: PricingSettings[K];
};

/** Defaults; each is sourced or marked common practice in docs/pricing.md. */
export const defaultPricingSettingsInput = {
	currency: 'USD',
	roundingMode: 'half-up',
	labourRate: '95.00',
	labourCostRate: '0.00',
	markupTiers: [
		{ upTo: '10.00', multiplier: '2.50' },
		{ upTo: '50.00', multiplier: '2.00' },
		{ upTo: '200.00', multiplier: '1.75' },
		{ upTo: '500.00', multiplier: '1.50' },
		{ upTo: null, multiplier: '1.35' }
	],
	suppliesPercent: '5',
	suppliesCap: '35.00',
	taxRate: '0',
	taxable: { parts: true, labour: false, fees: false, sublet: false, supplies: true, unit: true },
	depositPercent: '25',
	depositRule: 'greater-of-percent-and-special-order',
	discountRate: '0.08',
	annualHours: '100',
	salvageFloorPercent: '10',
	conditionFactors: { excellent: '1.00', good: '0.90', fair: '0.75', poor: '0.50' },
	repairThresholdPercent: '50',
	closeCallBand: '0.10',
	minimumLifeAfterRepair: '1',
	targetMarginPercent: '40'
} satisfies PricingSettingsInput;

function deepFreeze<T>(value: T): T {
	// Decimal instances are left alone: decimal.js builds results on fresh objects, never on frozen ones.
	if (value && typeof value === 'object' && !Object.isFrozen(value) && !(value instanceof Dec)) {
		for (const key of Object.keys(value)) deepFreeze((value as Record<string, unknown>)[key]);
		Object.freeze(value);
	}
	return value;
}

export const defaultPricingSettings: PricingSettings = deepFreeze(pricingSettingsSchema.parse(defaultPricingSettingsInput));

/** defaults ← overrides, in order. Arrays (markup tiers) are replaced whole; taxable and condition factors merge. */
export function mergeSettings(base: PricingSettings, ...overrides: (PricingSettingsOverrides | undefined)[]): PricingSettings {
	let merged: PricingSettings = base;
	for (const layer of overrides) {
		if (!layer) continue;
		const { taxable, conditionFactors, ...rest } = layer;
		const defined = Object.fromEntries(Object.entries(rest).filter(([, value]) => value !== undefined));
		merged = {
			...merged,
			...defined,
			taxable: { ...merged.taxable, ...dropUndefined(taxable) },
			conditionFactors: { ...merged.conditionFactors, ...dropUndefined(conditionFactors) }
		};
	}
	return merged;
}

function dropUndefined<T extends object>(value: T | undefined): Partial<T> {
	if (!value) return {};
	return Object.fromEntries(Object.entries(value).filter(([, v]) => v !== undefined)) as Partial<T>;
}

/** Plain JSON form of settings (Decimal → string), for storage, pages and results. */
export function settingsToJson(settings: PricingSettings): PricingSettingsJson {
	const text = (value: Decimal) => value.toString();
	const c = settings.conditionFactors;
	return {
		currency: settings.currency,
		roundingMode: settings.roundingMode,
		labourRate: text(settings.labourRate),
		labourCostRate: text(settings.labourCostRate),
		markupTiers: settings.markupTiers.map((tier) => ({ upTo: tier.upTo === null ? null : text(tier.upTo), multiplier: text(tier.multiplier) })),
		suppliesPercent: text(settings.suppliesPercent),
		suppliesCap: text(settings.suppliesCap),
		taxRate: text(settings.taxRate),
		taxable: { ...settings.taxable },
		depositPercent: text(settings.depositPercent),
		depositRule: settings.depositRule,
		discountRate: text(settings.discountRate),
		annualHours: text(settings.annualHours),
		salvageFloorPercent: text(settings.salvageFloorPercent),
		conditionFactors: { excellent: text(c.excellent), good: text(c.good), fair: text(c.fair), poor: text(c.poor) },
		repairThresholdPercent: text(settings.repairThresholdPercent),
		closeCallBand: text(settings.closeCallBand),
		minimumLifeAfterRepair: text(settings.minimumLifeAfterRepair),
		targetMarginPercent: text(settings.targetMarginPercent)
	};
}
