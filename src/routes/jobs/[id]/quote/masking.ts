// Someone the shop keeps from costs still edits the quote: their copy of the draft carries no cost
// inputs (parts show their sell price instead), and a save puts the stored costs back.
import { Dec, currencyDigits, roundMoney } from '$lib/pricing/money';
import { sellPriceForCost } from '$lib/pricing/lines';
import type { PricingSettings } from '$lib/pricing/settings';

type Line = Record<string, unknown>;
export interface DraftShape {
	unit: Record<string, unknown>;
	options: Record<string, unknown>[];
}

/** Cost inputs per line kind; they change costs and margins, never what the customer pays. */
const COST_FIELDS: Record<string, readonly string[]> = {
	part: ['unitCost'],
	labour: ['costRate'],
	fee: ['cost'],
	sublet: ['cost'],
	unit: ['cost']
};
/** Cost inputs the engine requires; a masked copy holds zero there. */
const REQUIRED_COST = new Set(['part.unitCost', 'sublet.cost', 'unit.cost']);

/** A line picked from the parts catalog: "part:<part id>:<suffix>". */
const CATALOG_PART_ID = /^part:([0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}):/;

const isRecord = (value: unknown): value is Record<string, unknown> => !!value && typeof value === 'object' && !Array.isArray(value);

/** Every line list of a draft: option lines and stage lines, with a place name for ids. */
function lineLists(draft: DraftShape): { place: string; lines: unknown[] }[] {
	const lists: { place: string; lines: unknown[] }[] = [];
	draft.options.forEach((option, o) => {
		if (!isRecord(option)) return;
		if (Array.isArray(option.lines)) lists.push({ place: `o${o}`, lines: option.lines });
		if (Array.isArray(option.stages)) {
			option.stages.forEach((stage, s) => {
				if (isRecord(stage) && Array.isArray(stage.lines)) lists.push({ place: `o${o}s${s}`, lines: stage.lines });
			});
		}
	});
	return lists;
}

/** A deep copy in which every line has an id; lines without one get an id from their place. */
export function withLineIds(draft: DraftShape): DraftShape {
	const copy = structuredClone(draft);
	for (const { place, lines } of lineLists(copy)) {
		lines.forEach((line, j) => {
			if (isRecord(line) && (typeof line.id !== 'string' || line.id === '')) line.id = `${place}l${j}`;
		});
	}
	return copy;
}

/** The sell price per unit the markup tiers give a part cost, at the currency's minor unit. */
export function tierPrice(unitCost: unknown, pricing: PricingSettings): string | null {
	if (typeof unitCost !== 'string' && typeof unitCost !== 'number') return null;
	try {
		const cost = new Dec(unitCost);
		if (!cost.isFinite() || cost.isNeg()) return null;
		const price = roundMoney(sellPriceForCost(cost, pricing.markupTiers), pricing.currency, pricing.roundingMode);
		return price.toFixed(currencyDigits(pricing.currency));
	} catch {
		return null;
	}
}

function samePrice(a: unknown, b: string | null): boolean {
	if (b === null || (typeof a !== 'string' && typeof a !== 'number')) return false;
	try {
		return new Dec(a).eq(b);
	} catch {
		return false;
	}
}

/** The draft without cost inputs: parts are priced by their sell price each, other costs are zero or left out. */
export function maskDraft(draft: DraftShape, pricing: PricingSettings): DraftShape {
	const copy = withLineIds(draft);
	for (const { lines } of lineLists(copy)) {
		for (const line of lines) {
			if (!isRecord(line) || typeof line.kind !== 'string') continue;
			if (line.kind === 'part' && line.unitPrice === undefined) {
				const price = tierPrice(line.unitCost, pricing);
				if (price !== null) line.unitPrice = price;
			}
			for (const field of COST_FIELDS[line.kind] ?? []) {
				if (REQUIRED_COST.has(`${line.kind}.${field}`)) line[field] = '0';
				else delete line[field];
			}
		}
	}
	return copy;
}

/**
 * Puts back the cost inputs a masked editor could not see: from the stored line with the same id,
 * or from the catalog for a part picked there. A price that is just the tier price of the cost is
 * dropped again, so the markup tiers keep pricing the part.
 */
export function unmaskDraft(incoming: unknown, stored: DraftShape, catalogCost: (partId: string) => string | null, pricing: PricingSettings): unknown {
	if (!isRecord(incoming) || !Array.isArray(incoming.options)) return incoming;
	const draft = structuredClone(incoming) as unknown as DraftShape;
	const before = new Map<string, Line>();
	for (const { lines } of lineLists(withLineIds(stored))) {
		for (const line of lines) if (isRecord(line) && typeof line.id === 'string') before.set(line.id, line);
	}
	for (const { lines } of lineLists(draft)) {
		for (const line of lines) {
			if (!isRecord(line) || typeof line.kind !== 'string' || typeof line.id !== 'string') continue;
			const old = before.get(line.id);
			if (old && old.kind === line.kind) {
				for (const field of COST_FIELDS[line.kind] ?? []) {
					if (old[field] === undefined) delete line[field];
					else line[field] = old[field];
				}
				if (line.kind === 'part' && old.unitPrice === undefined && samePrice(line.unitPrice, tierPrice(old.unitCost, pricing))) delete line.unitPrice;
				continue;
			}
			const picked = line.kind === 'part' ? CATALOG_PART_ID.exec(line.id) : null;
			const cost = picked ? catalogCost(picked[1]) : null;
			if (cost !== null) {
				line.unitCost = cost;
				if (samePrice(line.unitPrice, tierPrice(cost, pricing))) delete line.unitPrice;
			}
		}
	}
	return draft;
}

/** Catalog part ids named by the lines of a draft. */
export function catalogPartIds(incoming: unknown): string[] {
	if (!isRecord(incoming) || !Array.isArray(incoming.options)) return [];
	const ids = new Set<string>();
	for (const { lines } of lineLists(incoming as unknown as DraftShape)) {
		for (const line of lines) {
			const match = isRecord(line) && typeof line.id === 'string' ? CATALOG_PART_ID.exec(line.id) : null;
			if (match) ids.add(match[1]);
		}
	}
	return [...ids].slice(0, 200);
}

/** A catalog part as the builder shows it: its sell price always, its cost only to those who see costs. */
export function partView(row: Record<string, unknown>, pricing: PricingSettings, seesCosts: boolean) {
	return {
		id: String(row.id),
		number: String(row.number),
		description: String(row.description),
		specialOrder: Boolean(row.specialOrder),
		stock: Number(row.stock),
		price: tierPrice(String(row.cost), pricing) ?? '0',
		...(seesCosts ? { cost: String(row.cost) } : {})
	};
}
