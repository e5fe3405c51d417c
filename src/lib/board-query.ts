// The job board's filters, shared by the page (address bar) and the server (SQL).
import { JOB_STATUSES, type JobStatus, type UnitKind } from './domain';

/** With a search or age filter the board counts matching jobs exactly up to this many; beyond it, "more than". */
export const COUNT_LIMIT = 200;

export const SORT_KEYS = ['number', 'customer', 'unit', 'status', 'technician', 'promised', 'changed', 'opened'] as const;
export type SortKey = (typeof SORT_KEYS)[number];

const isUuid = (value: string) => /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(value);

export const AGES = { '2': 'Opened in the last 2 days', '7': 'Opened in the last week', '30': 'Opened in the last 30 days', stale: 'Waiting over 14 days in its status' } as const;

export interface BoardQuery {
	q: string;
	status: JobStatus[];
	tech: string;
	age: '' | keyof typeof AGES;
	sort: SortKey;
	dir: 'asc' | 'desc';
	page: number;
	per: number;
}

const pick = <T extends string>(value: string | null, allowed: readonly T[], fallback: T): T =>
	allowed.includes(value as T) ? (value as T) : fallback;

const wholeNumber = (value: string | null, min: number, max: number, fallback: number) => {
	// Digits only: "0x1F" or "1e3" is not a page number.
	const n = value !== null && /^\d{1,9}$/.test(value) ? Number(value) : Number.NaN;
	return Number.isInteger(n) && n >= min && n <= max ? n : fallback;
};

/** The board's filters as they appear in the address bar; anything odd falls back to a default. */
export function parseBoardQuery(params: URLSearchParams): BoardQuery {
	const status = [...new Set(params.getAll('status').flatMap((s) => s.split(',')))].filter((s): s is JobStatus =>
		(JOB_STATUSES as readonly string[]).includes(s)
	);
	const tech = params.get('tech') ?? '';
	return {
		// Control characters (a NUL cannot even be sent to PostgreSQL) separate words like spaces.
		q: (params.get('q') ?? '').replace(/[\u0000-\u001f\u007f]/g, ' ').trim().slice(0, 100),
		status,
		tech: tech === 'none' || isUuid(tech) ? tech : '',
		age: pick(params.get('age'), ['', '2', '7', '30', 'stale'] as const, ''),
		sort: pick(params.get('sort'), SORT_KEYS, 'opened'),
		dir: pick(params.get('dir'), ['asc', 'desc'] as const, 'desc'),
		page: wholeNumber(params.get('page'), 1, 100_000, 1),
		per: wholeNumber(params.get('per'), 10, 100, 25)
	};
}

/** The address-bar form of a query, leaving defaults out so links stay short. */
export function toSearchParams(query: Partial<BoardQuery>): URLSearchParams {
	const params = new URLSearchParams();
	if (query.q) params.set('q', query.q);
	for (const s of query.status ?? []) params.append('status', s);
	if (query.tech) params.set('tech', query.tech);
	if (query.age) params.set('age', query.age);
	if (query.sort && query.sort !== 'opened') params.set('sort', query.sort);
	if (query.dir && query.dir !== 'desc') params.set('dir', query.dir);
	if (query.page && query.page > 1) params.set('page', String(query.page));
	if (query.per && query.per !== 25) params.set('per', String(query.per));
	return params;
}


export interface BoardRow {
	id: string;
	number: number;
	status: JobStatus;
	complaint: string;
	customer: string;
	unit: string;
	kind: UnitKind;
	serial: string;
	technician: string | null;
	promisedOn: string | null;
	openedAt: string;
	changedAt: string;
}

export interface BoardPage {
	rows: BoardRow[];
	/** Jobs matching every filter; null when more than the board counts (see `exact`). */
	total: number | null;
	/** False when a search or age filter answered in SQL (not by the board index) matched more jobs than are counted: `counts` then cover only the first ones found. */
	exact: boolean;
	counts: Record<JobStatus, number>;
	query: BoardQuery;
	/** Null when the total is not known; `hasNext` still says whether another page follows. */
	pages: number | null;
	hasNext: boolean;
}

