import { formatFixedMoney } from '$lib/pricing/money';

export type ColumnFormat = 'month' | 'text' | 'count' | 'money' | 'hours' | 'ratio' | 'percent' | 'days' | 'date';
export interface Column {
	key: string;
	label: string;
	format: ColumnFormat;
}
export type Row = Record<string, string | number | null>;

export interface Report {
	name: string;
	title: string;
	basis: string;
	currency: string;
	filters: { from: string; to: string; technician: string | null; kind: string | null };
	columns: Column[];
	rows: Row[];
	totals: Row;
}

const monthName = new Intl.DateTimeFormat('en', { month: 'short', year: 'numeric', timeZone: 'UTC' });

/** "2026-03" → "Mar 2026". */
export function monthLabel(month: string): string {
	const [y, m] = month.split('-').map(Number);
	return Number.isFinite(y) && Number.isFinite(m) ? monthName.format(new Date(Date.UTC(y, m - 1, 1))) : month;
}

/** A figure as the table shows it; the API's decimal strings are never turned into floats here. */
export function formatValue(value: string | number | null | undefined, format: ColumnFormat, currency: string): string {
	if (value === null || value === undefined || value === '') return '—';
	const text = String(value);
	switch (format) {
		case 'money':
			return formatFixedMoney(text, currency);
		case 'month':
			return monthLabel(text);
		case 'hours':
			return `${text} h`;
		case 'percent':
			return `${text}%`;
		case 'ratio':
			return `${text}×`;
		default:
			return text;
	}
}

/** A number for placing a point on the canvas only; every figure in words comes from the strings. */
export const plotted = (value: string | number | null | undefined): number | null => (value === null || value === undefined || value === '' ? null : Number(value));
