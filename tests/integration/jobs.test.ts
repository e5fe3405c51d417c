import { QueryTypes } from 'sequelize';
import { beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import * as repairTimestamps from '../../src/lib/server/db/migrations/20261202-0012-repair-timestamps';
import * as jobs from '../../src/lib/server/jobs';
import { AuditEvent, Customer, Job, Quote, Reading, SpecItem, SpecSheet } from '../../src/lib/server/db/models';
import { forCustomer as readingsForCustomer, judge } from '../../src/lib/server/readings';
import { Client, signedIn } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { actor, createJob } from '../helpers/shopdata';

let shop: ShopFixture;
let other: ShopFixture;
const as = {} as Record<'owner' | 'manager' | 'writer' | 'technician', Client>;
let otherOwner: Client;

beforeAll(async () => {
	[shop, other] = await Promise.all([createShop('Jobs'), createShop('Jobs other')]);
	for (const role of ['owner', 'manager', 'writer', 'technician'] as const) as[role] = await signedIn(shop.staff[role].email, shop.staff[role].password);
	otherOwner = await signedIn(other.staff.owner.email, other.staff.owner.password);
});

const idFrom = (location: string | null) => location!.split('/').pop()!;

describe('customers, units and check-in', () => {
	it('a writer records a customer and a unit and checks it in; job numbers count up per shop', async () => {
		const made = await as.writer.form('/customers?/create', { name: 'Linnea Harrow', phone: '555-0133', email: '', address: '', notes: '' });
		expect(made.status).toBe(303);
		const customerId = idFrom(made.location);
		const unit = await as.writer.form(`/customers/${customerId}?/addUnit`, {
			kind: 'portable', maker: 'Harrowgate', model: 'PG-5500', serial: 'HG55-1', runningWatts: '5500', startingWatts: '6875',
			voltage: '120/240', fuel: 'gasoline', engineHours: '150', yearBought: '2020', pricePaid: '899', condition: 'good', notes: ''
		});
		expect(unit.status).toBe(303);
		const unitId = idFrom(unit.location);
		const first = await as.writer.form(`/units/${unitId}?/checkIn`, { complaint: 'No output', diagnosticFee: '89.00', promisedOn: '', technicianId: '' });
		const second = await as.writer.form(`/units/${unitId}?/checkIn`, { complaint: 'Still no output', diagnosticFee: '0', promisedOn: '', technicianId: '' });
		const [a, b] = await Promise.all([Job.findByPk(idFrom(first.location)), Job.findByPk(idFrom(second.location))]);
		expect(b!.number).toBe(a!.number + 1);
		expect(a!.status).toBe('checked_in');
		const ticket = await as.writer.get(`/jobs/${a!.id}/ticket`);
		expect(ticket.status).toBe(200);
		expect(ticket.text).toContain(`#${a!.number}`);
		expect(ticket.text).toContain('Linnea Harrow');
		expect(ticket.text).toContain('$89.00'); // the fee in the shop's currency, as the customer signs it
		expect((await as.writer.get(`/jobs/${a!.id}`)).text).toContain('Diagnostic fee $89.00');
	});

	it('bad unit and check-in input is refused field by field and nothing is saved', async () => {
		const { customer, unit } = await createJob(shop);
		const badUnit = await as.writer.form(`/customers/${customer.id}?/addUnit`, {
			kind: 'spaceship', runningWatts: '-5', startingWatts: 'lots', voltage: '480', fuel: 'gasoline', engineHours: 'NaN', yearBought: '1800', pricePaid: '1e999', condition: 'good'
		});
		expect(badUnit.status).toBe(400);
		expect(badUnit.text).toContain('Choose what kind of unit it is.');
		expect(badUnit.text).toContain('Running watts must be at least 0.');
		const before = await Job.count({ where: { shopId: shop.id } });
		const badJob = await as.writer.form(`/units/${unit.id}?/checkIn`, { complaint: '', diagnosticFee: '-1', promisedOn: 'soon', technicianId: other.staff.technician.id });
		expect(badJob.status).toBe(400);
		expect(badJob.text).toContain("Write down the customer's complaint.");
		expect(await Job.count({ where: { shopId: shop.id } })).toBe(before);
		const lastYear = new Date(Date.now() - 400 * 86_400_000).toISOString().slice(0, 10);
		const pastPromise = await as.writer.form(`/units/${unit.id}?/checkIn`, { complaint: 'No output', diagnosticFee: '89.00', promisedOn: lastYear, technicianId: '' });
		expect(pastPromise.status).toBe(400);
		expect(pastPromise.text).toContain('The promised date has already passed');
		expect(await Job.count({ where: { shopId: shop.id } })).toBe(before);
		const foreignTech = await as.writer.form(`/units/${unit.id}?/checkIn`, { complaint: 'x', diagnosticFee: '1', promisedOn: '', technicianId: other.staff.technician.id });
		expect(foreignTech.status).toBe(400);
		expect(foreignTech.text).toContain('Pick a technician from your own team.');
		expect(await Job.count({ where: { shopId: shop.id } })).toBe(before);
	});

	it('technicians cannot create customers or check units in', async () => {
		const { unit } = await createJob(shop);
		expect((await as.technician.form('/customers?/create', { name: 'Nope' })).status).toBe(403);
		expect((await as.technician.form(`/units/${unit.id}?/checkIn`, { complaint: 'x', diagnosticFee: '1' })).status).toBe(403);
	});
});

describe('job status', () => {
	it('moves only along the allowed path, each move an audit event with who, when, from and to', async () => {
		const { job } = await createJob(shop);
		const skip = await as.technician.form(`/jobs/${job.id}?/move`, { to: 'ready' });
		expect(skip.status).toBe(400);
		expect(skip.text).toContain('A job that is "Checked in" cannot become "Ready for pick-up".');
		expect(skip.text).toContain('Next it can be "Diagnosing"');
		expect((await as.technician.form(`/jobs/${job.id}?/move`, { to: 'diagnosing' })).status).toBe(200);
		const unsent = await as.technician.form(`/jobs/${job.id}?/move`, { to: 'quoted' });
		expect(unsent.status).toBe(400);
		expect(unsent.text).toContain('Send the estimate to the customer first');
		expect((await Job.findByPk(job.id))!.status).toBe('diagnosing');
		// As if an estimate had gone out (the quote tests send real ones).
		await Quote.create({ shopId: shop.id, jobId: job.id, draft: {}, sentVersions: 1, editedSinceSend: false, updatedBy: shop.staff.technician.id });
		expect((await as.technician.form(`/jobs/${job.id}?/move`, { to: 'quoted' })).status).toBe(200);
		const techApproves = await as.technician.form(`/jobs/${job.id}?/move`, { to: 'approved' });
		expect(techApproves.status).toBe(400);
		expect(techApproves.text).toContain('Your role cannot mark a job "Approved"');
		expect((await as.writer.form(`/jobs/${job.id}?/move`, { to: 'approved' })).status).toBe(200);
		const nonsense = await as.writer.form(`/jobs/${job.id}?/move`, { to: 'exploded' });
		expect(nonsense.status).toBe(400);

		const events = await AuditEvent.findAll({ where: { shopId: shop.id, entity: 'job', entityId: job.id, action: 'job.status' }, order: [['id', 'ASC']] });
		expect(events.map((e) => [e.detail.from, e.detail.to])).toEqual([
			[null, 'checked_in'],
			['checked_in', 'diagnosing'],
			['diagnosing', 'quoted'],
			['quoted', 'approved']
		]);
		expect(events[1].userId).toBe(shop.staff.technician.id);
		expect(events[3].userId).toBe(shop.staff.writer.id);
		expect(events.every((e) => e.createdAt instanceof Date)).toBe(true);
		expect((await Job.findByPk(job.id))!.status).toBe('approved');
	});

	it('a second save of findings from a stale page is a clear conflict and loses nothing', async () => {
		const { job } = await createJob(shop);
		const first = await as.technician.form(`/jobs/${job.id}?/findings`, { failedComponent: 'rotor', findings: 'Open field winding', lockVersion: String(job.lockVersion) });
		expect(first.status).toBe(200);
		const stale = await as.owner.form(`/jobs/${job.id}?/findings`, { failedComponent: 'stator', findings: 'My other notes', lockVersion: String(job.lockVersion) });
		expect(stale.status).toBe(400);
		expect(stale.text).toContain('Someone else saved this job after you opened it.');
		expect(stale.text).toContain('My other notes');
		const saved = await Job.findByPk(job.id);
		expect(saved!.failedComponent).toBe('rotor');
	});
});

describe('bench readings', () => {
	it('each reading is judged against its spec: pass, low, high, open, short', async () => {
		const { job } = await createJob(shop);
		const sheet = await SpecSheet.findOne({ where: { shopId: shop.id } }) ?? null;
		expect(sheet).toBeNull(); // fixture shops start without sheets; make one through the page
		const created = await as.manager.form('/specs/new?/save', {
			name: 'Bench test sheet', appliesTo: '', notes: '',
			label: 'Stator winding', unit: 'Ω', min: '0.3', max: '0.5', openAbove: '1000', shortBelow: '0.05', running: 'off', source: 'common practice'
		});
		expect(created.status).toBe(303);
		const item = await SpecItem.findOne({ where: { shopId: shop.id } });
		expect((await as.technician.form(`/jobs/${job.id}?/sheet`, { id: item!.sheetId })).status).toBe(200);
		// 0.4 Ω in a 0.3–0.5 Ω spec passes — common practice for a 5 kW-class portable stator, no source.
		const cases: [string, string][] = [['0.4', 'pass'], ['0.3', 'pass'], ['0.5', 'pass'], ['0.25', 'low'], ['0.9', 'high'], ['OL', 'open'], ['2000', 'open'], ['0.01', 'short']];
		for (const [value, expected] of cases) {
			const reply = await as.technician.form(`/jobs/${job.id}?/reading`, { specItemId: item!.id, value });
			expect(reply.status, value).toBe(200);
			const last = await Reading.findOne({ where: { jobId: job.id }, order: [['createdAt', 'DESC'], ['id', 'DESC']] });
			expect([value, last!.result]).toEqual([value, expected]);
		}
		const bad = await as.technician.form(`/jobs/${job.id}?/reading`, { specItemId: item!.id, value: 'twelve' });
		expect(bad.status).toBe(400);
		expect(bad.text).toContain('Enter the reading as a number');
		expect(await Reading.count({ where: { jobId: job.id } })).toBe(cases.length);
		const page = await as.technician.get(`/jobs/${job.id}`);
		expect(page.text).toContain('Open circuit');
	});

	it('the customer is shown the readings of the sheet in use and free-form ones, not those of a sheet set aside', async () => {
		const { job } = await createJob(shop);
		const sheetWith = async (name: string, label: string) => {
			expect((await as.manager.form('/specs/new?/save', { name, appliesTo: '', notes: '', label, unit: 'Ω', min: '0.3', max: '0.5', openAbove: '', shortBelow: '', running: 'off', source: '' })).status).toBe(303);
			return (await SpecItem.findOne({ where: { shopId: shop.id, label } }))!;
		};
		const first = await sheetWith('First sheet for the swap', 'Winding on the first sheet');
		const second = await sheetWith('Second sheet for the swap', 'Winding on the second sheet');
		await as.technician.form(`/jobs/${job.id}?/sheet`, { id: first.sheetId });
		await as.technician.form(`/jobs/${job.id}?/reading`, { specItemId: first.id, value: '0.4' });
		await as.technician.form(`/jobs/${job.id}?/sheet`, { id: second.sheetId });
		await as.technician.form(`/jobs/${job.id}?/reading`, { specItemId: second.id, value: '0.41' });
		await as.technician.form(`/jobs/${job.id}?/reading`, { label: 'Output voltage', unit: 'V', value: '0' });
		const fresh = (await Job.findByPk(job.id))!;
		expect((await readingsForCustomer(shop.id, fresh)).map((r) => r.label)).toEqual(['Winding on the second sheet', 'Output voltage']);
		// The shop still sees all three on the job page.
		const page = (await as.technician.get(`/jobs/${job.id}`)).text;
		for (const label of ['Winding on the first sheet', 'Winding on the second sheet', 'Output voltage']) expect(page).toContain(label);
	});

	it('the judge treats the bounds as inclusive and an over-range meter as open', () => {
		const spec = { minValue: '0.3', maxValue: '0.5', openAbove: null, shortBelow: null };
		expect(judge(spec, '0.3')).toBe('pass');
		expect(judge(spec, '0.5')).toBe('pass');
		expect(judge(spec, 'ol')).toBe('open');
		expect(judge({ minValue: '1', maxValue: null, openAbove: null, shortBelow: null }, '250')).toBe('pass');
	});
});

describe('shop isolation for every id', () => {
	it("another shop's customer, unit, job, spec sheet and reading are not found", async () => {
		const { customer, unit, job } = await createJob(shop);
		await as.technician.form(`/jobs/${job.id}?/reading`, { label: 'Output voltage', unit: 'V', value: '0' });
		const reading = await Reading.findOne({ where: { jobId: job.id } });
		expect(reading!.result).toBe('noted');
		for (const path of [`/customers/${customer.id}`, `/units/${unit.id}`, `/jobs/${job.id}`, `/jobs/${job.id}/ticket`]) {
			expect((await otherOwner.get(path)).status, path).toBe(404);
		}
		const moves = [
			otherOwner.form(`/jobs/${job.id}?/move`, { to: 'diagnosing' }),
			otherOwner.form(`/jobs/${job.id}?/findings`, { failedComponent: 'x', findings: 'y', lockVersion: '1' }),
			otherOwner.form(`/jobs/${job.id}?/reading`, { label: 'x', unit: 'V', value: '1' }),
			otherOwner.form(`/jobs/${job.id}?/removeReading`, { readingId: reading!.id }),
			otherOwner.form(`/jobs/${job.id}?/assign`, { id: other.staff.technician.id }),
			otherOwner.form(`/customers/${customer.id}?/update`, { name: 'Taken over' }),
			otherOwner.form(`/units/${unit.id}?/checkIn`, { complaint: 'x', diagnosticFee: '1' })
		];
		for (const reply of await Promise.all(moves)) expect([400, 404]).toContain(reply.status);
		const after = await Job.findByPk(job.id);
		expect(after!.status).toBe('checked_in');
		expect(after!.findings).toBe('');
		expect(await Reading.count({ where: { jobId: job.id } })).toBe(1);
		// A reading of this shop cannot be attached to the other shop's spec item either.
		const otherSheet = await otherOwner.form('/specs/new?/save', { name: 'Other', label: 'x', unit: 'V', min: '1', max: '2', running: 'off' });
		const otherItem = await SpecItem.findOne({ where: { shopId: other.id } });
		expect(otherSheet.status).toBe(303);
		const cross = await as.technician.form(`/jobs/${job.id}?/reading`, { specItemId: otherItem!.id, value: '1' });
		expect(cross.status).toBe(400);
		expect((await as.owner.get(`/specs/${otherItem!.sheetId}`)).status).toBe(404);
	});

	it('random and malformed ids are 404, never a server error', async () => {
		for (const path of ['/jobs/00000000-0000-4000-8000-000000000000', '/jobs/not-a-uuid', '/customers/%27%3B--', '/units/123', '/specs/zzz']) {
			expect((await as.owner.get(path)).status, path).toBe(404);
		}
	});
});

describe('creation and change times', () => {
	it('a save moves updated_at and leaves created_at where it was', async () => {
		const { job, customer } = await createJob(shop);
		await db().query(`UPDATE jobs SET created_at = '2026-11-30T12:12:00Z', updated_at = '2026-11-30T12:12:00Z' WHERE id = :id`, { replacements: { id: job.id } });
		await jobs.transition(actor(shop, 'technician'), job.id, 'diagnosing');
		const after = (await Job.findByPk(job.id))!;
		expect(after.createdAt.toISOString()).toBe('2026-11-30T12:12:00.000Z');
		expect(after.updatedAt.getTime()).toBeGreaterThan(Date.parse('2026-12-01T00:00:00Z'));
		await db().query(`UPDATE customers SET created_at = '2026-11-30T12:12:00Z', updated_at = '2026-11-30T12:12:00Z' WHERE id = :id`, { replacements: { id: customer.id } });
		await customer.reload();
		await customer.update({ notes: 'Calls before noon' });
		const [row] = await db().query<{ created: Date; updated: Date }>('SELECT created_at AS created, updated_at AS updated FROM customers WHERE id = :id', {
			replacements: { id: customer.id },
			type: QueryTypes.SELECT
		});
		expect(new Date(row.created).toISOString()).toBe('2026-11-30T12:12:00.000Z');
		expect(new Date(row.updated).getTime()).toBeGreaterThan(Date.parse('2026-12-01T00:00:00Z'));
	});

	it('migration 0012 gives back creation times that saves had moved, a job its check-in time from the audit trail', async () => {
		const { job, customer } = await createJob(shop);
		const checkedIn = (await AuditEvent.findOne({ where: { shopId: shop.id, entityId: job.id, action: 'job.status' }, order: [['createdAt', 'ASC']] }))!.createdAt;
		// As the shared column definition left them: created_at at the last save, updated_at at the insert.
		await db().query(`UPDATE jobs SET created_at = now() + interval '2 days', updated_at = now() + interval '1 day' WHERE id = :id`, { replacements: { id: job.id } });
		await db().query(`UPDATE customers SET created_at = '2026-12-01T10:00:00Z', updated_at = '2026-11-20T09:00:00Z' WHERE id = :id`, { replacements: { id: customer.id } });
		await repairTimestamps.up({ context: db() } as never);
		const repairedJob = (await Job.findByPk(job.id))!;
		expect(repairedJob.createdAt.toISOString()).toBe(checkedIn.toISOString());
		expect(repairedJob.updatedAt.getTime()).toBeGreaterThan(Date.now() + 1.9 * 86_400_000);
		const [c] = await db().query<{ created: Date; updated: Date }>('SELECT created_at AS created, updated_at AS updated FROM customers WHERE id = :id', {
			replacements: { id: customer.id },
			type: QueryTypes.SELECT
		});
		expect(new Date(c.created).toISOString()).toBe('2026-11-20T09:00:00.000Z');
		expect(new Date(c.updated).toISOString()).toBe('2026-12-01T10:00:00.000Z');
	});
});

describe('the customer list', () => {
	it('pages through every customer with a count, newest first or by name for a search, and an odd page falls back', async () => {
		const many = await createShop('Many customers');
		const owner = await signedIn(many.staff.owner.email, many.staff.owner.password);
		await Customer.bulkCreate(
			Array.from({ length: 55 }, (_, i) => {
				const name = `Pager ${String(i).padStart(2, '0')}`;
				return { shopId: many.id, name, phone: `555-01${String(i).padStart(2, '0')}`, searchText: name.toLowerCase(), createdAt: new Date(Date.UTC(2026, 10, 1, 0, i)) };
			})
		);
		const names = (html: string) => [...html.matchAll(/>(Pager \d\d)</g)].map((m) => m[1]); // the list, not the page data
		const first = await owner.get('/customers');
		expect(first.text).toContain('55 customers · page 1 of 2');
		expect(names(first.text)).toHaveLength(50);
		expect(names(first.text)[0]).toBe('Pager 54'); // newest first
		const second = await owner.get('/customers?page=2');
		expect(names(second.text)).toEqual(['Pager 04', 'Pager 03', 'Pager 02', 'Pager 01', 'Pager 00']);
		const search = await owner.get('/customers?q=pager%205&page=1');
		expect(search.text).toContain('5 customers matching');
		expect(names(search.text)).toEqual(['Pager 50', 'Pager 51', 'Pager 52', 'Pager 53', 'Pager 54']);
		for (const odd of ['0', '-3', 'x', '2.5', '999']) {
			const reply = await owner.get(`/customers?page=${odd}`);
			expect(reply.status, odd).toBe(200);
			expect(names(reply.text).length, odd).toBeGreaterThan(0);
		}
		expect(names((await owner.get('/customers')).text).some((n) => n.startsWith('Pager'))).toBe(true);
		expect((await as.owner.get('/customers?q=pager')).text).not.toContain('Pager 00'); // another shop's list
	});
});
