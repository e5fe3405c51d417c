import { divideRounded, percentOfScaled, scaledToString, toScaled } from './fixed';
import { HUNDRED, currencySymbol, groupThousands, toFixedString, type Decimal, type RoundingMode } from './money';

/** Output formatting shared by the result builder and the reasons. */
export interface Formatter {
	currency: string;
	digits: number;
	mode: RoundingMode;
	/** Minor units as fixed text: 123450n → "1234.50". */
	money(units: bigint): string;
	/** A Decimal amount rounded to the minor unit: "1234.50". */
	decimal(value: Decimal): string;
	/** Money for a sentence: "$1,234.50". */
	say(amount: bigint | Decimal): string;
}

const formatters = new Map<string, Formatter>();

/** One formatter per currency and rounding mode, made once. */
export function formatter(currency: string, digits: number, mode: RoundingMode): Formatter {
	const key = currency + mode;
	let made = formatters.get(key);
	if (!made) {
		made = makeFormatter(currency, digits, mode);
		formatters.set(key, made);
	}
	return made;
}

function makeFormatter(currency: string, digits: number, mode: RoundingMode): Formatter {
	const symbol = currencySymbol(currency);
	const money = (units: bigint) => scaledToString(units, digits);
	const decimal = (value: Decimal) => toFixedString(value, digits, mode);
	const say = (amount: bigint | Decimal) => {
		const fixed = typeof amount === 'bigint' ? money(amount) : decimal(amount);
		const negative = fixed.charCodeAt(0) === 45;
		const unsigned = negative ? fixed.slice(1) : fixed;
		const dot = unsigned.indexOf('.');
		const whole = dot < 0 ? unsigned : unsigned.slice(0, dot);
		return (negative ? '-' : '') + symbol + groupThousands(whole) + (dot < 0 ? '' : unsigned.slice(dot));
	};
	return { currency, digits, mode, money, decimal, say };
}

/**
 * A ratio as a percentage with two decimals ("20.00"), rounded half away from zero, or null when the
 * denominator is not positive. Worked in exact integers: Decimal division is the slowest step here.
 */
export function percentString(numerator: Decimal, denominator: Decimal): string | null {
	if (!denominator.gt(0)) return null;
	const scale = Math.max(numerator.decimalPlaces(), denominator.decimalPlaces());
	if (scale > 30) return toFixedString(numerator.times(HUNDRED).div(denominator), 2, 'half-up');
	return percentOfScaled(toScaled(numerator, scale), toScaled(denominator, scale));
}

export function fractionAsPercent(fraction: Decimal): string {
	return toFixedString(fraction.times(HUNDRED), 2, 'half-up');
}

export function factorString(value: Decimal): string {
	return toFixedString(value, 6, 'half-up');
}

export function yearsString(value: Decimal): string {
	return toFixedString(value, 2, 'half-up');
}

/** "3 years", "1 year", "3.5 years". */
export function sayYears(value: Decimal): string {
	const text = trimZeros(toFixedString(value, 1, 'half-up'));
	return text === '1' ? '1 year' : `${text} years`;
}

/** "41%", "12.5%". */
export function sayPercent(fraction: Decimal): string {
	return trimZeros(toFixedString(fraction.times(HUNDRED), 1, 'half-up')) + '%';
}

/** "1,000" for a count such as engine hours. */
export function sayNumber(value: Decimal): string {
	const text = trimZeros(toFixedString(value, 1, 'half-up'));
	const dot = text.indexOf('.');
	return dot < 0 ? groupThousands(text) : groupThousands(text.slice(0, dot)) + text.slice(dot);
}

/** n / d as a percentage for a sentence ("47.3%"), in exact integers; d > 0. */
export function sayRatio(n: bigint, d: bigint): string {
	return trimZeros(scaledToString(divideRounded(n * 1000n, d, 'half-up'), 1)) + '%';
}

export function trimZeros(text: string): string {
	return text.includes('.') ? text.replace(/\.?0+$/, '') : text;
}
