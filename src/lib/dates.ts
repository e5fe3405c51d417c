const MEDIUM = new Intl.DateTimeFormat('en', { dateStyle: 'medium', timeZone: 'UTC' });
const LONG = new Intl.DateTimeFormat('en', { dateStyle: 'long', timeZone: 'UTC' });

/** Noon UTC on a calendar date: the same day wherever it is read, whichever way it is moved by days. */
const noon = (isoDate: string) => new Date(`${isoDate.slice(0, 10)}T12:00:00Z`);

/**
 * A calendar date ("2026-12-30", or the date part of a longer ISO text) in words: "Dec 30, 2026",
 * or "December 30, 2026" in the long style. Read at noon UTC, so it is the same day for every reader.
 */
export function sayDay(isoDate: string, style: 'medium' | 'long' = 'medium'): string {
	return (style === 'long' ? LONG : MEDIUM).format(noon(isoDate));
}

/** Today's calendar date, "YYYY-MM-DD", as UTC sees it. */
export function today(now: Date = new Date()): string {
	return now.toISOString().slice(0, 10);
}

/** The calendar date `days` after (or before, when negative) `isoDate`. */
export function addDays(isoDate: string, days: number): string {
	const d = noon(isoDate);
	d.setUTCDate(d.getUTCDate() + days);
	return d.toISOString().slice(0, 10);
}
