const MEDIUM = new Intl.DateTimeFormat('en', { dateStyle: 'medium', timeZone: 'UTC' });
const LONG = new Intl.DateTimeFormat('en', { dateStyle: 'long', timeZone: 'UTC' });

/**
 * A calendar date ("2026-12-30", or the date part of a longer ISO text) in words: "Dec 30, 2026",
 * or "December 30, 2026" in the long style. Read at noon UTC, so it is the same day for every reader.
 */
export function sayDay(isoDate: string, style: 'medium' | 'long' = 'medium'): string {
	return (style === 'long' ? LONG : MEDIUM).format(new Date(`${isoDate.slice(0, 10)}T12:00:00Z`));
}

/** Today's calendar date, "YYYY-MM-DD", as UTC sees it. */
export function today(now: Date = new Date()): string {
	return now.toISOString().slice(0, 10);
}

/** The calendar date `days` after (or before, when negative) `isoDate`. */
export function addDays(isoDate: string, days: number): string {
	const d = new Date(`${isoDate.slice(0, 10)}T12:00:00Z`);
	d.setUTCDate(d.getUTCDate() + days);
	return d.toISOString().slice(0, 10);
}
