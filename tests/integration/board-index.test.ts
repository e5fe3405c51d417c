// The board index (src/lib/server/board-index.ts) against PostgreSQL: on the same jobs, every
// search, filter, sort and later page it answers must be the page the board's SQL gives, and it must
// follow every write at once — check-in, moves, reassignment, renames, deletion.
import { beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { COUNT_LIMIT, SORT_KEYS, type BoardQuery } from '../../src/lib/board-query';
import { JOB_STATUSES } from '../../src/lib/domain';
import { db } from '../../src/lib/server/db';
import { page } from '../../src/lib/server/board';
import * as jobs from '../../src/lib/server/jobs';
import * as customers from '../../src/lib/server/customers';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { actor, createJob } from '../helpers/shopdata';

let shop: ShopFixture;
let other: ShopFixture;

// Names chosen to test the order: upper before lower case, accents, a character beyond the Basic
// Multilingual Plane against one near its top (code point order, which UTF-16 order is not), a
// shared name (ties broken by id) and an empty technician (nulls last).
const NAMES = ['Ada Quell', 'ada quell', 'Émile Roux', 'Zed Orrin', 'Orla Penhallow', 'Orla Penhallow', '𝒜sh Vale', '\uff21sh Vale', 'Bo Lind', 'Linnea Moss'];
const MAKERS = ['Harrowgate', 'Ostrander', 'Kestrel', 'Brevik Power', ''];
const COMPLAINTS = ['No output at the outlets', 'Surges under load', 'Will not start', 'no output, surges', 'Overload light stays on'];

const query = (over: Partial<BoardQuery>): BoardQuery => ({ q: '', status: [], tech: '', age: '', sort: 'opened', dir: 'desc', page: 1, per: 25, ...over });

/** The index's answer and the SQL's for one query agree: the same rows, and the same counts and total whenever the SQL counted them all. */
async function agree(shopId: string, q: BoardQuery) {
	const [sql, index] = [await page(shopId, q, { useIndex: false }), await page(shopId, q)];
	expect(index.exact).toBe(true);
	expect(index.rows.map((r) => r.id), JSON.stringify(q)).toEqual(sql.rows.map((r) => r.id));
	expect(index.rows).toEqual(sql.rows);
	if (sql.exact) {
		expect(index.total).toBe(sql.total);
		expect(index.counts).toEqual(sql.counts);
	}
	return index;
}

beforeAll(async () => {
	[shop, other] = await Promise.all([createShop('Board index'), createShop('Board index other')]);
	const first = await createJob(shop, { customerName: 'Seed Person', maker: 'Harrowgate', serial: 'SEED-1' });
	const { unit, customer } = first;
	// 300 jobs with every combination of the fields above, written straight to the table (the
	// triggers still keep counts and writers), with times spread over 60 days and some promised dates.
	await db().query(
		`INSERT INTO jobs (shop_id, number, unit_id, customer_id, complaint, status, technician_id, technician_name, promised_on,
		                   created_at, status_changed_at, customer_name, unit_label, search_text)
		 SELECT :shop, 5000 + i, :unit, :customer, c.complaint, s.status, t.id, t.name,
		        CASE WHEN i % 3 = 0 THEN NULL ELSE date '2026-12-01' + (i % 11) END,
		        now() - make_interval(days => i % 60, mins => i), now() - make_interval(days => i % 23),
		        n.name, m.maker, lower(concat_ws(' ', '#' || (5000 + i), n.name, m.maker, 'SN-' || lpad(i::text, 4, '0'), c.complaint))
		   FROM generate_series(1, 300) AS i
		   CROSS JOIN LATERAL (SELECT (ARRAY[:names]::text[])[1 + i % ${NAMES.length}] AS name) n
		   CROSS JOIN LATERAL (SELECT (ARRAY[:makers]::text[])[1 + (i / 3) % ${MAKERS.length}] AS maker) m
		   CROSS JOIN LATERAL (SELECT (ARRAY[:complaints]::text[])[1 + (i / 7) % ${COMPLAINTS.length}] AS complaint) c
		   CROSS JOIN LATERAL (SELECT (ARRAY[:statuses]::text[])[1 + (i * 7) % ${JOB_STATUSES.length}] AS status) s
		   LEFT JOIN LATERAL (SELECT id, name FROM users WHERE id = CASE i % 4 WHEN 0 THEN NULL WHEN 1 THEN :tech::uuid ELSE :manager::uuid END) t ON true`,
		{
			replacements: {
				shop: shop.id, unit: unit.id, customer: customer.id, tech: shop.staff.technician.id, manager: shop.staff.manager.id,
				names: NAMES, makers: MAKERS, complaints: COMPLAINTS, statuses: [...JOB_STATUSES]
			}
		}
	);
	await createJob(other, { customerName: 'Linnea Elsewhere', maker: 'Harrowgate', serial: 'SN-0001' });
});

describe('the board index', () => {
	it('gives the same pages, counts and totals as the SQL for every sort, direction and kind of filter', async () => {
		const searches = ['', 'orla', 'penhallow', 'no output', 'SN-00', 'sn-0042', 'ash', '𝒜sh', 'é', 'harrowgate surges', '#5017', 'no', 'zz-nothing'];
		let compared = 0;
		for (const q of searches) {
			for (const sort of SORT_KEYS) {
				for (const dir of ['asc', 'desc'] as const) {
					if (!q && sort !== 'customer') continue; // no search: the age filters below
					await agree(shop.id, query({ q, sort, dir }));
					compared++;
				}
			}
		}
		for (const over of [
			{ age: '30' as const, sort: 'technician' as const },
			{ age: '7' as const, sort: 'unit' as const, dir: 'asc' as const },
			{ age: 'stale' as const, sort: 'changed' as const, dir: 'asc' as const },
			// Read along the order with the counts from each status's times (many jobs in the window).
			{ age: 'stale' as const, sort: 'number' as const, dir: 'asc' as const, page: 3 },
			{ age: 'stale' as const, sort: 'customer' as const, dir: 'desc' as const, page: 2, per: 10 },
			{ age: 'stale' as const, status: ['quoted' as const, 'declined' as const], sort: 'status' as const },
			{ age: '30' as const, sort: 'opened' as const, dir: 'asc' as const, page: 4, per: 10 },
			{ age: '30' as const, status: ['ready' as const], sort: 'promised' as const },
			{ age: '2' as const, q: 'orla' },
			{ q: 'orla', status: ['quoted' as const, 'ready' as const], sort: 'promised' as const, dir: 'asc' as const },
			{ q: 'harrowgate', tech: 'none' },
			{ q: 'harrowgate', tech: shop.staff.technician.id, sort: 'number' as const, dir: 'asc' as const }
		]) {
			await agree(shop.id, query(over));
			compared++;
		}
		expect(compared).toBeGreaterThan(150);
	});

	it('gives the same later pages of all jobs, of chosen statuses and of a technician, as the SQL for every sort', async () => {
		for (const sort of SORT_KEYS) {
			for (const dir of ['asc', 'desc'] as const) {
				for (const p of [2, 7, 13]) await agree(shop.id, query({ sort, dir, page: p }));
				await agree(shop.id, query({ sort, dir, page: 2, per: 10, status: ['quoted', 'picked_up'] }));
				await agree(shop.id, query({ sort, dir, page: 3, per: 10, tech: shop.staff.technician.id }));
				await agree(shop.id, query({ sort, dir, page: 2, per: 10, tech: 'none', status: ['quoted', 'ready'] }));
			}
		}
		expect((await page(shop.id, query({ page: 13 }))).rows.length).toBeGreaterThan(0);
	});

	it('pages through a large match from either end, joining up into the SQL order', async () => {
		for (const dir of ['asc', 'desc'] as const) {
			const whole = await agree(shop.id, query({ q: 'sn-', sort: 'customer', dir, per: 100, page: 1 }));
			expect(whole.total).toBe(300);
			const seen: string[] = whole.rows.map((r) => r.id);
			for (let p = 2; p <= 3; p++) seen.push(...(await agree(shop.id, query({ q: 'sn-', sort: 'customer', dir, per: 100, page: p }))).rows.map((r) => r.id));
			expect(new Set(seen).size).toBe(300);
			expect((await agree(shop.id, query({ q: 'sn-', sort: 'customer', dir, per: 100, page: 4 }))).rows).toEqual([]);
		}
	});

	it('follows check-in, moves, reassignment, a customer renamed and a job deleted, at once', async () => {
		const search = query({ q: 'wren', sort: 'customer', dir: 'asc' });
		expect((await page(shop.id, search)).total).toBe(0);
		const made = await createJob(shop, { customerName: 'Marlo Wren', maker: 'Kestrel', serial: 'WREN-1' });
		expect((await agree(shop.id, search)).rows.map((r) => r.id)).toEqual([made.job.id]);

		await jobs.transition(actor(shop, 'technician'), made.job.id, 'diagnosing');
		expect((await agree(shop.id, query({ q: 'wren', status: ['diagnosing'] }))).total).toBe(1);
		expect((await agree(shop.id, query({ q: 'wren', status: ['checked_in'] }))).total).toBe(0);

		await jobs.assign(actor(shop, 'writer'), made.job.id, null);
		expect((await agree(shop.id, query({ q: 'wren', tech: 'none' }))).total).toBe(1);

		await customers.update(actor(shop, 'writer'), made.customer.id, { name: 'Aaron Wrenfield', phone: '555-0101', email: '', address: '', notes: '' });
		const renamed = await agree(shop.id, query({ q: 'wrenfield', sort: 'customer', dir: 'asc' }));
		expect(renamed.rows.map((r) => r.customer)).toEqual(['Aaron Wrenfield']);
		expect((await agree(shop.id, query({ q: 'marlo' }))).total).toBe(0);

		await db().query('DELETE FROM jobs WHERE id = :id', { replacements: { id: made.job.id } });
		expect((await agree(shop.id, search)).total).toBe(0);
	});

	it('past the SQL\'s counting limit it still counts exactly', async () => {
		const many = await agree(shop.id, query({ q: 'sn-' }));
		expect(many.total).toBeGreaterThan(COUNT_LIMIT);
		const sql = await page(shop.id, query({ q: 'sn-' }), { useIndex: false });
		expect(sql).toMatchObject({ total: null, exact: false });
		const counted = await db().query<{ status: string; n: number }>(
			`SELECT status, count(*)::int AS n FROM jobs WHERE shop_id = :shop AND search_text LIKE '%sn-%' GROUP BY status`,
			{ replacements: { shop: shop.id }, type: QueryTypes.SELECT }
		);
		for (const { status, n } of counted) expect(many.counts[status as keyof typeof many.counts]).toBe(n);
		expect(many.total).toBe(counted.reduce((sum, c) => sum + c.n, 0));
	});

	it('after more than 2,000 jobs written at once it answers in SQL rather than from an index that has not caught up', async () => {
		const bulk = await createShop('Board index bulk');
		const { unit, customer } = await createJob(bulk, { customerName: 'Bulk Owner', serial: 'BULK-0' });
		const search = query({ q: 'crate', sort: 'number', dir: 'asc' });
		expect((await page(bulk.id, search)).total).toBe(0); // the index is built and answers
		await db().query(
			`INSERT INTO jobs (shop_id, number, unit_id, customer_id, complaint, status, search_text, customer_name, unit_label)
			 SELECT :shop, 5000 + i, :unit, :customer, 'Crate lot', 'checked_in', 'crate lot ' || i, 'Crate Lot', 'Crate lot'
			   FROM generate_series(1, 2100) AS i`,
			{ replacements: { shop: bulk.id, unit: unit.id, customer: customer.id } }
		);
		const answered = await page(bulk.id, search);
		expect(answered).toMatchObject({ total: null, exact: false }); // the SQL's count limit: not the index
		expect(answered.rows.map((r) => r.number)).toEqual(Array.from({ length: 25 }, (_, i) => 5001 + i));
	});

	it("keeps each shop's jobs to itself", async () => {
		const mine = await page(shop.id, query({ q: 'linnea', per: 100 }));
		const theirs = await page(other.id, query({ q: 'linnea', per: 100 }));
		expect(theirs.rows.map((r) => r.customer)).toEqual(['Linnea Elsewhere']);
		expect(mine.rows.every((r) => r.customer === 'Linnea Moss')).toBe(true);
		expect(mine.total).toBe(30);
	});
});
