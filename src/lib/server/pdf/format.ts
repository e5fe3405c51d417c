import { sayDay } from '../../dates';
import { trimZeros } from '../../pricing/format';

/*
 * Words and figures for the PDF. Money arrives as the engine's decimal strings and Intl formats
 * the string itself (exact decimal), so nothing here goes through a float.
 */

const moneyFormats = new Map<string, Intl.NumberFormat>();

/** "1234.5" in USD → "$1,234.50"; the currency's minor digits come from the engine's result. */
export function moneyFormatter(currency: string, digits: number): (amount: string) => string {
	const key = `${currency}:${digits}`;
	let format = moneyFormats.get(key);
	if (!format) {
		format = new Intl.NumberFormat('en-US', { style: 'currency', currency, minimumFractionDigits: digits, maximumFractionDigits: digits });
		moneyFormats.set(key, format);
	}
	const made = format;
	// Intl.NumberFormat#format takes a decimal string as an exact value (ECMA-402, NumberFormat v3).
	return (amount: string) => made.format(amount as unknown as number);
}

const dateAndTime = new Intl.DateTimeFormat('en-US', { dateStyle: 'long', timeStyle: 'short', timeZone: 'UTC' });

/** A date-only value ("2027-01-01") as "January 1, 2027", whatever the server's time zone. */
export function sayDate(isoDate: string): string {
	return sayDay(isoDate, 'long');
}

/** A moment as "December 2, 2026 at 2:05 PM UTC". */
export function sayDateTime(iso: string): string {
	// ICU puts a narrow no-break space before AM/PM; a plain space reads the same in every viewer.
	return `${dateAndTime.format(new Date(iso)).replace(/[\u202f\u00a0]/g, ' ')} UTC`;
}

/** "41.20" → "41.2%". */
export function sayPercent(percent: string): string {
	return `${trimZeros(percent)}%`;
}
