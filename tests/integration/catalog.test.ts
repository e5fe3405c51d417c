// Catalog pages, actions and CSV files: who may do what, shop isolation, import checks and round trips.
import { beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, LabourOperation, Part, ReplacementUnit, Shop } from '../../src/lib/server/db/models';
import { Client, signedIn, type Reply } from '../helpers/client';
import { seedDemoCatalog } from '../../src/lib/server/demo-catalog';
import { createShop, type ShopFixture } from '../helpers/fixtures';

type Who = 'anonymous' | 'owner' | 'manager' | 'writer' | 'technician';
const STAFF = ['owner', 'manager', 'writer', 'technician'] as const;

let a: ShopFixture;
let b: ShopFixture;
const A = {} as Record<Who, Client>;
let ownerB: Client;
let partA: Part;

/** The page text with the few entities Svelte writes turned back into characters. */
const textOf = (reply: Reply) =>
	reply.text.replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&');

function upload(client: Client, list: string, content: string | Uint8Array, filename = 'catalog.csv'): Promise<Reply> {
	const body = new FormData();
	body.set('list', list);
	body.set('file', new Blob([content as BlobPart], { type: 'text/csv' }), filename);
	return client.request('POST', '/catalog?/import', { body, headers: { origin: client.base, accept: 'text/html' } });
}

async function partsOf(shopId: string) {
	const rows = await Part.findAll({ where: { shopId }, order: [['number', 'ASC']], raw: true });
	return rows.map((r) => ({ number: r.number, description: r.description, cost: r.cost, supplier: r.supplier, stock: r.stock, specialOrder: r.specialOrder }));
}

beforeAll(async () => {
	[a, b] = await Promise.all([createShop('Catalog A'), createShop('Catalog B')]);
	A.anonymous = new Client();
	for (const role of STAFF) A[role] = await signedIn(a.staff[role].email, a.staff[role].password);
	ownerB = await signedIn(b.staff.owner.email, b.staff.owner.password);
	partA = await Part.create({ shopId: a.id, number: 'A-ROTOR-1', description: 'Rotor for shop A', cost: '140.00', supplier: 'Alder Supply' });
});

describe('who may open the catalog and its files', () => {
	const pages: Record<string, Record<Who, 'ok' | 'signin' | 'unauthorized' | 'forbidden'>> = {
		'/catalog': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
		'/catalog/parts.csv': { anonymous: 'unauthorized', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
		'/catalog/labour.csv': { anonymous: 'unauthorized', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
		'/catalog/replacements.csv': { anonymous: 'unauthorized', owner: 'ok', manager: 'ok', writer: 'ok', technician: 'ok' },
		'/catalog/parts/:id': { anonymous: 'signin', owner: 'ok', manager: 'ok', writer: 'forbidden', technician: 'forbidden' }
	};
	for (const [template, expected] of Object.entries(pages)) {
		for (const who of Object.keys(expected) as Who[]) {
			it(`${who} → GET ${template} is ${expected[who]}`, async () => {
				const path = template.replace(':id', partA.id);
				const reply = await A[who].get(path);
				switch (expected[who]) {
					case 'ok':
						expect(reply.status).toBe(200);
						if (path.endsWith('.csv')) expect(reply.headers.get('content-type')).toMatch(/^text\/csv/);
						break;
					case 'signin':
						expect(reply.status).toBe(303);
						expect(reply.location).toBe(`/signin?next=${encodeURIComponent(path)}`);
						break;
					case 'unauthorized':
						expect(reply.status).toBe(401);
						break;
					case 'forbidden':
						expect(reply.status).toBe(403);
						expect(reply.text).toContain('Your role does not give access');
						break;
				}
			});
		}
	}

	it('writers and technicians read the catalog but get 403 on every change, and nothing changes', async () => {
		const before = await partsOf(a.id);
		for (const who of ['writer', 'technician'] as const) {
			const page = await A[who].get('/catalog');
			expect(page.text).toContain('A-ROTOR-1');
			expect(page.text).not.toContain('action="?/add"');
			const add = await A[who].form('/catalog?/add', { list: 'parts', number: `${who}-X`, description: 'Nope', cost: '1.00' });
			expect(add.status).toBe(403);
			expect((await upload(A[who], 'parts', 'number,description,cost\nW-1,Nope,1.00\n')).status).toBe(403);
			const save = await A[who].form(`/catalog/parts/${partA.id}?/save`, { number: 'A-ROTOR-1', description: 'Changed', cost: '1.00' });
			expect(save.status).toBe(403);
			const del = await A[who].form(`/catalog/parts/${partA.id}?/delete`, { confirm: 'yes' });
			expect(del.status).toBe(403);
		}
		expect(await partsOf(a.id)).toEqual(before);
	});

	it('anonymous posts are sent to sign-in and change nothing', async () => {
		const before = await partsOf(a.id);
		for (const path of ['/catalog?/add', '/catalog?/import', `/catalog/parts/${partA.id}?/save`, `/catalog/parts/${partA.id}?/delete`]) {
			const reply = await A.anonymous.form(path, { list: 'parts', number: 'ANON', description: 'x', cost: '1', confirm: 'yes' });
			expect(reply.status).toBe(303);
			expect(reply.location).toMatch(/^\/signin/);
		}
		expect(await partsOf(a.id)).toEqual(before);
	});

	it('an unknown list or a malformed id is a 404, not an error', async () => {
		expect((await A.owner.get(`/catalog/widgets/${partA.id}`)).status).toBe(404);
		expect((await A.owner.get("/catalog/parts/1' OR '1'='1")).status).toBe(404);
		expect((await A.owner.get('/catalog/parts.xlsx')).status).toBe(404);
	});
});

describe('adding, editing and deleting', () => {
	it('owners and managers add parts, labour and replacement units; money is kept exactly', async () => {
		const part = await A.owner.form('/catalog?/add', {
			list: 'parts', number: 'A-STATOR-9', description: 'Stator 120/240 V', cost: '176.1', supplier: 'Alder Supply', stock: '2', specialOrder: 'on'
		});
		expect(part.status).toBe(200);
		const saved = await Part.findOne({ where: { shopId: a.id, number: 'A-STATOR-9' } });
		expect(saved).toMatchObject({ description: 'Stator 120/240 V', cost: '176.10', stock: 2, specialOrder: true });

		const labour = await A.manager.form('/catalog?/add', { list: 'labour', name: 'Replace stator (portable)', hours: '2.2' });
		expect(labour.status).toBe(200);
		expect((await LabourOperation.findOne({ where: { shopId: a.id, name: 'Replace stator (portable)' } }))!.hours).toBe('2.20');

		const unit = await A.manager.form('/catalog?/add', {
			list: 'replacements', kind: 'portable', name: 'Harrowgate PG-5500 test', ratedWatts: '5500', priceNew: '899', lifeYears: '10', lifeHours: '1500'
		});
		expect(unit.status).toBe(200);
		expect(await ReplacementUnit.findOne({ where: { shopId: a.id, name: 'Harrowgate PG-5500 test' }, raw: true })).toMatchObject({
			kind: 'portable', ratedWatts: 5500, priceNew: '899.00', lifeYears: '10.0', lifeHours: '1500'
		});
		expect(await AuditEvent.count({ where: { shopId: a.id, action: 'catalog.parts.created' } })).toBeGreaterThan(0);

		const page = await A.writer.get('/catalog');
		// Intl.NumberFormat en/USD: "$176.10".
		expect(page.text).toContain('$176.10');
		expect(page.text).toContain('Harrowgate PG-5500 test');
		expect(page.text).toContain('$899.00');
	});

	it.each([
		['abc', 'Enter the cost as a number like 12.50'],
		['-4.00', 'The cost cannot be negative.'],
		['12.345', 'Use at most 2 decimal places for the cost.'],
		['$12', 'Enter the cost as a number like 12.50'],
		['', 'Enter the cost.']
	])('a cost of "%s" is refused with a clear message and nothing is saved', async (cost, message) => {
		const reply = await A.owner.form('/catalog?/add', { list: 'parts', number: 'BAD-COST', description: 'Bad cost', cost });
		expect(reply.status).toBe(400);
		expect(textOf(reply)).toContain(message);
		expect(reply.text).toContain('value="Bad cost"');
		expect(await Part.count({ where: { shopId: a.id, number: 'BAD-COST' } })).toBe(0);
	});

	it('a duplicate part number is a form message, and other bad fields are named', async () => {
		const dup = await A.owner.form('/catalog?/add', { list: 'parts', number: 'A-ROTOR-1', description: 'Again', cost: '1.00' });
		expect(dup.status).toBe(400);
		expect(textOf(dup)).toContain('already has a part with the part number "A-ROTOR-1"');
		const hours = await A.owner.form('/catalog?/add', { list: 'labour', name: 'Zero hours', hours: '0' });
		expect(hours.status).toBe(400);
		expect(textOf(hours)).toContain('The hours must be more than 0.');
		const kind = await A.owner.form('/catalog?/add', { list: 'replacements', kind: 'tractor', name: 'X', ratedWatts: '1', priceNew: '1', lifeYears: '1', lifeHours: '1' });
		expect(kind.status).toBe(400);
		expect(textOf(kind)).toContain('Choose the kind');
		const list = await A.owner.form('/catalog?/add', { list: 'widgets', name: 'x' });
		expect(list.status).toBe(400);
	});

	it('a manager edits a part; a delete needs the confirmation box', async () => {
		const part = await Part.create({ shopId: a.id, number: 'A-EDIT-1', description: 'Brush holder', cost: '18.75' });
		const form = await A.manager.get(`/catalog/parts/${part.id}`);
		expect(form.text).toContain('value="18.75"');
		const bad = await A.manager.form(`/catalog/parts/${part.id}?/save`, { number: 'A-EDIT-1', description: 'Brush holder, new', cost: '-1' });
		expect(bad.status).toBe(400);
		expect(bad.text).toContain('value="Brush holder, new"');
		expect((await part.reload()).description).toBe('Brush holder');

		const saved = await A.manager.form(`/catalog/parts/${part.id}?/save`, { number: 'A-EDIT-1', description: 'Brush holder assembly', cost: '19.20', stock: '4' });
		expect(saved.status).toBe(303);
		expect(saved.location).toBe('/catalog?done=saved#parts');
		expect(await part.reload()).toMatchObject({ description: 'Brush holder assembly', cost: '19.20', stock: 4, specialOrder: false });
		expect(await AuditEvent.count({ where: { shopId: a.id, action: 'catalog.parts.updated', entityId: part.id } })).toBe(1);

		const unconfirmed = await A.manager.form(`/catalog/parts/${part.id}?/delete`, {});
		expect(unconfirmed.status).toBe(400);
		expect(unconfirmed.text).toContain('Tick the box to confirm');
		expect(await Part.count({ where: { id: part.id } })).toBe(1);

		const deleted = await A.manager.form(`/catalog/parts/${part.id}?/delete`, { confirm: 'yes' });
		expect(deleted.status).toBe(303);
		expect(await Part.count({ where: { id: part.id } })).toBe(0);
		expect((await A.manager.get(`/catalog/parts/${part.id}`)).status).toBe(404);
	});

	it('the search finds by part number, description or supplier', async () => {
		await Part.create({ shopId: a.id, number: 'A-SRCH-77', description: 'Recoil starter rope', cost: '5.00', supplier: 'Quimby Outfitters' });
		const found = await A.technician.get('/catalog?q=quimby');
		expect(found.text).toContain('A-SRCH-77');
		expect(found.text).not.toContain('A-ROTOR-1');
		const wildcard = await A.technician.get('/catalog?q=%25');
		expect(wildcard.text).not.toContain('A-SRCH-77');
	});
});

describe('shop isolation', () => {
	it("another shop's part id is not found: no page, no edit, no delete", async () => {
		expect((await ownerB.get(`/catalog/parts/${partA.id}`)).status).toBe(404);
		const save = await ownerB.form(`/catalog/parts/${partA.id}?/save`, { number: 'A-ROTOR-1', description: 'Taken over', cost: '0.01' });
		expect(save.status).toBe(404);
		const del = await ownerB.form(`/catalog/parts/${partA.id}?/delete`, { confirm: 'yes' });
		expect(del.status).toBe(404);
		expect(await partA.reload()).toMatchObject({ description: 'Rotor for shop A', cost: '140.00' });
	});

	it("the page and the CSV files hold only the shop's own rows", async () => {
		await Part.create({ shopId: b.id, number: 'B-ONLY-1', description: 'Shop B part', cost: '3.00' });
		const csv = (await ownerB.get('/catalog/parts.csv')).text;
		expect(csv).toContain('B-ONLY-1');
		expect(csv).not.toContain('A-ROTOR-1');
		const page = await ownerB.get('/catalog');
		expect(page.text).not.toContain('A-ROTOR-1');
		expect((await A.owner.get('/catalog/parts.csv')).text).not.toContain('B-ONLY-1');
	});

	it("an import in one shop never touches another shop's row with the same number", async () => {
		const reply = await upload(ownerB, 'parts', 'number,description,cost\nA-ROTOR-1,Shop B rotor,99.00\n');
		expect(reply.status).toBe(200);
		expect(await partA.reload()).toMatchObject({ description: 'Rotor for shop A', cost: '140.00' });
		expect(await Part.count({ where: { shopId: b.id, number: 'A-ROTOR-1' } })).toBe(1);
	});
});

describe('CSV import', () => {
	it('adds new rows and updates rows with a known part number', async () => {
		const shop = await createShop('Import');
		const owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
		await Part.create({ shopId: shop.id, number: 'P-100', description: 'Old text', cost: '10.00', stock: 3 });
		const csv = [
			'Number,Description,Cost,Supplier,Stock,Special order',
			'P-100,Brush holder assembly,11.25,Millbrook Parts Co.,5,no',
			'P-200,"Stator, 120/240 V",176.00,Millbrook Parts Co.,0,yes',
			'P-300,Spark plug,3.1,,,'
		].join('\r\n');
		const reply = await upload(owner, 'parts', csv);
		expect(reply.status).toBe(200);
		expect(reply.text).toContain('2 added');
		expect(reply.text).toContain('1 updated');
		expect(await partsOf(shop.id)).toEqual([
			{ number: 'P-100', description: 'Brush holder assembly', cost: '11.25', supplier: 'Millbrook Parts Co.', stock: 5, specialOrder: false },
			{ number: 'P-200', description: 'Stator, 120/240 V', cost: '176.00', supplier: 'Millbrook Parts Co.', stock: 0, specialOrder: true },
			{ number: 'P-300', description: 'Spark plug', cost: '3.10', supplier: '', stock: 0, specialOrder: false }
		]);
		expect(await AuditEvent.findOne({ where: { shopId: shop.id, action: 'catalog.parts.imported' }, raw: true })).toMatchObject({
			detail: { added: 2, updated: 1, unchanged: 0 }
		});
	});

	it('one bad row names its line and column, and nothing at all is imported', async () => {
		const shop = await createShop('Bad import');
		const owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
		await Part.create({ shopId: shop.id, number: 'P-1', description: 'Kept as is', cost: '5.00' });
		const before = await partsOf(shop.id);
		const csv = [
			'number,description,cost',
			'P-1,Changed text,6.00',
			'P-2,"Two-line',
			'description",7.00',
			'P-3,Recoil starter,abc',
			'P-4,Rope,1.999'
		].join('\n');
		const reply = await upload(owner, 'parts', csv);
		expect(reply.status).toBe(400);
		const text = textOf(reply);
		expect(text).toContain('Nothing was imported: 2 lines have problems.');
		// The quoted cell spans lines 3 and 4, so the bad rows are on lines 5 and 6 of the file.
		expect(text).toMatch(/Line 5, column “cost”:\s*Enter the cost as a number like 12.50/);
		expect(text).toMatch(/Line 6, column “cost”:\s*Use at most 2 decimal places for the cost./);
		expect(await partsOf(shop.id)).toEqual(before);
		expect(await AuditEvent.count({ where: { shopId: shop.id, action: 'catalog.parts.imported' } })).toBe(0);
	});

	it.each([
		['a repeated part number', 'number,description,cost\nP-9,One,1.00\nP-9,Two,2.00\n', /Line 3, column “number”:\s*"P-9" already appears on line 2/],
		['an unknown column', 'number,description,cost,colour\nP-9,One,1.00,red\n', /Line 1, column “colour”:\s*Unknown column "colour"/],
		['no key column', 'description,cost\nOne,1.00\n', /needs a "number" column/],
		['a short row', 'number,description,cost\nP-9,One\n', /at line 2: this row has a different number of cells/],
		['an unclosed quote', 'number,description,cost\nP-9,"One,1.00\n', /could not be read as CSV/],
		['a negative cost', 'number,description,cost\nP-9,One,-2.00\n', /Line 2, column “cost”:\s*The cost cannot be negative./],
		['a new part without a cost column', 'number,description\nP-new,Fresh part\n', /Line 2, column “cost”:\s*A new part needs a value here/],
		['a bad yes/no', 'number,description,cost,special_order\nP-9,One,1.00,maybe\n', /Write "yes" or "no" for special order/],
		['an empty file', '', /The file is empty/]
	])('%s is refused with a clear message', async (_what, csv, message) => {
		const before = await partsOf(a.id);
		const reply = await upload(A.manager, 'parts', csv);
		expect(reply.status).toBe(400);
		expect(textOf(reply)).toMatch(message);
		expect(await partsOf(a.id)).toEqual(before);
	});

	it('no file, a workbook, or text that is not UTF-8 is refused with advice', async () => {
		const none = await A.owner.request('POST', '/catalog?/import', {
			body: (() => { const f = new FormData(); f.set('list', 'parts'); return f; })(),
			headers: { origin: A.owner.base, accept: 'text/html' }
		});
		expect(none.status).toBe(400);
		expect(none.text).toContain('Choose a CSV file to import.');
		const workbook = await upload(A.owner, 'parts', new Uint8Array([0x50, 0x4b, 0x03, 0x04, 1, 2, 3]), 'parts.xlsx');
		expect(workbook.status).toBe(400);
		expect(textOf(workbook)).toContain('save or export the sheet as "CSV UTF-8"');
		const latin1 = await upload(A.owner, 'parts', new Uint8Array([...Buffer.from('number,description,cost\nP-1,Caf'), 0xe9, ...Buffer.from(',1.00\n')]));
		expect(latin1.status).toBe(400);
		expect(textOf(latin1)).toContain('not UTF-8 text');
	});

	it('a file over 2 MB or over 5,000 rows is refused before anything is written', async () => {
		const before = await Part.count({ where: { shopId: a.id } });
		const big = 'number,description,cost\n' + `P-x,${'x'.repeat(100)},1.00\n`.repeat(21_000);
		expect(big.length).toBeGreaterThan(2 * 1024 * 1024);
		const tooBig = await upload(A.owner, 'parts', big);
		expect(tooBig.status).toBe(400);
		expect(textOf(tooBig)).toContain('The file is larger than 2 MB.');

		const rows = Array.from({ length: 5001 }, (_, i) => `R-${i},Row ${i},1.00`);
		const tooMany = await upload(A.owner, 'parts', ['number,description,cost', ...rows].join('\n'));
		expect(tooMany.status).toBe(400);
		expect(textOf(tooMany)).toContain('The file has more than 5,000 rows.');
		expect(await Part.count({ where: { shopId: a.id } })).toBe(before);
	});

	it('5,000 rows import in one go', async () => {
		const shop = await createShop('Bulk import');
		const owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
		const rows = Array.from({ length: 5000 }, (_, i) => `B-${String(i).padStart(4, '0')},Bulk row ${i},${i}.50`);
		const reply = await upload(owner, 'parts', ['number,description,cost', ...rows].join('\n'));
		expect(reply.status).toBe(200);
		expect(reply.text).toContain('5000 added');
		expect(await Part.count({ where: { shopId: shop.id } })).toBe(5000);
		expect((await Part.findOne({ where: { shopId: shop.id, number: 'B-4999' } }))!.cost).toBe('4999.50');
	});

	it('labour and replacement units import with their own columns and checks', async () => {
		const shop = await createShop('Other lists');
		const owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
		const labour = await upload(owner, 'labour', 'name,hours\nReplace AVR,0.7\nDiagnose no output,1\n');
		expect(labour.status).toBe(200);
		expect((await LabourOperation.findAll({ where: { shopId: shop.id }, order: [['name', 'ASC']], raw: true })).map((r) => [r.name, r.hours])).toEqual([
			['Diagnose no output', '1.00'],
			['Replace AVR', '0.70']
		]);
		const badUnit = await upload(owner, 'replacements', 'kind,name,rated_watts,price_new,life_years,life_hours\ntractor,Big one,5000,100,10,1500\n');
		expect(badUnit.status).toBe(400);
		expect(textOf(badUnit)).toMatch(/Line 2, column “kind”:\s*Choose the kind/);
		const unit = await upload(owner, 'replacements', 'kind,name,rated_watts,price_new,life_years,life_hours\nPressure washer,Jet 3100,0,429.00,8,500\n');
		expect(unit.status).toBe(200);
		expect(await ReplacementUnit.findOne({ where: { shopId: shop.id }, raw: true })).toMatchObject({ kind: 'pressure_washer', priceNew: '429.00', lifeYears: '8.0', lifeHours: '500' });
	});
});

describe('export then import changes nothing', () => {
	it.each(['parts', 'labour', 'replacements'] as const)('%s round-trip exactly', async (list) => {
		const shop = await createShop(`Round trip ${list}`);
		const owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
		await Part.bulkCreate([
			{ shopId: shop.id, number: 'RT-1', description: 'Plain', cost: '1.00' },
			{ shopId: shop.id, number: 'RT-2', description: 'Comma, "quotes" and\na new line', cost: '1234567.89', supplier: 'Ostrander Supply', stock: 7, specialOrder: true },
			{ shopId: shop.id, number: '=SUM(A1)', description: '+formula-looking', cost: '0.00', supplier: '@supplier' },
			{ shopId: shop.id, number: 'RT-3', description: "'=already guarded", cost: '2.00' },
			{ shopId: shop.id, number: 'RT-µ', description: 'Capacitor 30 µF – 450 V', cost: '11.40' }
		]);
		await LabourOperation.bulkCreate([
			{ shopId: shop.id, name: 'Replace brushes and clean slip rings', hours: '0.80' },
			{ shopId: shop.id, name: '-Odd name', hours: '12.25' }
		]);
		await ReplacementUnit.bulkCreate([
			{ shopId: shop.id, kind: 'standby', name: 'Ostrander HomeGuard 14 kW', ratedWatts: 14000, priceNew: '4290.00', lifeYears: '20.0', lifeHours: '30000' },
			{ shopId: shop.id, kind: 'inverter', name: 'Quietline 2200i', ratedWatts: 1800, priceNew: '629.50', lifeYears: '7.5', lifeHours: '2000' }
		]);
		const model = { parts: Part, labour: LabourOperation, replacements: ReplacementUnit }[list] as typeof Part;
		const rowsBefore = await model.findAll({ where: { shopId: shop.id }, order: [['id', 'ASC']], raw: true });

		const exported = await owner.get(`/catalog/${list}.csv`);
		expect(exported.status).toBe(200);
		expect(exported.headers.get('content-disposition')).toMatch(new RegExp(`attachment; filename="${list}-\\d{4}-\\d{2}-\\d{2}\\.csv"`));
		if (list === 'parts') {
			// A cell a spreadsheet would run as a formula is written with a leading apostrophe.
			expect(exported.text).toContain("'=SUM(A1)");
			expect(exported.text.replace(/^\ufeff/, '').split('\r\n')[0]).toBe('number,description,cost,supplier,stock,special_order');
		}
		const reply = await upload(owner, list, exported.text);
		expect(reply.status).toBe(200);
		expect(reply.text).toContain(`0 added, 0 updated, ${rowsBefore.length} unchanged`);
		expect(await model.findAll({ where: { shopId: shop.id }, order: [['id', 'ASC']], raw: true })).toEqual(rowsBefore);
		expect((await owner.get(`/catalog/${list}.csv`)).text).toBe(exported.text);
	});
});

describe('costs and technicians', () => {
	it('when the shop hides costs, technicians see neither the cost column nor cost figures', async () => {
		const shop = await createShop('Costs hidden');
		await Part.create({ shopId: shop.id, number: 'C-1', description: 'Rotor', cost: '148.50' });
		const tech = await signedIn(shop.staff.technician.email, shop.staff.technician.password);
		const writer = await signedIn(shop.staff.writer.email, shop.staff.writer.password);

		// Default: technicians see costs.
		expect((await tech.get('/catalog')).text).toContain('$148.50');
		expect((await tech.get('/catalog/parts.csv')).text).toContain('148.50');

		await Shop.update({ settings: { techniciansSeeCosts: false } }, { where: { id: shop.id } });
		const page = await tech.get('/catalog');
		expect(page.status).toBe(200);
		expect(page.text).toContain('C-1');
		expect(page.text).not.toContain('148.50');
		expect(page.text).toContain('Part costs are not shown to technicians');
		const csv = await tech.get('/catalog/parts.csv');
		expect(csv.text.replace(/^\ufeff/, '').split('\r\n')[0]).toBe('number,description,supplier,stock,special_order');
		expect(csv.text).not.toContain('148.50');

		// Writers are not technicians: they still see costs.
		expect((await writer.get('/catalog')).text).toContain('$148.50');
		expect((await writer.get('/catalog/parts.csv')).text).toContain('148.50');
	});

	it("prices are shown in the shop's currency", async () => {
		const shop = await createShop('Euro shop');
		await Shop.update({ currency: 'EUR' }, { where: { id: shop.id } });
		await Part.create({ shopId: shop.id, number: 'E-1', description: 'AVR', cost: '1234.50' });
		const owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
		// Intl.NumberFormat('en', { style: 'currency', currency: 'EUR' }) writes "€1,234.50".
		expect((await owner.get('/catalog')).text).toContain('€1,234.50');
	});
});

describe('demo catalog', () => {
	it('seeds parts, labour and replacement units once, and a second run adds nothing', async () => {
		const shop = await createShop('Demo catalog');
		await seedDemoCatalog(shop.id);
		await seedDemoCatalog(shop.id);
		expect(await Part.count({ where: { shopId: shop.id } })).toBeGreaterThanOrEqual(12);
		expect(await LabourOperation.findOne({ where: { shopId: shop.id, name: 'Replace alternator head (portable)' }, raw: true })).toMatchObject({ hours: '2.50' });
		expect(await ReplacementUnit.findOne({ where: { shopId: shop.id, name: 'Harrowgate PG-5500 5.5 kW portable' }, raw: true })).toMatchObject({
			lifeYears: '10.0', lifeHours: '1500'
		});
		const owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password);
		const exported = await owner.get('/catalog/parts.csv');
		const reply = await upload(owner, 'parts', exported.text);
		expect(reply.text).toContain(`0 added, 0 updated, ${await Part.count({ where: { shopId: shop.id } })} unchanged`);
	});
});
