// Manager reports against a small fixed history whose every figure is worked out by hand below,
// the role checks, shop isolation, CSV rows that add up to the charts, and actuals on a job.
import { createHash } from 'node:crypto';
import { parse } from 'csv-parse/sync';
import { Decimal } from 'decimal.js';
import { QueryTypes } from 'sequelize';
import { beforeAll, describe, expect, it } from 'vitest';
import { evaluateRequest } from '../../src/lib/pricing/evaluate';
import { Approval, Customer, Job, Quote, QuoteVersion, Unit, type UnitKind } from '../../src/lib/server/db/models';
import { JobExtraPart, JobLabour, JobOutcome } from '../../src/lib/server/db/report-models';
import { db } from '../../src/lib/server/db/index';
import { refreshBoardColumns } from '../../src/lib/server/jobs';
import * as quotes from '../../src/lib/server/quotes';
import { Client, signedIn } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { sentQuote } from '../helpers/quotes';

let shop: ShopFixture;
let other: ShopFixture;
let manager: Client;
let owner: Client;
const jobIds: Record<string, string> = {};

// Settings of the fixed history: the engine's defaults (labour $95/h, parts ×1.75 for a cost over
// $50 up to $200 and ×2.00 over $10 up to $50, shop supplies 5% of labour, no tax) and a labour
// cost of $40/h, frozen in each version as quotes.send does.
const SETTINGS = { labourCostRate: '40.00' };
const RANGE = 'from=2026-03-01&to=2026-04-30';

interface Planned {
	key: string;
	number: number;
	kind: UnitKind;
	technician: 'technician' | 'manager' | null;
	options: Record<string, unknown>[];
	sent: string[];
	answer?: { decision: 'approved' | 'declined'; optionIndex: number | null; at: string };
	hours?: { who: 'technician' | 'manager'; hours: string }[];
	extraParts?: { description: string; quantity: string; unitCost: string }[];
}

const decline = { label: 'Decline', kind: 'decline', lines: [{ kind: 'fee', description: 'Diagnostic fee', amount: '89.00', feeType: 'diagnostic' }] };
const HISTORY: Planned[] = [
	{
		// Part $100 → sells $175.00; 2 h labour $190.00 (cost 2 × $40 = $80.00); supplies 5% × 190 = $9.50.
		// Subtotal $374.50, cost $180.00. Actual 3 h → labour cost $120.00, extra part $12.00:
		// gross profit 374.50 − (100 + 120 + 12) = $142.50; quoted 194.50; margin lost $52.00.
		key: 'rotor', number: 1, kind: 'portable', technician: 'technician',
		options: [{ label: 'Replace the rotor', kind: 'repair', lines: [{ kind: 'part', description: 'Rotor', quantity: '1', unitCost: '100.00' }, { kind: 'labour', description: 'Fit rotor', hours: '2' }] }, decline],
		sent: ['2026-03-08T10:00:00Z'],
		answer: { decision: 'approved', optionIndex: 0, at: '2026-03-10T22:00:00Z' }, // 2.5 days
		hours: [{ who: 'technician', hours: '2.50' }, { who: 'manager', hours: '0.50' }],
		extraParts: [{ description: 'Gasket', quantity: '1', unitCost: '12.00' }]
	},
	{
		// New unit: price $700.00, cost $500.00, all "other"; no actuals.
		key: 'inverter', number: 2, kind: 'inverter', technician: 'technician',
		options: [{ label: 'Repair', kind: 'repair', lines: [{ kind: 'labour', description: 'Look', hours: '1' }] }, { label: 'New inverter', kind: 'replacement', lines: [{ kind: 'unit', description: 'New 2 kW inverter', cost: '500.00', price: '700.00' }] }, decline],
		sent: ['2026-03-18T12:00:00Z'],
		answer: { decision: 'approved', optionIndex: 1, at: '2026-03-20T12:00:00Z' } // 2.0 days
	},
	{
		// Part $20 → $40.00; 1 h $95.00 (cost $40.00); supplies $4.75. Subtotal $139.75, cost $60.00.
		// Actual 0.5 h → labour cost $20.00: gross profit $99.75, quoted $79.75, margin lost −$20.00.
		key: 'brushes', number: 3, kind: 'portable', technician: 'technician',
		options: [{ label: 'Brushes', kind: 'repair', lines: [{ kind: 'part', description: 'Brushes', quantity: '1', unitCost: '20.00' }, { kind: 'labour', description: 'Fit brushes', hours: '1' }] }, decline],
		sent: ['2026-04-01T09:00:00Z'],
		answer: { decision: 'approved', optionIndex: 0, at: '2026-04-05T09:00:00Z' }, // 4.0 days
		hours: [{ who: 'technician', hours: '0.50' }]
	},
	{
		key: 'standby', number: 4, kind: 'standby', technician: null,
		options: [{ label: 'Controller', kind: 'repair', lines: [{ kind: 'labour', description: 'Controller', hours: '3' }] }, decline],
		sent: ['2026-04-02T00:00:00Z'],
		answer: { decision: 'declined', optionIndex: null, at: '2026-04-07T00:00:00Z' }
	},
	{
		key: 'waiting', number: 5, kind: 'portable', technician: 'technician',
		options: [{ label: 'Carburettor', kind: 'repair', lines: [{ kind: 'labour', description: 'Rebuild', hours: '1.2' }] }, decline],
		sent: ['2026-04-20T08:00:00Z', '2026-04-25T08:00:00Z']
	},
	{
		// Outside the range: approved in May.
		key: 'may', number: 6, kind: 'portable', technician: 'technician',
		options: [{ label: 'AVR', kind: 'repair', lines: [{ kind: 'part', description: 'AVR', quantity: '1', unitCost: '40.00' }, { kind: 'labour', description: 'Fit AVR', hours: '0.7' }] }, decline],
		sent: ['2026-05-02T08:00:00Z'],
		answer: { decision: 'approved', optionIndex: 0, at: '2026-05-03T08:00:00Z' }
	}
];

async function seedHistory(target: ShopFixture) {
	const customer = await Customer.create({ shopId: target.id, name: 'Ysolde Penberthy', searchText: 'ysolde penberthy' });
	for (const plan of HISTORY) {
		const unit = await Unit.create({ shopId: target.id, customerId: customer.id, kind: plan.kind, maker: 'Harrowgate', model: 'PG-5500' });
		const technicianId = plan.technician ? target.staff[plan.technician].id : null;
		const job = await Job.create({
			shopId: target.id, number: plan.number, unitId: unit.id, customerId: customer.id, complaint: 'No output', technicianId,
			status: plan.answer ? (plan.answer.decision === 'approved' ? 'in_repair' : 'declined') : 'quoted', createdBy: target.staff.writer.id
		});
		jobIds[plan.key] = job.id;
		await refreshBoardColumns({ jobIds: [job.id] });
		const content = {
			currency: 'USD', diagnosticFee: '89.00', settings: SETTINGS,
			unit: { ageYears: '3', engineHours: '100', lifeYears: '10', lifeHours: '1500', condition: 'good', asIsValue: '0', annualUpkeep: '0' },
			options: plan.options
		};
		const priced = evaluateRequest(content);
		if (!priced.ok) throw new Error(priced.message);
		const quote = await Quote.create({ shopId: target.id, jobId: job.id, draft: { unit: content.unit, options: content.options }, sentVersions: plan.sent.length, editedSinceSend: false, updatedBy: null });
		let version: QuoteVersion | null = null;
		for (const [k, at] of plan.sent.entries()) {
			version = await QuoteVersion.create({
				shopId: target.id, quoteId: quote.id, number: k + 1, content, result: JSON.parse(JSON.stringify(priced.result)),
				contentHash: createHash('sha256').update(quotes.canonicalJson(content)).digest('hex'), currency: 'USD', validUntil: '2026-12-31',
				sentBy: target.staff.writer.id, sentAt: new Date(at)
			});
		}
		if (plan.answer) {
			await Approval.create({
				shopId: target.id, quoteId: quote.id, versionId: version!.id, decision: plan.answer.decision, optionIndex: plan.answer.optionIndex,
				optionLabel: plan.answer.optionIndex === null ? null : (plan.options[plan.answer.optionIndex].label as string),
				signerName: 'Ysolde Penberthy', clientAddress: '127.0.0.1', versionHash: version!.contentHash, createdAt: new Date(plan.answer.at)
			});
		}
		for (const h of plan.hours ?? []) {
			await JobLabour.create({ shopId: target.id, jobId: job.id, technicianId: target.staff[h.who].id, hours: h.hours, recordedBy: target.staff[h.who].id });
		}
		for (const p of plan.extraParts ?? []) {
			await JobExtraPart.create({ shopId: target.id, jobId: job.id, ...p, recordedBy: target.staff.technician.id });
		}
	}
}

async function report(client: Client, name: string, query = RANGE) {
	const reply = await client.get(`/api/reports/${name}?${query}`);
	expect(reply.status, reply.text).toBe(200);
	return reply.json<{ rows: Record<string, string | number | null>[]; totals: Record<string, string | number | null>; columns: { key: string }[] }>();
}

async function csv(client: Client, name: string, query = RANGE) {
	const reply = await client.get(`/reports/${name}.csv?${query}`);
	expect(reply.status, reply.text).toBe(200);
	expect(reply.headers.get('content-type')).toContain('text/csv');
	expect(reply.headers.get('content-disposition')).toContain(`${name}-2026-03-01-to-2026-04-30.csv`);
	return parse(reply.text, { columns: true, bom: true, skip_empty_lines: true }) as Record<string, string>[];
}

const sum = (rows: Record<string, string>[], column: string, where: (r: Record<string, string>) => boolean = () => true) =>
	rows.filter(where).reduce((total, r) => total.plus(r[column] || '0'), new Decimal(0));

beforeAll(async () => {
	shop = await createShop('Reports');
	other = await createShop('Reports elsewhere');
	await seedHistory(shop);
	manager = await signedIn(shop.staff.manager.email, shop.staff.manager.password);
	owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
});

describe('report figures on the fixed history (hand-computed in the comments of HISTORY)', () => {
	it('keeps one report row per quoted job, filled by the database from the frozen results and actuals', async () => {
		const rotor = await JobOutcome.findByPk(jobIds.rotor);
		expect(rotor).toMatchObject({ outcome: 'repaired', revenue: '374.50', cost: '180.00', grossProfit: '194.50', billedHours: '2', labourCostRate: '40' });
		expect(rotor).toMatchObject({ actualHours: '3.00', extraPartsCost: '12.00', actualLabourCost: '120.00', actualGrossProfit: '142.50', marginLost: '52.00' });
		expect((await JobOutcome.findByPk(jobIds.waiting))).toMatchObject({ versionsSent: 2, decision: null, outcome: null, revenue: '0' });
	});

	it('revenue by month: parts, labour and everything else of the approved options', async () => {
		const r = await report(manager, 'revenue');
		expect(r.rows).toEqual([
			{ month: '2026-03', jobs: 2, parts: '175.00', labour: '190.00', other: '709.50', revenue: '1074.50' },
			{ month: '2026-04', jobs: 1, parts: '40.00', labour: '95.00', other: '4.75', revenue: '139.75' }
		]);
		expect(r.totals).toMatchObject({ jobs: 3, revenue: '1214.25' });
	});

	it('gross margin by month with actual hours at the labour cost rate and extra parts at cost', async () => {
		const r = await report(owner, 'margin');
		// March: parts 175 − 100 − 12 = 63.00; labour 190 − 120 = 70.00; other 9.50 + (700 − 500) = 209.50;
		// margin 342.50 / 1074.50 = 31.9%. April: 20.00, 95 − 20 = 75.00, 4.75; 99.75 / 139.75 = 71.4%.
		expect(r.rows).toEqual([
			{ month: '2026-03', parts: '63.00', labour: '70.00', other: '209.50', grossProfit: '342.50', revenue: '1074.50', marginPercent: '31.9' },
			{ month: '2026-04', parts: '20.00', labour: '75.00', other: '4.75', grossProfit: '99.75', revenue: '139.75', marginPercent: '71.4' }
		]);
		expect(r.totals).toMatchObject({ grossProfit: '442.25', revenue: '1214.25', marginPercent: '36.4' });
	});

	it('approval rate by the month a quote was first sent, however many versions followed', async () => {
		const r = await report(manager, 'approval');
		expect(r.rows).toEqual([
			{ month: '2026-03', sent: 2, approved: 2, declined: 0, unanswered: 0, ratePercent: '100.0' },
			{ month: '2026-04', sent: 3, approved: 1, declined: 1, unanswered: 1, ratePercent: '33.3' }
		]);
	});

	it('outcomes by month and by kind of unit', async () => {
		expect((await report(manager, 'outcomes')).rows).toEqual([
			{ month: '2026-03', repaired: 1, replaced: 1, declined: 0 },
			{ month: '2026-04', repaired: 1, replaced: 0, declined: 1 }
		]);
		const byKind = await report(manager, 'outcomes-by-kind');
		expect(byKind.rows).toEqual([
			{ kind: 'Portable generator', repaired: 2, replaced: 0, declined: 0 },
			{ kind: 'Inverter generator', repaired: 0, replaced: 1, declined: 0 },
			{ kind: 'Home standby generator', repaired: 0, replaced: 0, declined: 1 },
			{ kind: 'Pressure washer', repaired: 0, replaced: 0, declined: 0 },
			{ kind: 'Other small engine', repaired: 0, replaced: 0, declined: 0 }
		]);
	});

	it('days from first send to approval: average and how soon, per month', async () => {
		// March: 2.5 and 2.0 days → average 2.25, shown to one decimal as 2.3 (half away from zero); both within 1–3 days.
		expect((await report(manager, 'days-to-approval')).rows).toEqual([
			{ month: '2026-03', approvals: 2, averageDays: '2.3', withinDay: 0, oneToThree: 2, threeToSeven: 0, overWeek: 0 },
			{ month: '2026-04', approvals: 1, averageDays: '4.0', withinDay: 0, oneToThree: 0, threeToSeven: 1, overWeek: 0 }
		]);
	});

	it('labour efficiency and margin per technician, shares in proportion to hours recorded', async () => {
		const r = await report(manager, 'technicians');
		// Rotor job: technician 2.5 of 3 h (5/6), manager 0.5 h (1/6). Billed 2 h → 1.67 and 0.33;
		// revenue 374.50 → 312.08 and 62.42; gross profit 142.50 → 118.75 and 23.75.
		// Technician: + inverter (no hours: assigned, billed 0) 700 / 200, + brushes 1 h billed, 0.5 spent, 139.75 / 99.75.
		// Efficiency 2.67 / 3.00 = 0.89; margin 418.50 / 1151.83 = 36.3%. Manager: 0.33 / 0.50 = 0.66; 23.75 / 62.42 = 38.0%.
		const byId = Object.fromEntries(r.rows.map((row) => [row.technicianId, row]));
		expect(byId[shop.staff.technician.id]).toMatchObject({ jobs: 3, hoursBilled: '2.67', hoursSpent: '3.00', efficiency: '0.89', revenue: '1151.83', grossProfit: '418.50', marginPercent: '36.3' });
		expect(byId[shop.staff.manager.id]).toMatchObject({ jobs: 1, hoursBilled: '0.33', hoursSpent: '0.50', efficiency: '0.66', revenue: '62.42', grossProfit: '23.75', marginPercent: '38.0' });
		expect(r.rows).toHaveLength(2);
	});

	it('a job shared by three people: the shares add up to the job to the cent, each within a cent of its exact part', async () => {
		// 100.00 among three equal shares: 33.33 + 33.33 + 33.34, not 33.33 three times (common practice
		// in allocating money, no source). Tried on the rotor job inside a transaction that is undone.
		const transaction = await db().transaction();
		try {
			await db().query(
				`UPDATE job_outcomes SET revenue = 100.00, cost = 0, labour_cost = 0, extra_parts_cost = 0, labour_cost_rate = 10, billed_hours = 2,
				        actual_hours = 3, technician_hours = jsonb_build_object(gen_random_uuid()::text, 1, gen_random_uuid()::text, 1, gen_random_uuid()::text, 1)
				  WHERE job_id = :job`,
				{ replacements: { job: jobIds.rotor }, transaction }
			);
			const [outcome] = await db().query<{ revenue: string; grossProfit: string }>(
				'SELECT revenue, actual_gross_profit AS "grossProfit" FROM job_outcomes WHERE job_id = :job',
				{ replacements: { job: jobIds.rotor }, transaction, type: QueryTypes.SELECT }
			);
			const shares = await db().query<{ revenue: string; grossProfit: string; hoursBilled: string }>(
				'SELECT revenue, gross_profit AS "grossProfit", hours_billed AS "hoursBilled" FROM report_technician_rows WHERE job_id = :job',
				{ replacements: { job: jobIds.rotor }, transaction, type: QueryTypes.SELECT }
			);
			expect(shares).toHaveLength(3);
			const total = (key: 'revenue' | 'grossProfit' | 'hoursBilled') => shares.reduce((sum, r) => sum.plus(r[key]), new Decimal(0));
			expect(total('revenue').toFixed(2)).toBe('100.00');
			expect(total('grossProfit').toFixed(2)).toBe(new Decimal(outcome.grossProfit).toFixed(2)); // 100.00 - 3 h × 10.00 = 70.00
			expect(total('hoursBilled').toFixed(2)).toBe('2.00');
			expect(shares.map((r) => new Decimal(r.revenue).toFixed(2)).sort()).toEqual(['33.33', '33.33', '33.34']);
			for (const r of shares) expect(new Decimal(r.revenue).minus(new Decimal(100).div(3)).abs().lte('0.01')).toBe(true);
		} finally {
			await transaction.rollback();
		}
	});

	it('biggest jobs by margin lost: only losses are charted, the total nets out gains', async () => {
		const r = await report(manager, 'margin-lost');
		expect(r.rows).toEqual([
			{ job: 1, jobId: jobIds.rotor, customer: 'Ysolde Penberthy', technician: `technician ${shop.name.split(' ').pop()}`, quotedProfit: '194.50', grossProfit: '142.50', marginLost: '52.00' }
		]);
		expect(r.totals).toMatchObject({ jobs: 2, jobsLosing: 1, quotedProfit: '274.25', grossProfit: '242.25', marginLost: '32.00' });
	});

	it('filters by technician, by kind of unit and by date', async () => {
		const inverters = await report(manager, 'revenue', `${RANGE}&kind=inverter`);
		expect(inverters.totals).toMatchObject({ jobs: 1, revenue: '700.00', other: '700.00' });
		const managersJobs = await report(manager, 'revenue', `${RANGE}&technician=${shop.staff.manager.id}`);
		expect(managersJobs.totals).toMatchObject({ jobs: 0, revenue: '0.00' });
		const managersHours = await report(manager, 'technicians', `${RANGE}&technician=${shop.staff.manager.id}`);
		expect(managersHours.rows.map((row) => row.technicianId)).toEqual([shop.staff.manager.id]);
		const april = await report(manager, 'margin', 'from=2026-04-01&to=2026-05-31');
		expect(april.rows.map((row) => row.month)).toEqual(['2026-04', '2026-05']);
		expect(april.rows[0]).toMatchObject({ grossProfit: '99.75' });
		// Part of March read job by job, April from the monthly sums: the rotor job (10 March) falls outside.
		const fromMidMarch = await report(manager, 'revenue', 'from=2026-03-15&to=2026-04-30');
		expect(fromMidMarch.rows[0]).toMatchObject({ month: '2026-03', jobs: 1, revenue: '700.00' });
		expect(fromMidMarch.totals).toMatchObject({ jobs: 2, revenue: '839.75' });
		// A single day: only the brushes job was approved on 5 April.
		expect((await report(manager, 'revenue', 'from=2026-04-05&to=2026-04-05')).totals).toMatchObject({ jobs: 1, revenue: '139.75' });
	});

	it('refuses bad filters with a clear message and the field', async () => {
		for (const [query, path] of [['from=2026-13-01', 'from'], ['from=2026-05-01&to=2026-04-01', 'from'], ['kind=boat', 'kind'], ['technician=nobody', 'technician']]) {
			const reply = await manager.get(`/api/reports/margin?${query}`);
			expect(reply.status).toBe(400);
			const body = reply.json();
			expect(body.message).toBeTruthy();
			expect(body.issues.map((i: { path: string }) => i.path)).toContain(path);
		}
		expect((await manager.get('/api/reports/profits')).status).toBe(404);
		expect((await manager.get('/reports/margin.csv?from=yesterday')).status).toBe(400);
	});
});

describe('the CSV rows add up to the chart', () => {
	it('revenue and margin: per-job rows summed by month', async () => {
		for (const name of ['revenue', 'margin'] as const) {
			const r = await report(manager, name);
			const rows = await csv(manager, name);
			expect(rows).toHaveLength(3);
			for (const month of r.rows) {
				const inMonth = (row: Record<string, string>) => row.Month === month.month;
				if (name === 'revenue') {
					expect(sum(rows, 'Revenue', inMonth).toFixed(2)).toBe(month.revenue);
					expect(sum(rows, 'Parts', inMonth).toFixed(2)).toBe(month.parts);
					expect(sum(rows, 'Other', inMonth).toFixed(2)).toBe(month.other);
				} else {
					expect(sum(rows, 'Gross profit', inMonth).toFixed(2)).toBe(month.grossProfit);
					expect(sum(rows, 'Labour profit', inMonth).toFixed(2)).toBe(month.labour);
					expect(sum(rows, 'Parts profit', inMonth).toFixed(2)).toBe(month.parts);
				}
			}
		}
	});

	it('approval, outcomes and days: counted and averaged from the rows', async () => {
		const approval = await report(manager, 'approval');
		const sent = await csv(manager, 'approval');
		for (const month of approval.rows) {
			const rows = sent.filter((row) => row['Month first sent'] === month.month);
			expect(rows).toHaveLength(month.sent as number);
			expect(rows.filter((row) => row.Answer === 'approved')).toHaveLength(month.approved as number);
		}
		const outcomes = await report(manager, 'outcomes-by-kind');
		const answered = await csv(manager, 'outcomes-by-kind');
		expect(answered.filter((row) => row.Outcome === 'repaired')).toHaveLength((outcomes.totals.repaired as number));
		expect(answered).toHaveLength(4);
		const days = await report(manager, 'days-to-approval');
		const approvals = await csv(manager, 'days-to-approval');
		const march = approvals.filter((row) => row['Month approved'] === '2026-03');
		expect(sum(march, 'Days to approval').div(march.length).toDecimalPlaces(1, Decimal.ROUND_HALF_UP).toFixed(1)).toBe(days.rows[0].averageDays);
	});

	it('technicians and margin lost: shares and losses summed', async () => {
		const r = await report(manager, 'technicians');
		const rows = await csv(manager, 'technicians');
		for (const person of r.rows) {
			const mine = (row: Record<string, string>) => row.Technician === person.technician;
			expect(sum(rows, 'Revenue', mine).toFixed(2)).toBe(person.revenue);
			expect(sum(rows, 'Gross profit', mine).toFixed(2)).toBe(person.grossProfit);
			expect(sum(rows, 'Hours billed', mine).toFixed(2)).toBe(person.hoursBilled);
		}
		const lost = await report(manager, 'margin-lost');
		const lostRows = await csv(manager, 'margin-lost');
		expect(sum(lostRows, 'Margin lost').toFixed(2)).toBe(lost.totals.marginLost);
		expect(lostRows[0].Job).toBe(String(lost.rows[0].job));
	});
});

describe('who may see reports', () => {
	it('writers and technicians get 403 on the page, the API and the CSV; visitors must sign in', async () => {
		for (const role of ['writer', 'technician'] as const) {
			const client = await signedIn(shop.staff[role].email, shop.staff[role].password);
			for (const path of ['/reports', '/api/reports/margin', '/reports/margin.csv']) {
				const reply = await client.get(path);
				expect(reply.status, `${role} ${path}`).toBe(403);
			}
		}
		const visitor = new Client();
		expect((await visitor.get('/api/reports/margin')).status).toBe(401);
		expect((await visitor.get('/reports/margin.csv')).status).toBe(401);
		expect((await visitor.get('/reports')).location).toBe('/signin?next=%2Freports');
		const page = await manager.get('/reports');
		expect(page.status).toBe(200);
		expect(page.text).toContain('Gross margin by month');
	});

	it("another shop's manager sees none of this shop's figures", async () => {
		const elsewhere = await signedIn(other.staff.manager.email, other.staff.manager.password);
		const r = await report(elsewhere, 'revenue');
		expect(r.totals).toMatchObject({ jobs: 0, revenue: '0.00' });
		const technicians = await report(elsewhere, 'technicians', `${RANGE}&technician=${shop.staff.technician.id}`);
		expect(technicians.rows).toEqual([]);
		const rows = parse((await elsewhere.get(`/reports/margin.csv?${RANGE}`)).text, { columns: true, bom: true });
		expect(rows).toEqual([]);
	});
});

describe('actuals on a job', () => {
	it('a quote sent and approved through the app gets its report row, and the bench records hours against it', async () => {
		const sent = await sentQuote(shop);
		await quotes.decide(sent.token, { decision: 'approved', optionIndex: 0, signerName: 'Tamsin Yarrow', reason: '', clientAddress: '127.0.0.1', userAgent: 'test' });
		const row = await JobOutcome.findByPk(sent.job.id);
		const option = sent.result.options[0];
		expect(row).toMatchObject({ outcome: 'repaired', revenue: option.subtotal, grossProfit: option.grossProfit, actualHours: null });

		const tech = await signedIn(shop.staff.technician.email, shop.staff.technician.password);
		const page = await tech.get(`/jobs/${sent.job.id}/actuals`);
		expect(page.status).toBe(200);
		expect(page.text).toContain('Quoted against actual');
		expect((await tech.form(`/jobs/${sent.job.id}/actuals?/hours`, { hours: '3.25', workedOn: '', note: 'Seized bolt' })).status).toBe(200);
		// A technician records only their own hours.
		const forSomeoneElse = await tech.form(`/jobs/${sent.job.id}/actuals?/hours`, { hours: '1', technicianId: shop.staff.manager.id });
		expect(forSomeoneElse.status).toBe(400);
		expect(forSomeoneElse.text).toContain('Record your own hours');
		const bad = await tech.form(`/jobs/${sent.job.id}/actuals?/hours`, { hours: '-2' });
		expect(bad.status).toBe(400);
		expect((await tech.form(`/jobs/${sent.job.id}/actuals?/part`, { description: 'Slip ring brush spring', quantity: '2', unitCost: '4.10' })).status).toBe(200);
		// The manager records the owner's half hour.
		expect((await manager.form(`/jobs/${sent.job.id}/actuals?/hours`, { hours: '0.5', technicianId: shop.staff.owner.id })).status).toBe(200);

		const after = (await JobOutcome.findByPk(sent.job.id))!;
		// 3.75 h at the frozen labour cost rate; extra parts 2 × 4.10 = 8.20 at cost.
		const rate = new Decimal(after.labourCostRate);
		expect(after.actualHours).toBe('3.75');
		expect(after.extraPartsCost).toBe('8.20');
		expect(after.actualLabourCost).toBe(rate.times('3.75').toFixed(2));
		expect(new Decimal(after.marginLost).toFixed(2)).toBe(rate.times('3.75').minus(after.labourCost).plus('8.20').toFixed(2));
		expect(after.technicianHours).toEqual({ [shop.staff.technician.id]: 3.25, [shop.staff.owner.id]: 0.5 });

		// Writers read, but do not record.
		const writer = await signedIn(shop.staff.writer.email, shop.staff.writer.password);
		expect((await writer.get(`/jobs/${sent.job.id}/actuals`)).status).toBe(200);
		expect((await writer.form(`/jobs/${sent.job.id}/actuals?/hours`, { hours: '1' })).status).toBe(403);

		// A technician cannot remove someone else's entry; the manager can.
		const ownersEntry = await JobLabour.findOne({ where: { jobId: sent.job.id, technicianId: shop.staff.owner.id } });
		expect((await tech.form(`/jobs/${sent.job.id}/actuals?/removeHours`, { entryId: ownersEntry!.id })).status).toBe(400);
		expect((await manager.form(`/jobs/${sent.job.id}/actuals?/removeHours`, { entryId: ownersEntry!.id })).status).toBe(200);
		expect((await JobOutcome.findByPk(sent.job.id))!.actualHours).toBe('3.25');

		// The daily and monthly sums the triggers keep equal the per-job contributions summed afresh.
		const measures = 'sum(sent)::int AS sent, sum(approved)::int AS approved, sum(declined)::int AS declined, sum(revenue) AS revenue, sum(gross_profit) AS gross_profit, sum(margin_lost) AS margin_lost, sum(days_sum) AS days_sum';
		const by = (period: string, from: string) =>
			`SELECT ${period} AS period, technician_id, unit_kind, ${measures} FROM ${from} WHERE shop_id = :shopId GROUP BY 1, 2, 3`;
		const canonical = (rows: unknown) =>
			(rows as Record<string, unknown>[])
				.map((row) => Object.keys(row).sort().map((k) => `${k}=${typeof row[k] === 'string' && /^-?\d+(\.\d+)?$/.test(row[k] as string) ? new Decimal(row[k] as string).toString() : String(row[k])}`).join(' '))
				.sort();
		const [days, daysAfresh, months, monthsAfresh] = await Promise.all(
			[by('day', 'report_days'), by('report_day(at)', 'report_contributions'), by('month', 'report_months'), by('report_month(at)', 'report_contributions')].map((sql) =>
				db().query(sql, { replacements: { shopId: shop.id }, type: 'SELECT' as never })
			)
		);
		expect(canonical(days)).toEqual(canonical(daysAfresh));
		expect(canonical(months)).toEqual(canonical(monthsAfresh));
		const kept = months;
		expect((kept as unknown[]).length).toBeGreaterThan(3);
	});

	it('refuses hours before approval and keeps other shops out', async () => {
		const sent = await sentQuote(shop);
		const tech = await signedIn(shop.staff.technician.email, shop.staff.technician.password);
		const early = await tech.form(`/jobs/${sent.job.id}/actuals?/hours`, { hours: '1' });
		expect(early.status).toBe(400);
		expect(early.text).toContain('once the customer has approved');

		const elsewhere = await signedIn(other.staff.manager.email, other.staff.manager.password);
		expect((await elsewhere.get(`/jobs/${jobIds.rotor}/actuals`)).status).toBe(404);
		const posted = await elsewhere.form(`/jobs/${jobIds.rotor}/actuals?/hours`, { hours: '1', technicianId: other.staff.manager.id });
		// The action refuses the job and the page behind it is not found in that shop either.
		expect([400, 404]).toContain(posted.status);
		expect(posted.text).toContain('No such job in your shop.');
		expect(await JobLabour.count({ where: { jobId: jobIds.rotor } })).toBe(2);
	});
});
