import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { z } from 'zod';
import { scaledToString } from '../../../src/lib/pricing/fixed';
import { depositFor, priceLines, pricingContext, sellPriceForCost } from '../../../src/lib/pricing/lines';
import { Dec } from '../../../src/lib/pricing/money';
import { lineSchema } from '../../../src/lib/pricing/schema';
import {
	defaultPricingSettings,
	mergeSettings,
	pricingSettingsOverridesSchema,
	type PricingSettingsOverridesInput
} from '../../../src/lib/pricing/settings';

const lineList = z.array(lineSchema);

function settingsWith(overrides: PricingSettingsOverridesInput = {}) {
	return mergeSettings(defaultPricingSettings, pricingSettingsOverridesSchema.parse(overrides));
}

function price(lines: unknown[], overrides: PricingSettingsOverridesInput = {}, diagnosticFee?: string, credit = false) {
	const settings = settingsWith(overrides);
	const ctx = pricingContext(settings, diagnosticFee ? new Dec(diagnosticFee) : null);
	return { priced: priceLines(lineList.parse(lines), ctx, credit), ctx };
}

const usd = (units: bigint) => scaledToString(units, 2);

describe('part prices from the markup tiers', () => {
	it('multiplies the unit cost by the multiplier of the tier it falls in (upper bounds inclusive)', () => {
		const tiers = defaultPricingSettings.markupTiers;
		// Default tiers: ≤10 ×2.5, ≤50 ×2, ≤200 ×1.75, ≤500 ×1.5, above ×1.35.
		expect(sellPriceForCost(new Dec('8'), tiers).toString()).toBe('20');
		expect(sellPriceForCost(new Dec('10'), tiers).toString()).toBe('25');
		expect(sellPriceForCost(new Dec('100'), tiers).toString()).toBe('175');
		expect(sellPriceForCost(new Dec('1000'), tiers).toString()).toBe('1350');
	});

	it('never sells a dearer part for less than a cheaper one at a tier boundary', () => {
		// 10.00 × 2.5 = 25.00, but 10.01 × 2 = 20.02: the price holds at 25.00 until the tier catches up.
		const tiers = defaultPricingSettings.markupTiers;
		expect(sellPriceForCost(new Dec('10.01'), tiers).toString()).toBe('25');
		expect(sellPriceForCost(new Dec('13'), tiers).toString()).toBe('26');
	});

	it('uses an overriding unit price when one is given', () => {
		const { priced } = price([{ kind: 'part', description: 'Carburettor kit', quantity: 2, unitCost: '12.00', unitPrice: '19.95' }]);
		expect(usd(priced.lines[0].sell)).toBe('39.90');
		expect(usd(priced.lines[0].cost)).toBe('24.00');
	});
});

describe('an option priced by hand', () => {
	// Default settings with tax 7.25%:
	//   part 3 × 8.00 → 20.00 each → 60.00 (cost 24.00)
	//   part 1 × 100.00 → 175.00 (cost 100.00)
	//   labour 2.5 h × 95.00 = 237.50
	//   supplies 5% of 237.50 = 11.875 → 11.88 (cap 35.00)
	//   fee 25.00 (fees not taxable)
	//   subtotal 509.38; taxable 60 + 175 + 11.88 = 246.88; tax 246.88 × 0.0725 = 17.8988 → 17.90
	//   total 527.28; cost 124.00; gross profit 385.38; deposit 25% = 131.82; balance 395.46
	const lines = [
		{ kind: 'part', description: 'Spark plug', quantity: 3, unitCost: '8.00' },
		{ kind: 'part', description: 'Voltage regulator', quantity: 1, unitCost: '100.00' },
		{ kind: 'labour', description: 'Diagnose and replace regulator', hours: '2.5' },
		{ kind: 'fee', description: 'Pick-up', amount: '25.00', feeType: 'pickup' }
	];

	it('gives the totals worked out by hand', () => {
		const { priced, ctx } = price(lines, { taxRate: '0.0725' });
		expect(priced.lines.map((line) => usd(line.sell))).toEqual(['60.00', '175.00', '237.50', '25.00', '11.88']);
		expect(usd(priced.subtotal)).toBe('509.38');
		expect(usd(priced.taxableBase)).toBe('246.88');
		expect(usd(priced.tax)).toBe('17.90');
		expect(usd(priced.total)).toBe('527.28');
		expect(usd(priced.cost)).toBe('124.00');
		const deposit = depositFor(priced.total, priced.specialOrderParts, ctx);
		expect(usd(deposit)).toBe('131.82');
	});

	it('caps shop supplies', () => {
		// 10 h × 95 = 950; 5% = 47.50, capped at 35.00.
		const { priced } = price([{ kind: 'labour', description: 'Rewind', hours: 10 }]);
		expect(usd(priced.lines[1].sell)).toBe('35.00');
	});

	it('asks for the special-order parts as the deposit when they come to more than the percentage', () => {
		// Stator 148.00 → 259.00 (×1.75), special order; 25% of the total would be 64.75.
		const { priced, ctx } = price([{ kind: 'part', description: 'Stator', quantity: 1, unitCost: '148.00', specialOrder: true }]);
		expect(usd(priced.specialOrderParts)).toBe('259.00');
		expect(usd(depositFor(priced.total, priced.specialOrderParts, ctx))).toBe('259.00');
		const percentOnly = pricingContext(settingsWith({ depositRule: 'percent' }));
		expect(usd(depositFor(priced.total, priced.specialOrderParts, percentOnly))).toBe('64.75');
	});
});

describe('rounding policy', () => {
	it('taxes the sum of rounded lines once, not each line', () => {
		// Three parts at 0.35 (override), 5% tax: per line 0.0175 → 0.02 each = 0.06;
		// on the sum 1.05 × 0.05 = 0.0525 → 0.05. The policy is the second.
		const part = { kind: 'part', description: 'Washer', quantity: 1, unitCost: '0.10', unitPrice: '0.35' };
		const { priced } = price([part, part, part], { taxRate: '0.05' });
		expect(usd(priced.tax)).toBe('0.05');
	});

	it('rounds a tie half-up or half-even as the shop chooses', () => {
		// 10.50 × 5% = 0.525 → 0.53 half-up, 0.52 half-even.
		const part = { kind: 'part', description: 'Fuel cap', quantity: 1, unitCost: '5.00', unitPrice: '10.50' };
		expect(usd(price([part], { taxRate: '0.05' }).priced.tax)).toBe('0.53');
		expect(usd(price([part], { taxRate: '0.05', roundingMode: 'half-even' }).priced.tax)).toBe('0.52');
	});

	it('rounds each extension to the minor unit: JPY has none', () => {
		// 333 × 1.5 = 499.5 → 500 yen.
		const settings: PricingSettingsOverridesInput = { currency: 'JPY', markupTiers: [{ upTo: null, multiplier: '1.5' }] };
		const { priced } = price([{ kind: 'part', description: 'Air filter', quantity: 1, unitCost: '333' }], settings);
		expect(priced.lines[0].sell).toBe(500n);
	});
});

describe('discounts and the diagnostic credit', () => {
	it('takes a category discount off that category and its tax', () => {
		// Parts 60 + 175 = 235; 10% off parts = 23.50; taxable 235 − 23.50 = 211.50; tax 10% = 21.15.
		const { priced } = price(
			[
				{ kind: 'part', description: 'Spark plug', quantity: 3, unitCost: '8.00' },
				{ kind: 'part', description: 'Regulator', quantity: 1, unitCost: '100.00' },
				{ kind: 'discount', description: 'Loyal customer', percent: 10, appliesTo: 'parts' }
			],
			{ taxRate: '0.10' }
		);
		expect(usd(priced.subtotal)).toBe('211.50');
		expect(usd(priced.tax)).toBe('21.15');
	});

	it('spreads a whole-option amount discount over taxable and untaxed parts in proportion', () => {
		// Part 175.00 (taxed) + labour 95.00 (not) = 270.00; 27.00 off → taxable share 27 × 175/270 = 17.50;
		// taxable 157.50 × 10% = 15.75; total 243.00 + 15.75 = 258.75 (supplies off for clarity).
		const { priced } = price(
			[
				{ kind: 'part', description: 'Regulator', quantity: 1, unitCost: '100.00' },
				{ kind: 'labour', description: 'Fit regulator', hours: 1 },
				{ kind: 'discount', description: 'Goodwill', amount: '27.00' }
			],
			{ taxRate: '0.10', suppliesPercent: 0 }
		);
		expect(usd(priced.subtotal)).toBe('243.00');
		expect(usd(priced.taxableBase)).toBe('157.50');
		expect(usd(priced.total)).toBe('258.75');
	});

	it('never discounts below zero', () => {
		const { priced } = price([
			{ kind: 'fee', description: 'Call-out', amount: '20' },
			{ kind: 'discount', description: 'Too generous', amount: '50', appliesTo: 'fees' }
		]);
		expect(priced.total).toBe(0n);
	});

	it('credits the diagnostic fee on a repair, never past zero', () => {
		// Labour 1 h = 95.00 + supplies 4.75 = 99.75; credit 89.00 → 10.75.
		const { priced } = price([{ kind: 'labour', description: 'Clean carburettor', hours: 1 }], {}, '89.00', true);
		expect(priced.lines.at(-1)!.kind).toBe('diagnostic-credit');
		expect(usd(priced.total)).toBe('10.75');
		const small = price([{ kind: 'fee', description: 'Small job', amount: '30' }], {}, '89.00', true).priced;
		expect(small.total).toBe(0n);
	});
});

// ---------------------------------------------------------------------------------------------
// Properties over random options.

const cents = (max: number) => fc.integer({ min: 0, max }).map((c) => (c / 100).toFixed(2));
const arbitraryLine = fc.oneof(
	fc.record({
		kind: fc.constant('part'),
		description: fc.constant('Part'),
		quantity: fc.integer({ min: 1, max: 4000 }).map((q) => (q / 100).toString()),
		unitCost: cents(10_000_00),
		specialOrder: fc.boolean()
	}),
	fc.record({ kind: fc.constant('labour'), description: fc.constant('Labour'), hours: fc.integer({ min: 1, max: 2000 }).map((h) => (h / 100).toString()) }),
	fc.record({ kind: fc.constant('fee'), description: fc.constant('Fee'), amount: cents(500_00) }),
	fc.record({ kind: fc.constant('sublet'), description: fc.constant('Machine shop'), cost: cents(2000_00), price: cents(3000_00) }),
	fc.record({
		kind: fc.constant('discount'),
		description: fc.constant('Discount'),
		percent: fc.integer({ min: 0, max: 100 }),
		appliesTo: fc.constantFrom('option', 'parts', 'labour', 'fees', 'sublet')
	}),
	fc.record({ kind: fc.constant('discount'), description: fc.constant('Discount'), amount: cents(300_00), appliesTo: fc.constantFrom('option', 'parts', 'labour') })
);
const arbitrarySettings = fc.record({
	taxRate: fc.integer({ min: 0, max: 2500 }).map((bp) => (bp / 10000).toString()),
	suppliesPercent: fc.integer({ min: 0, max: 15 }),
	suppliesCap: cents(100_00),
	roundingMode: fc.constantFrom('half-up' as const, 'half-even' as const),
	taxable: fc.record({ parts: fc.boolean(), labour: fc.boolean(), fees: fc.boolean(), sublet: fc.boolean(), supplies: fc.boolean(), unit: fc.boolean() })
});

describe('properties of an option', () => {
	it('total = Σ rounded lines + tax, with tax = rate × taxable base rounded once', () => {
		fc.assert(
			fc.property(fc.array(arbitraryLine, { maxLength: 25 }), arbitrarySettings, (lines, overrides) => {
				const { priced, ctx } = price(lines, overrides);
				const sum = priced.lines.reduce((acc, line) => acc + line.sell, 0n);
				expect(priced.subtotal).toBe(sum);
				expect(priced.total).toBe(priced.subtotal + priced.tax);
				// Independent check of the tax in decimal.js.
				const rounding = overrides.roundingMode === 'half-even' ? Dec.ROUND_HALF_EVEN : Dec.ROUND_HALF_UP;
				const tax = new Dec(usd(priced.taxableBase)).times(overrides.taxRate).toDecimalPlaces(2, rounding);
				expect(usd(priced.tax)).toBe(tax.toFixed(2));
				expect(priced.total >= 0n).toBe(true);
				expect(ctx.digits).toBe(2);
			}),
			{ numRuns: 1000 }
		);
	});

	it('never lowers the total when a part costs more', () => {
		fc.assert(
			fc.property(
				fc.array(arbitraryLine, { minLength: 1, maxLength: 20 }),
				arbitrarySettings,
				fc.nat(),
				fc.integer({ min: 1, max: 500_00 }),
				(lines, overrides, pick, raiseCents) => {
					const parts = lines.map((line, index) => ({ line, index })).filter(({ line }) => line.kind === 'part');
					fc.pre(parts.length > 0);
					const { index } = parts[pick % parts.length];
					const dearer = lines.map((line, k) =>
						k === index && 'unitCost' in line ? { ...line, unitCost: new Dec(line.unitCost).plus(new Dec(raiseCents).div(100)).toFixed(2) } : line
					);
					const before = price(lines, overrides).priced.total;
					const after = price(dearer, overrides).priced.total;
					expect(after >= before).toBe(true);
				}
			),
			{ numRuns: 1000 }
		);
	});

	it('keeps the exact margin of every line with a cost and a positive price below 100%', () => {
		fc.assert(
			fc.property(fc.array(arbitraryLine, { maxLength: 20 }), arbitrarySettings, (lines, overrides) => {
				for (const line of price(lines, overrides).priced.lines) {
					if (line.cost <= 0n || line.sell <= 0n) continue;
					const margin = new Dec(usd(line.sell - line.cost)).div(usd(line.sell));
					expect(margin.lt(1)).toBe(true);
					expect(margin.isFinite()).toBe(true);
				}
			}),
			{ numRuns: 1000 }
		);
	});
});
