// Types for load.mjs (the mixed load run of `npm run bench:load` and tests/integration/load.test.ts).
export interface LoadRow {
	route: string;
	requests: number;
	rps: number;
	p50: number;
	p99: number;
	/** Answers with a 4xx/5xx status, time-outs and lost connections. */
	errors: number;
	/** The errors by kind, e.g. "3× timeout, 1× 503". */
	errorKinds: string;
}

export interface CustomerResult {
	token: string;
	/** The statuses of the two approval taps. */
	taps: number[];
	/** The page read afterwards says the estimate was approved. */
	confirmed: boolean;
}

export function loadRun(options: {
	origins: string[];
	staffCookie: string;
	tokens: string[];
	seconds: number;
	connections: number;
	pricingBody: string;
	boardPaths?: string[];
	/** autocannon's per-request timeout (default 10 s); a request past it counts as an error. */
	timeoutSeconds?: number;
}): Promise<{ rows: LoadRow[]; customers: CustomerResult[] }>;

export function printLoadTable(rows: LoadRow[]): void;
