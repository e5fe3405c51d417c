import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	Dec,
	PricingError,
	currencyDigits,
	formatMoney,
	fromMinorUnits,
	isKnownCurrency,
	marginFraction,
	marginFromMarkup,
	markupFraction,
	markupFromMargin,
	roundTo,
	toFixedString,
	toMinorUnits
} from '../../../src/lib/pricing/money';
import { divideRounded, percentOfScaled, rescale, scaledToString, toScaled } from '../../../src/lib/pricing/fixed';

describe('currency digits from ISO 4217 (currency-codes as the table)', () => {
	it('gives USD 2, JPY 0, KWD 3', () => {
		// ISO 4217 list one: USD minor unit 2, JPY 0, KWD 3.
		expect(currencyDigits('USD')).toBe(2);
		expect(currencyDigits('JPY')).toBe(0);
		expect(currencyDigits('KWD')).toBe(3);
		expect(currencyDigits('eur')).toBe(2);
	});

	it('rejects an unknown code with a message that says what to send', () => {
		expect(() => currencyDigits('XYZ')).toThrow(PricingError);
		expect(() => currencyDigits('XYZ')).toThrow(/ISO 4217/);
		expect(() => currencyDigits('US')).toThrow(PricingError);
		expect(isKnownCurrency('XYZ')).toBe(false);
	});

	it('does not treat gold or the test code as money', () => {
		// ISO 4217 lists XAU (gold) and XTS (testing) with no minor unit: they are not shop currencies.
		expect(isKnownCurrency('XAU')).toBe(false);
		expect(isKnownCurrency('XTS')).toBe(false);
		expect(isKnownCurrency('XOF')).toBe(true);
	});
});

describe('rounding modes', () => {
	it('rounds 2.675 half-up to 2.68, where a double cannot', () => {
		// 2.675 is stored as 2.67499999999999982236431605997495353221893310546875 in binary floating point.
		expect((2.675).toFixed(2)).toBe('2.67');
		expect(roundTo(new Dec('2.675'), 2, 'half-up').toString()).toBe('2.68');
	});

	it('rounds 0.125 half-even to 0.12 and half-up to 0.13', () => {
		// Banker's rounding: a tie goes to the even digit (2), half-up goes away from zero.
		expect(roundTo(new Dec('0.125'), 2, 'half-even').toString()).toBe('0.12');
		expect(roundTo(new Dec('0.135'), 2, 'half-even').toString()).toBe('0.14');
		expect(roundTo(new Dec('0.125'), 2, 'half-up').toString()).toBe('0.13');
	});

	it('prints fixed text with the right number of decimals and never "-0"', () => {
		expect(toFixedString(new Dec('12.5'), 2)).toBe('12.50');
		expect(toFixedString(new Dec('-0.001'), 2)).toBe('0.00');
		expect(toFixedString(new Dec('1200'), 0)).toBe('1200');
		expect(toFixedString(new Dec('12.3456'), 3, 'half-even')).toBe('12.346');
	});
});

describe('minor units for a payment provider', () => {
	it('sends zero-decimal currencies in whole units (Stripe list) and others in cents', () => {
		// Stripe's published zero-decimal list includes JPY and MGA; USD is two-decimal.
		expect(toMinorUnits('1000', 'JPY')).toBe(1000);
		expect(toMinorUnits('12.34', 'USD')).toBe(1234);
		expect(toMinorUnits('1500.50', 'MGA')).toBe(1501);
		expect(toMinorUnits('0.005', 'USD')).toBe(1);
		expect(toMinorUnits('0.005', 'USD', 'half-even')).toBe(0);
	});

	it('sends three-decimal currencies in thousandths ending in 0', () => {
		// Stripe: amounts in BHD, JOD, KWD, OMR, TND are sent with three decimals, the last being 0.
		expect(toMinorUnits('1.234', 'KWD')).toBe(1230);
		expect(toMinorUnits('1.235', 'KWD')).toBe(1240);
		expect(toMinorUnits('5', 'BHD') % 10).toBe(0);
	});

	it('reads minor units back into fixed text', () => {
		expect(fromMinorUnits(1234, 'USD')).toBe('12.34');
		expect(fromMinorUnits(1000, 'JPY')).toBe('1000');
		expect(fromMinorUnits(1230, 'KWD')).toBe('1.230');
	});

	it('refuses an amount too large to count exactly', () => {
		expect(() => toMinorUnits('1e20', 'USD')).toThrow(PricingError);
	});
});

describe('money in sentences', () => {
	it('uses the symbol and thousands separators', () => {
		expect(formatMoney(new Dec('1234.5'), 'USD')).toBe('$1,234.50');
		expect(formatMoney(new Dec('-89'), 'USD')).toBe('-$89.00');
		expect(formatMoney(new Dec('1200'), 'JPY')).toMatch(/^[^\d]*1,200$/);
		expect(formatMoney(new Dec('12.5'), 'KWD')).toMatch(/12\.500$/);
	});
});

describe('margin and markup', () => {
	it('margin = markup / (1 + markup): 25% markup is a 20% margin', () => {
		// Standard accounting identity: cost 100, markup 25% → price 125, margin 25/125 = 20%.
		expect(marginFromMarkup('0.25').toString()).toBe('0.2');
		expect(markupFromMargin('0.2').toString()).toBe('0.25');
		expect(marginFraction(new Dec(125), new Dec(100))!.toString()).toBe('0.2');
		expect(markupFraction(new Dec(125), new Dec(100))!.toString()).toBe('0.25');
	});

	it('has no margin without a positive price and no markup without a cost', () => {
		expect(marginFraction(new Dec(0), new Dec(10))).toBeNull();
		expect(markupFraction(new Dec(10), new Dec(0))).toBeNull();
		expect(() => markupFromMargin(1)).toThrow(PricingError);
	});

	it('keeps the margin below 100% for any positive price and positive cost', () => {
		fc.assert(
			fc.property(fc.integer({ min: 1, max: 10 ** 11 }), fc.integer({ min: 1, max: 10 ** 11 }), (sellCents, costCents) => {
				const margin = marginFraction(new Dec(sellCents).div(100), new Dec(costCents).div(100))!;
				expect(margin.lt(1)).toBe(true);
				const viaMarkup = marginFromMarkup(markupFraction(new Dec(sellCents), new Dec(costCents))!);
				expect(viaMarkup.lt(1)).toBe(true);
				// Both ways round the 34-digit quotients differently; they agree to 20 significant digits.
				expect(viaMarkup.minus(margin).abs().lte(margin.abs().plus(1).times('1e-20'))).toBe(true);
			}),
			{ numRuns: 1000 }
		);
	});
});

describe('exact scaled integers', () => {
	it('rounds a quotient half away from zero or half to even', () => {
		expect(divideRounded(25n, 10n, 'half-up')).toBe(3n);
		expect(divideRounded(-25n, 10n, 'half-up')).toBe(-3n);
		expect(divideRounded(25n, 10n, 'half-even')).toBe(2n);
		expect(divideRounded(35n, 10n, 'half-even')).toBe(4n);
		expect(divideRounded(24n, 10n, 'half-up')).toBe(2n);
	});

	it('moves between Decimal and scaled integers without loss', () => {
		expect(toScaled(new Dec('12.5'), 2)).toBe(1250n);
		expect(toScaled(new Dec('0.125'), 2, 'half-even')).toBe(12n);
		expect(scaledToString(-5n, 2)).toBe('-0.05');
		expect(scaledToString(123456n, 3)).toBe('123.456');
		expect(rescale(12345n, 4, 2, 'half-up')).toBe(123n);
		expect(percentOfScaled(2000n, 10000n)).toBe('20.00');
		expect(percentOfScaled(1n, 3n)).toBe('33.33');
		expect(percentOfScaled(1n, 0n)).toBeNull();
	});

	it('agrees with decimal.js on rounding a ratio to hundredths of a percent', () => {
		fc.assert(
			fc.property(fc.bigInt({ min: -(10n ** 15n), max: 10n ** 15n }), fc.bigInt({ min: 1n, max: 10n ** 15n }), (n, d) => {
				const expected = new Dec(n.toString()).times(100).div(d.toString()).toFixed(2, Dec.ROUND_HALF_UP);
				expect(percentOfScaled(n, d)).toBe(expected === '-0.00' ? '0.00' : expected);
			}),
			{ numRuns: 1000 }
		);
	});
});
