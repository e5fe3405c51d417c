// What the quote page hands its components: the shop's catalog and the settings they show.

export interface CatalogPart {
	id: string;
	number: string;
	description: string;
	specialOrder: boolean;
	stock: number;
	/** The sell price the shop's markup tiers give the part. */
	price: string;
	/** Only for roles that see costs. */
	cost?: string;
}

export interface CatalogLabour {
	id: string;
	name: string;
	hours: string;
}

export interface CatalogReplacement {
	id: string;
	kind: string;
	name: string;
	ratedWatts: number;
	priceNew: string;
	lifeYears: string;
	lifeHours: string;
}

export interface CatalogLists {
	parts: CatalogPart[];
	partsTotal: number;
	labour: CatalogLabour[];
	replacements: CatalogReplacement[];
	/** Searches the whole parts list on the server, when the page holds only part of it. */
	search?: (query: string, signal: AbortSignal) => Promise<CatalogPart[]>;
}
