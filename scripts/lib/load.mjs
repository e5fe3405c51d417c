// One mixed load run, shared by `npm run bench:load` (full size) and tests/integration/load.test.ts
// (small and short): customers open their estimate links and approve at once (each taps twice),
// while staff browse the job board and the pricing route is hammered with autocannon. Loopback
// only; every loop stops at the deadline. Latencies are recorded per request, so p50/p99 are exact.

/** The p-th percentile of ascending latencies by the nearest-rank method; 0 for none. */
export const percentile = (sorted, p) => (sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : 0);

/** @typedef {{ route: string, requests: number, rps: number, p50: number, p99: number, errors: number, errorKinds: string }} Row */

class Tally {
	constructor() {
		/** @type {Map<string, { latencies: number[], errors: number, kinds: Map<string, number>, first: number, last: number }>} */
		this.routes = new Map();
	}
	/** @param {string} route */
	entry(route) {
		const now = Date.now();
		const entry = this.routes.get(route) ?? { latencies: [], errors: 0, kinds: new Map(), first: now, last: now };
		this.routes.set(route, entry);
		return entry;
	}
	/** An answer, good or not. @param {string} route @param {number} ms @param {boolean} ok @param {string} status */
	add(route, ms, ok, status) {
		const entry = this.entry(route);
		entry.first = Math.min(entry.first, Date.now() - ms);
		entry.last = Date.now();
		entry.latencies.push(ms);
		if (!ok) this.fail(route, status);
	}
	/** No good answer: a refused status, or a request that timed out or lost its connection. @param {string} route @param {string} kind */
	fail(route, kind) {
		const entry = this.entry(route);
		entry.errors++;
		entry.kinds.set(kind, (entry.kinds.get(kind) ?? 0) + 1);
	}
	/** Requests per second over each route's own span (first request sent to last answer). @returns {Row[]} */
	rows() {
		return [...this.routes].map(([route, { latencies, errors, kinds, first, last }]) => {
			const sorted = [...latencies].sort((a, b) => a - b);
			return {
				route,
				requests: sorted.length,
				rps: Math.round(sorted.length / Math.max((last - first) / 1000, 0.001)),
				p50: +percentile(sorted, 50).toFixed(1),
				p99: +percentile(sorted, 99).toFixed(1),
				errors,
				errorKinds: [...kinds].map(([kind, n]) => `${n}× ${kind}`).join(', ')
			};
		});
	}
}

/**
 * Hammers one route on one origin with autocannon until the deadline.
 * @param {Tally} tally
 * @param {{ label: string, origin: string, requests: { method?: string, path: string, body?: string, headers?: Record<string, string> }[], connections: number, seconds: number, cookie: string, timeout: number }} options
 */
async function hammer(tally, { label, origin, requests, connections, seconds, cookie, timeout }) {
	const { default: autocannon } = await import('autocannon');
	const instance = autocannon({
		url: origin,
		connections,
		duration: seconds,
		timeout,
		headers: { cookie },
		requests: requests.map((r) => ({ method: r.method ?? 'GET', path: r.path, body: r.body, headers: { cookie, ...r.headers } }))
	});
	instance.on('response', (_client, status, _bytes, time) => tally.add(label, time, status < 400, String(status)));
	instance.on('reqError', (error) => tally.fail(label, /timeout/i.test(String(error?.message ?? error)) ? 'timeout' : 'connection error'));
	await new Promise((resolve, reject) => instance.once('done', resolve).once('error', reject));
}

/**
 * One customer: open the link, approve with a double tap, see the answer, then keep reading the
 * page until the deadline.
 * @param {Tally} tally
 * @param {{ origin: string, token: string, deadline: number }} customer
 */
async function customer(tally, { origin, token, deadline }) {
	const timed = async (label, run, ok) => {
		const started = performance.now();
		try {
			const res = await run();
			const text = await res.text();
			const good = ok(res, text);
			tally.add(label, performance.now() - started, good, String(res.status));
			return { status: res.status, location: res.headers.get('location'), good };
		} catch {
			tally.fail(label, 'connection error');
			return { status: 0, location: null, good: false };
		}
	};
	const page = () => fetch(`${origin}/q/${token}`, { headers: { accept: 'text/html' } });
	await timed('GET /q/[token]', page, (res) => res.status === 200);
	const approve = () =>
		fetch(`${origin}/q/${token}?/approve`, {
			method: 'POST',
			redirect: 'manual',
			headers: { 'content-type': 'application/x-www-form-urlencoded', origin, accept: 'text/html', 'user-agent': 'mendwise-load' },
			body: new URLSearchParams({ optionIndex: '0', signerName: 'Load Customer', consent: 'yes' })
		});
	const taps = await Promise.all([0, 1].map(() => timed('POST /q/[token]?/approve', approve, (res) => res.status === 303)));
	const seen = await timed('GET /q/[token]', page, (res, text) => res.status === 200 && /you approved this estimate/i.test(text));
	while (Date.now() < deadline) await timed('GET /q/[token]', page, (res) => res.status === 200);
	return { token, taps: taps.map((t) => t.status), confirmed: seen.good };
}

/**
 * @param {{ origins: string[], staffCookie: string, tokens: string[], seconds: number, connections: number, pricingBody: string, boardPaths?: string[], timeoutSeconds?: number }} options
 * @returns {Promise<{ rows: Row[], customers: { token: string, taps: number[], confirmed: boolean }[] }>}
 */
export async function loadRun({ origins, staffCookie, tokens, seconds, connections, pricingBody, boardPaths, timeoutSeconds = 10 }) {
	const tally = new Tally();
	const board = (boardPaths ?? ['/api/jobs', '/api/jobs?status=diagnosing&sort=customer&dir=asc', '/api/jobs?q=harrowgate', '/api/jobs?page=3']).map((path) => ({ path }));
	const pricing = [{ method: 'POST', path: '/api/pricing/evaluate', body: pricingBody, headers: { 'content-type': 'application/json' } }];
	const started = Date.now();
	const deadline = started + seconds * 1000;
	const background = origins.flatMap((origin) => [
		hammer(tally, { label: 'GET /api/jobs (board)', origin, requests: board, connections, seconds, cookie: staffCookie, timeout: timeoutSeconds }),
		hammer(tally, { label: 'POST /api/pricing/evaluate', origin, requests: pricing, connections, seconds, cookie: staffCookie, timeout: timeoutSeconds })
	]);
	// Every customer starts at the same moment, shortly after the staff traffic is under way.
	await new Promise((r) => setTimeout(r, Math.min(500, seconds * 100)));
	const customers = await Promise.all(tokens.map((token, i) => customer(tally, { origin: origins[i % origins.length], token, deadline })));
	await Promise.all(background);
	return { rows: tally.rows(), customers };
}

/** @param {Row[]} rows */
export function printLoadTable(rows) {
	console.log(`\n${'route'.padEnd(34)} ${'requests'.padStart(9)} ${'req/s'.padStart(7)} ${'p50 ms'.padStart(8)} ${'p99 ms'.padStart(8)} ${'errors'.padStart(7)}`);
	for (const r of rows) {
		console.log(`${r.route.padEnd(34)} ${String(r.requests).padStart(9)} ${String(r.rps).padStart(7)} ${String(r.p50).padStart(8)} ${String(r.p99).padStart(8)} ${String(r.errors).padStart(7)}${r.errorKinds ? `  (${r.errorKinds})` : ''}`);
	}
}
