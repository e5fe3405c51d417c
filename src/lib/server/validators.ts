import { Decimal } from 'decimal.js';
import { z } from 'zod';

// Shared field rules for forms. Empty strings from forms mean "not given".

export const optionalText = (max: number, label = 'This') =>
	z
		.string()
		.trim()
		.max(max, `${label} must be at most ${max} characters.`)
		.optional()
		.transform((v) => v ?? '');

export const requiredText = (max: number, message: string) =>
	z.string({ error: message }).trim().min(1, message).max(max, `Keep it under ${max} characters.`);

const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);

/**
 * Form text must be a plain decimal ("12", "-0.5") before it becomes a number: "0x1F", "1e-400"
 * and "Infinity" are refused (as NaN), never read as 31, 0 or infinity.
 */
export const plainNumber = (v: unknown) => (typeof v === 'string' && v.trim() !== '' && !/^\s*[-+]?\d+(\.\d+)?\s*$/.test(v) ? Number.NaN : v);

/** A whole number in [min, max], or null when left blank. */
export const optionalInt = (min: number, max: number, label: string) =>
	z.preprocess(
		(v) => plainNumber(blankToUndefined(v)),
		z.coerce
			.number({ error: `${label} must be a whole number.` })
			.int(`${label} must be a whole number.`)
			.min(min, `${label} must be at least ${min}.`)
			.max(max, `${label} must be at most ${max}.`)
			.optional()
	).transform((v) => (v === undefined ? null : v));

/**
 * An amount as people type it: "$649", "1,149.00" or "€ 89" reads as 649, 1149.00 and 89. Commas
 * are dropped only where they group thousands (1,149 or 12,500.50), so "1,5" is still refused
 * rather than guessed at.
 */
export function plainAmount(typed: string): string {
	const bare = typed.trim().replace(/^(-?)\s*[$€£]\s*/, '$1');
	return /^-?\d{1,3}(,\d{3})+(\.\d+)?$/.test(bare) ? bare.replaceAll(',', '') : bare;
}

/** A decimal amount kept as a string (never a float), 0 ≤ value ≤ max, at most `places` decimals. */
export const decimalString = (label: string, { max = '1000000000', places = 2, min = '0' } = {}) =>
	z
		.string({ error: `Enter ${label.toLowerCase()}.` })
		.transform(plainAmount)
		.refine((v) => /^-?\d{1,12}(\.\d+)?$/.test(v), `${label} must be a number like 125.50.`)
		.refine((v) => !/^-?\d{1,12}(\.\d+)?$/.test(v) || new Decimal(v).decimalPlaces() <= places, `${label} can have at most ${places} decimals.`)
		.refine((v) => !/^-?\d{1,12}(\.\d+)?$/.test(v) || new Decimal(v).gte(min), `${label} cannot be below ${min}.`)
		.refine((v) => !/^-?\d{1,12}(\.\d+)?$/.test(v) || new Decimal(v).lte(max), `${label} must be at most ${max}.`)
		.transform((v) => new Decimal(v).toFixed(places));

export const optionalDecimalString = (label: string, options?: Parameters<typeof decimalString>[1]) =>
	z.preprocess(blankToUndefined, decimalString(label, options).optional()).transform((v) => v ?? null);

export const uuid = (message = 'Pick one from the list.') => z.uuid({ error: message });

export const isUuid = (value: string) => /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(value);
