import { beforeAll, describe, expect, it } from 'vitest';
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
	});

	it('the first page renders on the server with the filters from the address', async () => {
		const page = await writer.get('/jobs?q=tessaly');
		expect(page.status).toBe(200);
		expect(page.text).toContain('Bram Tessaly');
		expect(page.text).not.toContain('Orla Penhallow');
	});
});
