// Exact decimal arithmetic on scaled integers for the line-pricing hot path. A value is a BigInt of
// units of 10^-scale: money rounded to the currency is a count of minor units, as a payment provider
// counts it. Nothing here is a float; every division rounds explicitly.
import { Dec, PricingError, roundingConstant, type Decimal, type RoundingMode } from './money';

const POW10: bigint[] = [];
for (let k = 0, p = 1n; k <= 60; k++, p *= 10n) POW10.push(p);

export function pow10(exponent: number): bigint {
	const value = POW10[exponent];
	if (value === undefined) throw new PricingError('A figure has too many decimal places.', '');
	return value;
}

/** n / d rounded to a whole number: ties away from zero (half-up) or to even (half-even). d > 0. */
export function divideRounded(n: bigint, d: bigint, mode: RoundingMode): bigint {
	const q = n / d;
	const r = n % d;
	if (r === 0n) return q;
	const twice = (r < 0n ? -r : r) * 2n;
	if (twice > d || (twice === d && (mode === 'half-up' || (q & 1n) !== 0n))) return n < 0n ? q - 1n : q + 1n;
	return q;
}

/** Changes the scale of a scaled integer, rounding when decimals are dropped. */
export function rescale(units: bigint, from: number, to: number, mode: RoundingMode): bigint {
	if (to === from) return units;
	if (to > from) return units * pow10(to - from);
	return divideRounded(units, pow10(from - to), mode);
}

/** A Decimal as units of 10^-scale; extra decimals are rounded with the given mode. */
export function toScaled(value: Decimal, scale: number, mode: RoundingMode = 'half-up'): bigint {
	let text = value.toString();
	let dot = text.indexOf('.');
	if (dot >= 0 && text.length - dot - 1 > scale) {
		text = value.toDecimalPlaces(scale, roundingConstant(mode)).toString();
		dot = text.indexOf('.');
	}
	if (text.includes('e')) {
		text = value.toFixed(scale, roundingConstant(mode));
		dot = text.indexOf('.');
	}
	if (dot < 0) return BigInt(text) * pow10(scale);
	const decimals = text.length - dot - 1;
	return BigInt(text.slice(0, dot) + text.slice(dot + 1)) * pow10(scale - decimals);
}

/** Units of 10^-scale as fixed text with exactly `scale` decimals: (12345n, 2) → "123.45". */
export function scaledToString(units: bigint, scale: number): string {
	const negative = units < 0n;
	const digits = (negative ? -units : units).toString();
	if (scale === 0) return negative ? '-' + digits : digits;
	const padded = digits.length <= scale ? '0'.repeat(scale - digits.length + 1) + digits : digits;
	const cut = padded.length - scale;
	return (negative ? '-' : '') + padded.slice(0, cut) + '.' + padded.slice(cut);
}

export function scaledToDecimal(units: bigint, scale: number): Decimal {
	return new Dec(scaledToString(units, scale));
}

/** 100 × n / d as hundredths of a percent, printed "20.00"; null when d is not positive. */
export function percentOfScaled(n: bigint, d: bigint): string | null {
	if (d <= 0n) return null;
	return scaledToString(divideRounded(n * 10000n, d, 'half-up'), 2);
}
