import { beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { COUNT_LIMIT } from '../../src/lib/board-query';
import { JOB_STATUSES, type JobStatus } from '../../src/lib/domain';
import { db } from '../../src/lib/server/db';
import * as boardSql from '../../src/lib/server/board';
import * as jobs from '../../src/lib/server/jobs';
import { signedIn, type Client } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { actor, createJob } from '../helpers/shopdata';

let shop: ShopFixture;
let other: ShopFixture;
let writer: Client;

beforeAll(async () => {
	[shop, other] = await Promise.all([createShop('Board'), createShop('Board other')]);
	writer = await signedIn(shop.staff.writer.email, shop.staff.writer.password);
	const made = [];
	for (const [name, maker, serial, complaint] of [
		['Orla Penhallow', 'Harrowgate', 'HG-100', 'No output at the outlets'],
		['Bram Tessaly', 'Ostrander', 'OS-200', 'Surges under load'],
		['Cato Wimbourne', 'Brevik Power', 'BP-300', 'Will not start'],
		['Della Ashcombe', 'Harrowgate', 'HG-400', 'Overload light stays on'],
		['Emrys Calloway', 'Kestrel', 'KS-500', 'Did not transfer in an outage']
	]) {
		made.push(await createJob(shop, { customerName: name, maker, serial, complaint }));
	}
	const tech = actor(shop, 'technician');
	await jobs.transition(tech, made[1].job.id, 'diagnosing');
	await jobs.transition(tech, made[2].job.id, 'diagnosing');
	await jobs.assign(actor(shop, 'writer'), made[4].job.id, null);
	await createJob(other, { customerName: 'Orla Elsewhere', maker: 'Harrowgate' });
});

const board = async (query = '') => {
	const reply = await writer.get(`/api/jobs${query ? `?${query}` : ''}`);
	expect(reply.status).toBe(200);
	return reply.json();
};

describe('job board', () => {
	it('lists only the shop\'s own jobs with counts per status', async () => {
		const all = await board();
		expect(all.total).toBe(5);
		expect(all.rows.map((r: { customer: string }) => r.customer)).not.toContain('Orla Elsewhere');
		expect(all.counts).toMatchObject({ checked_in: 3, diagnosing: 2, quoted: 0 });
	});

	it('searches customer, unit maker, serial, complaint and job number', async () => {
		expect((await board('q=penhallow')).rows.map((r: { customer: string }) => r.customer)).toEqual(['Orla Penhallow']);
		expect((await board('q=harrowgate')).total).toBe(2);
		expect((await board('q=OS-200')).rows[0].customer).toBe('Bram Tessaly');
		expect((await board('q=overload light')).rows[0].customer).toBe('Della Ashcombe');
		const one = (await board('q=tessaly')).rows[0];
		expect((await board(`q=%23${one.number}`)).rows.map((r: { number: number }) => r.number)).toContain(one.number);
		expect((await board('q=%25')).total).toBe(0);
	});

	it('filters by status and technician, sorts by any column, and pages', async () => {
		const diagnosing = await board('status=diagnosing');
		expect(diagnosing.total).toBe(2);
		expect(diagnosing.rows.every((r: { status: string }) => r.status === 'diagnosing')).toBe(true);
		expect((await board('status=diagnosing&status=checked_in')).total).toBe(5);
		expect((await board('tech=none')).rows.map((r: { customer: string }) => r.customer)).toEqual(['Emrys Calloway']);
		expect((await board(`tech=${shop.staff.technician.id}`)).total).toBe(4);

		const byCustomer = await board('sort=customer&dir=asc');
		const names = byCustomer.rows.map((r: { customer: string }) => r.customer);
		expect(names).toEqual([...names].sort((a: string, b: string) => a.localeCompare(b)));
		const byNumberDesc = (await board('sort=number&dir=desc')).rows.map((r: { number: number }) => r.number);
		expect(byNumberDesc).toEqual([...byNumberDesc].sort((a: number, b: number) => b - a));

		const page1 = await board('sort=number&dir=asc&per=10&page=1');
		expect(page1.pages).toBe(1);
		const tiny = await board('sort=customer&dir=asc&per=10&page=2');
		expect(tiny.rows).toEqual([]);
	});

	it('odd address-bar values fall back to defaults instead of failing', async () => {
		const reply = await board('sort=password&dir=sideways&page=-3&per=100000&status=nope&tech=1%27%20OR%201=1&age=forever');
		expect(reply.total).toBe(5);
		expect(reply.query).toMatchObject({ sort: 'opened', dir: 'desc', page: 1, per: 25, status: [], tech: '', age: '' });
		// A NUL or other control character parts words, as a space does.
		expect((await board('q=%00')).total).toBe(5);
		expect((await board('q=orla%00penhallow')).rows.map((r: { customer: string }) => r.customer)).toEqual(['Orla Penhallow']);
	});

	it('the first page renders on the server with the filters from the address', async () => {
		const page = await writer.get('/jobs?q=tessaly');
		expect(page.status).toBe(200);
		expect(page.text).toContain('Bram Tessaly');
		expect(page.text).not.toContain('Orla Penhallow');
	});
});

describe('job board on more jobs than a page', () => {
	let big: ShopFixture;
	let manager: Client;
	const numbers: number[] = [];

	beforeAll(async () => {
		big = await createShop('Board pages');
		manager = await signedIn(big.staff.manager.email, big.staff.manager.password);
		for (let i = 0; i < 23; i++) numbers.push((await createJob(big, { customerName: `Page Person ${i}`, serial: `PP-${i}` })).job.number);
		numbers.sort((a, b) => a - b);
	});

	const get = async (query: string) => {
		const reply = await manager.get(`/api/jobs?${query}`);
		expect(reply.status).toBe(200);
		return reply.json();
	};

	it('pages read from either end join up into the whole sorted list', async () => {
		for (const dir of ['asc', 'desc']) {
			const seen: number[] = [];
			for (let page = 1; page <= 3; page++) {
				const reply = await get(`sort=number&dir=${dir}&per=10&page=${page}`);
				expect(reply).toMatchObject({ total: 23, pages: 3, exact: true, hasNext: page < 3 });
				seen.push(...reply.rows.map((r: { number: number }) => r.number));
			}
			expect(seen).toEqual(dir === 'asc' ? numbers : [...numbers].reverse());
		}
		const byCustomer: string[] = [];
		for (let page = 1; page <= 3; page++) byCustomer.push(...(await get(`sort=customer&dir=asc&per=10&page=${page}`)).rows.map((r: { customer: string }) => r.customer));
		expect(byCustomer).toHaveLength(23);
		expect(new Set(byCustomer).size).toBe(23);
		expect((await get('sort=number&per=10&page=4')).rows).toEqual([]);
	});

	it('a search pages through its matches with exact counts below the counting limit', async () => {
		expect(COUNT_LIMIT).toBeGreaterThan(23);
		const first = await get('q=page%20person&sort=number&dir=asc&per=10');
		expect(first).toMatchObject({ total: 23, pages: 3, exact: true, hasNext: true });
		expect(first.counts.checked_in).toBe(23);
		const last = await get('q=page%20person&sort=number&dir=asc&per=10&page=3');
		expect(last.rows.map((r: { number: number }) => r.number)).toEqual(numbers.slice(20));
		expect(last.hasNext).toBe(false);
	});

	it('the counts kept by triggers follow check-in, moves, reassignment and deletion', async () => {
		const tech = actor(big, 'technician');
		const [a, b] = (await get('sort=number&dir=asc&per=10')).rows;
		await jobs.transition(tech, a.id, 'diagnosing');
		await jobs.assign(actor(big, 'writer'), b.id, null);
		const kept = async () =>
			db().query<{ status: string; technician: string; kept: number; actual: number }>(
				`SELECT coalesce(k.status, a.status) AS status, coalesce(k.technician_key, a.technician_key)::text AS technician,
				        coalesce(k.n, 0) AS kept, coalesce(a.n, 0)::int AS actual
				   FROM (SELECT * FROM job_status_counts WHERE shop_id = :shop AND n <> 0) k
				   FULL JOIN (SELECT status, coalesce(technician_id, '00000000-0000-0000-0000-000000000000') AS technician_key, count(*) AS n
				                FROM jobs WHERE shop_id = :shop GROUP BY 1, 2) a
				     ON a.status = k.status AND a.technician_key = k.technician_key`,
				{ replacements: { shop: big.id }, type: QueryTypes.SELECT }
			);
		const before = await kept();
		expect(before.length).toBeGreaterThanOrEqual(3);
		for (const row of before) expect(row.kept).toBe(row.actual);
		expect((await get('')).counts).toMatchObject({ checked_in: 22, diagnosing: 1 });
		expect((await get('tech=none')).total).toBe(1);

		await db().query('DELETE FROM jobs WHERE id = :id', { replacements: { id: b.id } });
		for (const row of await kept()) expect(row.kept).toBe(row.actual);
		expect((await get('')).total).toBe(22);
	});
	it('sorted by status, pages read within one status join up into the whole sorted list', async () => {
		for (const dir of ['asc', 'desc']) {
			const whole: { id: string; status: string }[] = (await get(`sort=status&dir=${dir}&per=100`)).rows;
			expect(new Set(whole.map((r) => r.status)).size).toBeGreaterThanOrEqual(2);
			const paged: string[] = [];
			for (let page = 1; page <= Math.ceil(whole.length / 10); page++) {
				paged.push(...(await get(`sort=status&dir=${dir}&per=10&page=${page}`)).rows.map((r: { id: string }) => r.id));
			}
			expect(paged).toEqual(whole.map((r) => r.id));
		}
	});

	it('past the counting limit the SQL says "more than" and the index counts; both page alike and count a narrow status exactly', async () => {
		const [{ unitId, customerId }] = await db().query<{ unitId: string; customerId: string }>(
			'SELECT unit_id AS "unitId", customer_id AS "customerId" FROM jobs WHERE shop_id = :shop LIMIT 1',
			{ replacements: { shop: big.id }, type: QueryTypes.SELECT }
		);
		const many = COUNT_LIMIT + 5;
		await db().query(
			`INSERT INTO jobs (shop_id, number, unit_id, customer_id, complaint, status, search_text, customer_name, unit_label)
			 SELECT :shop, 90000 + i, :unit, :customer, 'Bulk lot unit', CASE WHEN i <= 5 THEN 'quoted' ELSE 'checked_in' END,
			        'bulk lot unit ' || i, 'Bulk Lot', 'Bulk lot unit'
			   FROM generate_series(1, :many) AS i`,
			{ replacements: { shop: big.id, unit: unitId, customer: customerId, many } }
		);
		// The API answers from the shop's board index; the same query in SQL alone is `sql`.
		const both = async (query: string) => {
			const sql = await boardSql.page(big.id, boardSql.parseBoardQuery(new URLSearchParams(query)), { useIndex: false });
			const api = await get(query);
			expect(api.rows).toEqual(sql.rows);
			return { api, sql };
		};
		const first = await both('q=bulk%20lot&sort=number&dir=asc');
		expect(first.sql).toMatchObject({ total: null, pages: null, exact: false, hasNext: true });
		expect(first.api).toMatchObject({ total: many, pages: Math.ceil(many / 25), exact: true, hasNext: true });
		expect(first.api.counts).toMatchObject({ quoted: 5, checked_in: many - 5 });
		expect(first.api.rows.map((r: { number: number }) => r.number)).toEqual(Array.from({ length: 25 }, (_, i) => 90001 + i));
		// Page 2 lies within the first COUNT_LIMIT + 1 matches in number order; page 3 reaches past
		// them to the last few: both are the right slice of the whole sorted list.
		const middle = await both(`q=bulk%20lot&sort=number&dir=asc&per=100&page=2`);
		expect(middle.api.rows.map((r: { number: number }) => r.number)).toEqual(Array.from({ length: 100 }, (_, i) => 90101 + i));
		expect(middle.sql.hasNext).toBe(true);
		const newest = await both(`q=bulk%20lot&sort=customer&dir=desc&per=10&page=21`);
		expect(newest.sql).toMatchObject({ hasNext: false });
		expect(newest.api.rows).toHaveLength(5);
		const last = await both(`q=bulk%20lot&sort=number&dir=asc&per=100&page=3`);
		expect(last.api.rows.map((r: { number: number }) => r.number)).toEqual(Array.from({ length: many - 200 }, (_, i) => 90201 + i));
		expect(last.sql.hasNext).toBe(false);
		const quoted = await both('q=bulk%20lot&status=quoted');
		expect(quoted.sql).toMatchObject({ total: 5, pages: 1, exact: false, hasNext: false });
		expect(quoted.api).toMatchObject({ total: 5, pages: 1, exact: true, hasNext: false });
		expect(quoted.api.rows.every((r: { status: string }) => r.status === 'quoted')).toBe(true);
		expect((await get('')).counts.quoted).toBe(5);
	});
});

describe('the board sorted by status', () => {
	it('follows the path a job takes through the shop, not the alphabet, with and without a search', async () => {
		const shop = await createShop('Status order');
		const owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
		// Alphabetically approved < checked_in < quoted < ready; along the path it is the other way about.
		const order: JobStatus[] = ['ready', 'quoted', 'approved', 'checked_in'];
		for (const status of order) {
			const { job } = await createJob(shop, { customerName: `Order ${status}` });
			await db().query('UPDATE jobs SET status = :status WHERE id = :id', { replacements: { status, id: job.id } });
		}
		const path = JOB_STATUSES.filter((s) => order.includes(s));
		for (const query of ['sort=status&dir=asc', 'q=order&sort=status&dir=asc']) {
			const rows = (await owner.get(`/api/jobs?${query}`)).json().rows as { status: JobStatus }[];
			expect(rows.map((r) => r.status), query).toEqual(path);
		}
		const back = (await owner.get('/api/jobs?sort=status&dir=desc')).json().rows as { status: JobStatus }[];
		expect(back.map((r) => r.status)).toEqual([...path].reverse());
	});

	it("the stored rank of every status is its place in the shop's list of statuses", async () => {
		const { job } = await createJob(await createShop('Status ranks'));
		await db()
			.transaction(async (transaction) => {
				for (const [i, status] of JOB_STATUSES.entries()) {
					const [rows] = await db().query('UPDATE jobs SET status = :status WHERE id = :id RETURNING status_rank AS rank', { replacements: { status, id: job.id }, transaction });
					expect((rows as { rank: number }[])[0].rank, status).toBe(i + 1);
				}
				throw new Error('rolled back');
			})
			.catch((e: Error) => expect(e.message).toBe('rolled back'));
	});
});

describe('the home page', () => {
	it('shows the board\'s open counts, the jobs waiting longest, and a technician\'s own jobs', async () => {
		const home = await createShop('Home page');
		const old = await createJob(home, { customerName: 'Wren Longwait' });
		const fresh = await createJob(home, { customerName: 'Ivo Freshly' });
		await createJob(home, { customerName: 'Unassigned Una' }).then(({ job }) => jobs.assign(actor(home, 'writer'), job.id, null));
		await db().query(`UPDATE jobs SET status_changed_at = now() - interval '20 days' WHERE id = :id`, { replacements: { id: old.job.id } });
		const owner = await signedIn(home.staff.owner.email, home.staff.owner.password);
		const page = await owner.get('/home');
		expect(page.status).toBe(200);
		expect(page.text).toContain('3 jobs in the shop');
		const waiting = page.text.slice(page.text.indexOf('Waiting over 14 days'));
		expect(waiting).toContain('Wren Longwait');
		expect(waiting).not.toContain('Ivo Freshly');
		expect(page.text).not.toContain('Assigned to you'); // only a technician's home has it
		expect(page.text).toContain('href="/customers?checkin"');
		expect((await owner.get('/customers?checkin')).text).toContain('To check a unit in, find its owner below');

		const tech = await signedIn(home.staff.technician.email, home.staff.technician.password);
		const mine = (await tech.get('/home')).text;
		const assigned = mine.slice(mine.indexOf('Assigned to you'), mine.indexOf('Waiting over 14 days'));
		expect(assigned).toContain('Ivo Freshly');
		expect(assigned).toContain('Wren Longwait');
		expect(assigned).not.toContain('Unassigned Una');
		expect(mine).not.toContain('Orla Elsewhere'); // another shop's job
		expect(mine).not.toContain('Check a unit in'); // technicians do not check units in
	});
});
