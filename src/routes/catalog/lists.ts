// Words and field layouts for the three catalog lists, shared by the list page and the edit page.
import { UNIT_KIND_LABELS } from '$lib/domain';

export type ListName = 'parts' | 'labour' | 'replacements';

export const LIST_TITLES: Record<ListName, string> = {
	parts: 'Parts',
	labour: 'Labour operations',
	replacements: 'Replacement units'
};

export const KIND_LABELS: Record<string, string> = UNIT_KIND_LABELS;

export interface FieldSpec {
	name: string;
	label: string;
	type: 'text' | 'decimal' | 'integer' | 'checkbox' | 'kind';
	required?: boolean;
	hint?: string;
	wide?: boolean;
}

export const FIELDS: Record<ListName, FieldSpec[]> = {
	parts: [
		{ name: 'number', label: 'Part number', type: 'text', required: true },
		{ name: 'description', label: 'Description', type: 'text', required: true, wide: true },
		{ name: 'cost', label: 'Cost (what the shop pays)', type: 'decimal', required: true, hint: 'Before markup, such as 42.50.' },
		{ name: 'supplier', label: 'Supplier', type: 'text' },
		{ name: 'stock', label: 'In stock', type: 'integer', hint: 'How many are on the shelf.' },
		{ name: 'specialOrder', label: 'Special order (ordered for the job; may call for a deposit)', type: 'checkbox', wide: true }
	],
	labour: [
		{ name: 'name', label: 'Operation', type: 'text', required: true, wide: true },
		{ name: 'hours', label: 'Flat-rate hours', type: 'decimal', required: true, hint: 'Billed hours, such as 0.8.' }
	],
	replacements: [
		{ name: 'name', label: 'Unit name', type: 'text', required: true, wide: true },
		{ name: 'kind', label: 'Kind', type: 'kind', required: true },
		{ name: 'ratedWatts', label: 'Rated running watts', type: 'integer', required: true },
		{ name: 'priceNew', label: 'Price new', type: 'decimal', required: true },
		{ name: 'lifeYears', label: 'Expected life (years)', type: 'decimal', required: true },
		{ name: 'lifeHours', label: 'Expected life (engine hours)', type: 'integer', required: true }
	]
};

/** Orders plain non-negative decimal strings ("12.50" < "100.00") without turning them into floats. */
export function compareDecimalText(a: string, b: string): number {
	const [aw, af = ''] = a.split('.');
	const [bw, bf = ''] = b.split('.');
	const wa = aw.replace(/^0+(?=\d)/, '');
	const wb = bw.replace(/^0+(?=\d)/, '');
	if (wa.length !== wb.length) return wa.length - wb.length;
	if (wa !== wb) return wa < wb ? -1 : 1;
	const width = Math.max(af.length, bf.length);
	const fa = af.padEnd(width, '0');
	const fb = bf.padEnd(width, '0');
	return fa === fb ? 0 : fa < fb ? -1 : 1;
}

/** Price text for the shop's currency; Intl formats the decimal string exactly. */
export function moneyFormatter(currency: string): (amount: string) => string {
	const format = new Intl.NumberFormat('en', { style: 'currency', currency });
	return (amount) => format.format(amount as Intl.StringNumericLiteral);
}

export const trimDecimal = (text: string) => (text.includes('.') ? text.replace(/\.?0+$/, '') : text);
