// The load run of `npm run bench:load`, small and short: 20 customers approving different quotes
// at once (each tapping twice), on two app instances, while staff browse the job board and the
// pricing route is hammered for a few seconds. Afterwards every approval is recorded exactly once.
// The full size (50 customers, longer) is the benchmark; its figures are in docs/performance.md.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadRun, printLoadTable } from '../../scripts/lib/load.mjs';
import { Approval, AuditEvent, Job, Quote } from '../../src/lib/server/db/models';
import { startApp, type AppInstance } from '../helpers/app';
import { BASE_URL, signedIn } from '../helpers/client';
import { createShop, PASSWORD, type ShopFixture } from '../helpers/fixtures';
import { sampleDraft, sentQuote } from '../helpers/quotes';

const CUSTOMERS = 20;
const SECONDS = 4;

let shop: ShopFixture;
let second: AppInstance;
let sent: Awaited<ReturnType<typeof sentQuote>>[];

beforeAll(async () => {
	shop = await createShop('Load');
	second = await startApp();
	sent = [];
	for (let i = 0; i < CUSTOMERS; i++) sent.push(await sentQuote(shop));
}, 120_000);

afterAll(async () => {
	await second?.stop();
});

describe('mixed load on two instances', () => {
	it('every approval is recorded exactly once, and nothing fails', async () => {
		const staff = await signedIn(shop.staff.writer.email, PASSWORD);
		const { rows, customers } = await loadRun({
			origins: [BASE_URL, second.url],
			staffCookie: staff.cookieHeader,
			tokens: sent.map((s) => s.token),
			seconds: SECONDS,
			connections: 2,
			// Other test files share the machine: a slow answer is not a failure, an error is.
			timeoutSeconds: 60,
			pricingBody: JSON.stringify({ currency: 'USD', diagnosticFee: '89.00', ...sampleDraft() })
		});
		printLoadTable(rows);

		const routes = Object.fromEntries(rows.map((r) => [r.route, r]));
		for (const route of ['GET /api/jobs (board)', 'POST /api/pricing/evaluate', 'GET /q/[token]', 'POST /q/[token]?/approve']) {
			expect(routes[route]?.requests, route).toBeGreaterThan(0);
			expect(routes[route].errors, route).toBe(0);
		}
		expect(routes['POST /q/[token]?/approve'].requests).toBe(CUSTOMERS * 2);
		// Both taps of every customer answered with the page of the recorded decision.
		for (const c of customers) {
			expect(c.taps).toEqual([303, 303]);
			expect(c.confirmed).toBe(true);
		}

		for (const { job } of sent) {
			const quote = (await Quote.findOne({ where: { shopId: shop.id, jobId: job.id } }))!;
			expect(await Approval.count({ where: { quoteId: quote.id } })).toBe(1);
			expect((await Job.findByPk(job.id))!.status).toBe('approved');
			expect(await AuditEvent.count({ where: { shopId: shop.id, entityId: job.id, action: 'quote.approved' } })).toBe(1);
		}
		expect(await Approval.count({ where: { shopId: shop.id } })).toBe(CUSTOMERS);
	}, 90_000);
});
