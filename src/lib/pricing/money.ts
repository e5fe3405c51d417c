import DecimalJs from 'decimal.js';
import * as currencyCodes from 'currency-codes';

export type Decimal = DecimalJs;
export type DecimalValue = DecimalJs.Value;
export type RoundingMode = 'half-up' | 'half-even';

/**
 * The engine's own Decimal constructor, so a global Decimal.set() elsewhere cannot change pricing.
 * 34 significant digits (IEEE 754 decimal128) is far more than money up to 10^15 needs.
 */
export const Dec = DecimalJs.clone({
	precision: 34,
	rounding: DecimalJs.ROUND_HALF_UP,
	toExpNeg: -40,
	toExpPos: 40
});

export const ZERO = new Dec(0);
export const ONE = new Dec(1);
export const HUNDRED = new Dec(100);

/** A problem with the input or the settings that the caller can fix; the message says how. */
export class PricingError extends Error {
	readonly path: string;
	constructor(message: string, path = '') {
		super(message);
		this.name = 'PricingError';
		this.path = path;
	}
}

/** Values from another Decimal constructor are copied so this module's precision applies to them. */
export function toDecimal(value: DecimalValue): Decimal {
	return typeof value === 'object' && value !== null && value.constructor === Dec ? value : new Dec(value);
}

/** decimal.js names: ROUND_HALF_UP rounds ties away from zero, ROUND_HALF_EVEN to the even digit. */
export function roundingConstant(mode: RoundingMode): DecimalJs.Rounding {
	return mode === 'half-even' ? DecimalJs.ROUND_HALF_EVEN : DecimalJs.ROUND_HALF_UP;
}

export function roundTo(value: Decimal, digits: number, mode: RoundingMode): Decimal {
	return value.decimalPlaces() > digits ? value.toDecimalPlaces(digits, roundingConstant(mode)) : value;
}

/**
 * Fixed-point string with exactly `digits` decimals. Faster than Decimal#toFixed when the value is
 * already rounded, which is the usual case for money, and never prints "-0".
 */
export function toFixedString(value: Decimal, digits: number, mode: RoundingMode = 'half-up'): string {
	const rounded = roundTo(value, digits, mode);
	if (rounded.isZero()) return digits > 0 ? '0.' + '0'.repeat(digits) : '0';
	const text = rounded.toString();
	if (text.includes('e')) return rounded.toFixed(digits);
	const dot = text.indexOf('.');
	if (dot < 0) return digits > 0 ? text + '.' + '0'.repeat(digits) : text;
	const have = text.length - dot - 1;
	return have === digits ? text : text + '0'.repeat(digits - have);
}

/** Codes in ISO 4217 that are not money a shop is paid in: metals, funds units, test and no-currency codes. */
const NOT_MONEY = new Set(['XAU', 'XAG', 'XPD', 'XPT', 'XBA', 'XBB', 'XBC', 'XBD', 'XDR', 'XSU', 'XUA', 'XTS', 'XXX']);

const digitsCache = new Map<string, number>();

export function isKnownCurrency(code: string): boolean {
	const upper = code.toUpperCase();
	return !NOT_MONEY.has(upper) && currencyCodes.code(upper) !== undefined;
}

/** Minor-unit digits from the ISO 4217 table: USD 2, JPY 0, KWD 3. */
export function currencyDigits(code: string): number {
	const upper = typeof code === 'string' ? code.toUpperCase() : '';
	const cached = digitsCache.get(upper);
	if (cached !== undefined) return cached;
	const record = /^[A-Z]{3}$/.test(upper) && !NOT_MONEY.has(upper) ? currencyCodes.code(upper) : undefined;
	if (!record || typeof record.digits !== 'number') {
		throw new PricingError(
			`Unknown currency "${String(code)}": use a three-letter ISO 4217 code such as USD, EUR or JPY.`,
			'currency'
		);
	}
	digitsCache.set(upper, record.digits);
	return record.digits;
}

export function roundMoney(value: Decimal, currency: string, mode: RoundingMode): Decimal {
	return roundTo(value, currencyDigits(currency), mode);
}

/** Stripe's published list of zero-decimal currencies: amounts are sent in whole units. */
export const STRIPE_ZERO_DECIMAL = new Set([
	'BIF', 'CLP', 'DJF', 'GNF', 'JPY', 'KMF', 'KRW', 'MGA', 'PYG', 'RWF', 'UGX', 'VND', 'VUV', 'XAF', 'XOF', 'XPF'
]);

/**
 * Integer amount in the minor unit a payment provider expects (Stripe's convention).
 * Zero-decimal currencies are whole units even where ISO gives them decimals (MGA).
 * Three-decimal currencies (KWD, BHD, JOD, OMR, TND, …) are sent in thousandths but Stripe requires
 * the last digit to be 0, so the amount is rounded to hundredths first.
 */
export function toMinorUnits(amount: DecimalValue, currency: string, mode: RoundingMode = 'half-up'): number {
	const upper = String(currency).toUpperCase();
	const isoDigits = currencyDigits(upper);
	const value = toDecimal(amount);
	if (!value.isFinite()) throw new PricingError('The amount is not a finite number.', 'amount');
	let minor: Decimal;
	if (STRIPE_ZERO_DECIMAL.has(upper)) minor = roundTo(value, 0, mode);
	else if (isoDigits === 3) minor = roundTo(value, 2, mode).times(1000);
	else minor = roundTo(value, isoDigits, mode).times(new Dec(10).pow(isoDigits));
	const result = minor.toNumber();
	if (!Number.isSafeInteger(result)) {
		throw new PricingError(`The amount ${value.toString()} ${upper} is too large to send for payment.`, 'amount');
	}
	return result === 0 ? 0 : result;
}

/** The reverse of toMinorUnits, as a decimal string fixed to the currency's ISO digits. */
export function fromMinorUnits(minor: number, currency: string): string {
	const upper = String(currency).toUpperCase();
	const isoDigits = currencyDigits(upper);
	if (!Number.isSafeInteger(minor)) throw new PricingError('A minor-unit amount must be a whole number.', 'amount');
	const exponent = STRIPE_ZERO_DECIMAL.has(upper) ? 0 : isoDigits;
	return toFixedString(new Dec(minor).div(new Dec(10).pow(exponent)), isoDigits);
}

const symbolCache = new Map<string, string>();

/** The symbol a sentence puts before an amount: "$", "€", or the code and a space ("KWD "). */
export function currencySymbol(code: string): string {
	let symbol = symbolCache.get(code);
	if (symbol !== undefined) return symbol;
	try {
		const parts = new Intl.NumberFormat('en', { style: 'currency', currency: code }).formatToParts(1);
		symbol = parts.find((part) => part.type === 'currency')?.value ?? code;
	} catch {
		symbol = code;
	}
	// A code-like symbol reads better with a space: "KWD 12.500", "$12.50".
	if (/^[A-Za-z]{2,}$/.test(symbol)) symbol += ' ';
	symbolCache.set(code, symbol);
	return symbol;
}

/** Money for sentences a customer reads: "$1,234.50", "¥1,200", "KWD 12.500". */
export function formatMoney(amount: Decimal, currency: string, mode: RoundingMode = 'half-up'): string {
	const upper = currency.toUpperCase();
	return formatFixedMoney(toFixedString(amount, currencyDigits(upper), mode), upper);
}

/** Adds the currency symbol and thousands separators to fixed text already at the minor unit. */
export function formatFixedMoney(fixed: string, currency: string): string {
	const upper = currency.toUpperCase();
	const negative = fixed.startsWith('-');
	const unsigned = negative ? fixed.slice(1) : fixed;
	const dot = unsigned.indexOf('.');
	const whole = dot < 0 ? unsigned : unsigned.slice(0, dot);
	const fraction = dot < 0 ? '' : unsigned.slice(dot);
	return (negative ? '-' : '') + currencySymbol(upper) + groupThousands(whole) + fraction;
}

export function groupThousands(digits: string): string {
	if (digits.length <= 3) return digits;
	let out = '';
	const lead = digits.length % 3 || 3;
	out = digits.slice(0, lead);
	for (let i = lead; i < digits.length; i += 3) out += ',' + digits.slice(i, i + 3);
	return out;
}

/** Gross profit over price. Null when there is no positive price to divide by. */
export function marginFraction(sell: Decimal, cost: Decimal): Decimal | null {
	return sell.isPositive() && !sell.isZero() ? sell.minus(cost).div(sell) : null;
}

/** Gross profit over cost. Null when the cost is zero (markup is undefined). */
export function markupFraction(sell: Decimal, cost: Decimal): Decimal | null {
	return cost.isZero() ? null : sell.minus(cost).div(cost);
}

/** margin = markup / (1 + markup), the standard accounting identity. */
export function marginFromMarkup(markup: DecimalValue): Decimal {
	const m = toDecimal(markup);
	if (m.lte(-1)) throw new PricingError('A markup of -100% or less has no margin.', 'markup');
	return m.div(ONE.plus(m));
}

/** markup = margin / (1 − margin); a margin of 100% or more has no finite markup. */
export function markupFromMargin(margin: DecimalValue): Decimal {
	const m = toDecimal(margin);
	if (m.gte(1)) throw new PricingError('A margin of 100% or more has no markup.', 'margin');
	return m.div(ONE.minus(m));
}
