import { z } from 'zod';
import { Dec, ZERO, isKnownCurrency, type Decimal, type DecimalValue } from './money';

/** Plain decimal text: digits with an optional point. No exponents, no "NaN", no "Infinity". */
const DECIMAL_TEXT = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)$/;
const MAX_TEXT_LENGTH = 40;

export interface DecimalFieldOptions {
	min: DecimalValue;
	max: DecimalValue;
	/** The value must be greater than min, not equal to it. */
	minExclusive?: boolean;
	maxDecimals: number;
	/** Words for the message, e.g. "an amount of money". */
	what: string;
}

/** A number field that accepts a decimal string or a finite JSON number and yields a Decimal. */
export function decimalField(options: DecimalFieldOptions) {
	const min = new Dec(options.min);
	const max = new Dec(options.max);
	const lowest = options.minExclusive ? `more than ${min.toString()}` : `at least ${min.toString()}`;
	const range = `${options.what} ${lowest} and at most ${max.toString()}`;
	return z
		.union([z.string(), z.number()], {
			error: `Enter ${options.what} as a decimal string such as "12.50" or as a number.`
		})
		.transform((raw, ctx): Decimal => {
			let value: Decimal;
			if (typeof raw === 'number') {
				if (!Number.isFinite(raw)) {
					ctx.addIssue({ code: 'custom', message: `Enter ${options.what} as a finite number.` });
					return z.NEVER;
				}
				value = new Dec(raw);
			} else {
				const text = raw.trim();
				if (text.length === 0 || text.length > MAX_TEXT_LENGTH || !DECIMAL_TEXT.test(text)) {
					ctx.addIssue({
						code: 'custom',
						message: `Enter ${options.what} as plain digits with an optional decimal point, such as "12.50".`
					});
					return z.NEVER;
				}
				value = new Dec(text);
			}
			if (value.isZero()) value = ZERO;
			if (options.minExclusive ? value.lte(min) : value.lt(min)) {
				ctx.addIssue({ code: 'custom', message: `Enter ${range}.` });
				return z.NEVER;
			}
			if (value.gt(max)) {
				ctx.addIssue({ code: 'custom', message: `Enter ${range}.` });
				return z.NEVER;
			}
			if (value.decimalPlaces() > options.maxDecimals) {
				ctx.addIssue({
					code: 'custom',
					message: `Enter ${options.what} with at most ${options.maxDecimals} decimal places.`
				});
				return z.NEVER;
			}
			return value;
		});
}

/** Caps on magnitudes keep every figure far from overflow: money ≤ 10^9, quantities ≤ 10^6. */
export const MAX_MONEY = '1000000000';
export const MAX_QUANTITY = '1000000';

export const moneyField = (what = 'an amount of money') =>
	decimalField({ min: 0, max: MAX_MONEY, maxDecimals: 6, what });
export const percentField = (what = 'a percentage') => decimalField({ min: 0, max: 100, maxDecimals: 6, what });
export const fractionField = (what: string, max: DecimalValue = 1) =>
	decimalField({ min: 0, max, maxDecimals: 8, what });
export const quantityField = (what = 'a quantity') =>
	decimalField({ min: 0, minExclusive: true, max: MAX_QUANTITY, maxDecimals: 4, what });
export const yearsField = (what = 'a number of years', minExclusive = true) =>
	decimalField({ min: 0, minExclusive, max: 100, maxDecimals: 4, what });
export const hoursField = (what = 'a number of hours', minExclusive = true) =>
	decimalField({ min: 0, minExclusive, max: MAX_QUANTITY, maxDecimals: 2, what });

export const currencyField = z
	.string({ error: 'Enter the currency as a three-letter ISO 4217 code such as USD.' })
	.trim()
	.transform((code, ctx) => {
		const upper = code.toUpperCase();
		if (!/^[A-Z]{3}$/.test(upper) || !isKnownCurrency(upper)) {
			ctx.addIssue({
				code: 'custom',
				message: `Unknown currency "${code.slice(0, 12)}": use a three-letter ISO 4217 code such as USD, EUR or JPY.`
			});
			return z.NEVER;
		}
		return upper;
	});

export const textField = (max: number, what: string) =>
	z.string({ error: `Enter ${what} as text.` }).trim().max(max, { error: `Keep ${what} to ${max} characters or fewer.` });

const TYPE_WORDS: Record<string, string> = {
	object: 'a JSON object',
	array: 'a list',
	string: 'text',
	number: 'a number',
	boolean: 'true or false'
};

/**
 * Plain messages for zod's built-in issues, passed per parse (`safeParse(x, { error: pricingErrorMap })`)
 * so messages set on a field still win. Never echoes the input back.
 */
export function pricingErrorMap(issue: z.core.$ZodRawIssue): string | undefined {
	switch (issue.code) {
		case 'invalid_type':
			return `Expected ${TYPE_WORDS[issue.expected] ?? issue.expected} here.`;
		case 'unrecognized_keys': {
			const keys = issue.keys.slice(0, 5).map((key) => `"${key.slice(0, 40)}"`).join(', ');
			return `Unknown field${issue.keys.length > 1 ? 's' : ''} ${keys}: check the spelling or leave ${issue.keys.length > 1 ? 'them' : 'it'} out.`;
		}
		case 'invalid_value':
			return `Choose one of: ${issue.values.map((value) => JSON.stringify(value)).join(', ')}.`;
		case 'invalid_union':
			return 'This value is not in any of the accepted forms.';
		default:
			return undefined;
	}
}

export interface FieldIssue {
	path: string;
	message: string;
}

/** zod issues as {path, message} pairs with dotted paths ("options.0.lines.2.quantity"). */
export function issuesOf(error: z.ZodError, prefix = ''): FieldIssue[] {
	return error.issues.slice(0, 50).map((issue) => ({
		path: [prefix, ...issue.path.map((key) => String(key))].filter((part) => part !== '').join('.'),
		message: issue.message
	}));
}
