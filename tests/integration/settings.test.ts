// The shop settings page: who may open and save it, validation that keeps what was typed, and storage.
import { beforeAll, describe, expect, it } from 'vitest';
import { pricingSettingsOverridesSchema } from '../../src/lib/pricing/settings';
import { AuditEvent, Part, Shop } from '../../src/lib/server/db/models';
import * as settings from '../../src/lib/server/settings';
import { Client, signedIn, type Reply } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { createJob } from '../helpers/shopdata';

type Who = 'anonymous' | 'owner' | 'manager' | 'writer' | 'technician';
type Entries = [string, string][];

let shop: ShopFixture;
const clients = {} as Record<Who, Client>;

const textOf = (reply: Reply) =>
	reply.text.replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&');

/** The message shown beside a field: the element with id `<field>-error`. */
function fieldError(reply: Reply, field: string): string | null {
	const match = new RegExp(`id="${field.replace('.', '\\.')}-error"[^>]*>([^<]*)<`).exec(textOf(reply));
	return match ? match[1] : null;
}

/** The settings form as the page would post it, filled with the shop's current values. */
async function currentForm(shopId: string): Promise<Entries> {
	const values = await settings.formValues(shopId);
	const entries: Entries = Object.entries(values.fields).filter(([key, value]) => !(key === 'techniciansSeeCosts' && value === ''));
	values.tierUpTo.forEach((upTo, i) => entries.push(['tierUpTo', upTo], ['tierMultiplier', values.tierMultiplier[i]]));
	for (const category of values.taxable) entries.push(['taxable', category]);
	return entries;
}

function withFields(entries: Entries, changes: Record<string, string | string[] | null>): Entries {
	const out = entries.filter(([key]) => !(key in changes));
	for (const [key, value] of Object.entries(changes)) {
		if (value === null) continue;
		for (const v of Array.isArray(value) ? value : [value]) out.push([key, v]);
	}
	return out;
}

function save(client: Client, entries: Entries): Promise<Reply> {
	return client.request('POST', '/settings?/save', {
		body: new URLSearchParams(entries).toString(),
		headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html', origin: client.base }
	});
}

const stored = async (id: string) => {
	const row = (await Shop.findByPk(id, { raw: true }))!;
	return { name: row.name, currency: row.currency, settings: row.settings };
};

beforeAll(async () => {
	shop = await createShop('Settings');
	clients.anonymous = new Client();
	for (const role of ['owner', 'manager', 'writer', 'technician'] as const) {
		clients[role] = await signedIn(shop.staff[role].email, shop.staff[role].password);
	}
});

describe('who may open and save the settings', () => {
	const expected: Record<Who, number> = { anonymous: 303, owner: 200, manager: 200, writer: 403, technician: 403 };
	for (const who of Object.keys(expected) as Who[]) {
		it(`${who} → GET /settings is ${expected[who]}`, async () => {
			const reply = await clients[who].get('/settings');
			expect(reply.status).toBe(expected[who]);
			if (who === 'anonymous') expect(reply.location).toBe('/signin?next=%2Fsettings');
			if (expected[who] === 403) expect(reply.text).toContain('Your role does not give access');
		});
	}

	it('writers, technicians and visitors cannot save, and nothing changes', async () => {
		const before = await stored(shop.id);
		const form = withFields(await currentForm(shop.id), { labourRate: '1.00', name: 'Taken over' });
		for (const who of ['writer', 'technician'] as const) expect((await save(clients[who], form)).status).toBe(403);
		const anonymous = await save(clients.anonymous, form);
		expect(anonymous.status).toBe(303);
		expect(anonymous.location).toMatch(/^\/signin/);
		expect(await stored(shop.id)).toEqual(before);
	});
});

describe('defaults and saving', () => {
	it('a new shop starts from the defaults, each field with its explanation', async () => {
		const fresh = await createShop('Fresh settings');
		const s = await settings.get(fresh.id);
		expect(s.pricing.labourRate.toString()).toBe('95');
		expect(s.currency).toBe('USD');
		expect(s.quoteValidityDays).toBe(30);
		expect(s.techniciansSeeCosts).toBe(true);
		expect(s.fees.diagnostic.toFixed(2)).toBe('85.00');
		const owner = await signedIn(fresh.staff.owner.email, fresh.staff.owner.password);
		const page = await owner.get('/settings');
		expect(page.text).toContain('value="95.00"');
		expect(page.text).toContain('Customers pay flat-rate hours times this rate.');
		expect(page.text).toContain('id="taxPercent-help"');
	});

	it('an owner saves every kind of setting; currency, profile and audit follow', async () => {
		const own = await createShop('Saving');
		const owner = await signedIn(own.staff.owner.email, own.staff.owner.password);
		await Shop.update({ settings: { otherModule: { keep: true } } }, { where: { id: own.id } });
		const form = withFields(await currentForm(own.id), {
			name: 'Larkfield Generator Works',
			phone: '555-0101',
			email: 'Desk@Larkfield.example',
			address: '3 Mill Row',
			currency: 'eur',
			roundingMode: 'half-even',
			labourRate: '110',
			tierUpTo: ['25', '250', ''],
			tierMultiplier: ['2.2', '1.6', '1.3'],
			taxPercent: '7.25',
			taxable: ['parts', 'labour'],
			discountPercent: '6',
			closeCallPercent: '12.5',
			feeDiagnostic: '99.50',
			feeDisposal: '0',
			feePickup: '60',
			quoteValidityDays: '14',
			techniciansSeeCosts: null,
			conditionFair: '0.7'
		});
		const reply = await save(owner, form);
		expect(reply.status).toBe(200);
		expect(reply.text).toContain('Settings saved.');

		const s = await settings.get(own.id);
		expect(s.currency).toBe('EUR');
		expect(s.pricing.roundingMode).toBe('half-even');
		expect(s.pricing.labourRate.toString()).toBe('110');
		expect(s.pricing.taxRate.toString()).toBe('0.0725');
		expect(s.pricing.discountRate.toString()).toBe('0.06');
		expect(s.pricing.closeCallBand.toString()).toBe('0.125');
		expect(s.pricing.taxable).toEqual({ parts: true, labour: true, fees: false, sublet: false, supplies: false, unit: false });
		expect(s.pricing.markupTiers.map((t) => [t.upTo?.toString() ?? null, t.multiplier.toString()])).toEqual([
			['25', '2.2'],
			['250', '1.6'],
			[null, '1.3']
		]);
		expect(s.pricing.conditionFactors.fair.toString()).toBe('0.7');
		expect(s.fees.diagnostic.toString()).toBe('99.5');
		expect(s.fees.disposal.toString()).toBe('0');
		expect(s.quoteValidityDays).toBe(14);
		expect(s.techniciansSeeCosts).toBe(false);

		const row = await stored(own.id);
		expect(row).toMatchObject({ name: 'Larkfield Generator Works', currency: 'EUR' });
		expect(row.settings.otherModule).toEqual({ keep: true });
		expect((await Shop.findByPk(own.id))!.email).toBe('desk@larkfield.example');
		// What other modules pass to the pricing engine validates as shop overrides.
		expect(pricingSettingsOverridesSchema.safeParse(await settings.pricingOverrides(own.id)).success).toBe(true);

		const event = await AuditEvent.findOne({ where: { shopId: own.id, action: 'shop.settings_updated' }, raw: true });
		expect(event!.detail.changed).toEqual(expect.arrayContaining(['name', 'pricing.labourRate', 'pricing.currency', 'fees', 'techniciansSeeCosts']));

		const page = await owner.get('/settings');
		expect(page.text).toContain('value="7.25"');
		expect(page.text).toContain('value="Larkfield Generator Works"');

		// The check-in form starts from the shop's diagnostic fee, in the shop's currency digits.
		const { unit } = await createJob(own);
		const unitPage = await owner.get(`/units/${unit.id}`);
		expect(unitPage.text).toMatch(/name="diagnosticFee"[^>]*value="99\.50"/);
	});

	it('a manager may save too, and empty tier rows are left out', async () => {
		const own = await createShop('Manager saves');
		const manager = await signedIn(own.staff.manager.email, own.staff.manager.password);
		const form = withFields(await currentForm(own.id), { tierUpTo: ['', '100', ''], tierMultiplier: ['', '2', '1.5'] });
		expect((await save(manager, form)).status).toBe(200);
		expect((await settings.get(own.id)).pricing.markupTiers).toHaveLength(2);
	});

	it('turning off "technicians see costs" hides costs from technicians in the catalog', async () => {
		const own = await createShop('Hide costs');
		await Part.create({ shopId: own.id, number: 'HC-1', description: 'Stator', cost: '176.00' });
		const owner = await signedIn(own.staff.owner.email, own.staff.owner.password);
		const tech = await signedIn(own.staff.technician.email, own.staff.technician.password);
		expect((await tech.get('/catalog')).text).toContain('$176.00');
		expect((await save(owner, withFields(await currentForm(own.id), { techniciansSeeCosts: null }))).status).toBe(200);
		expect((await tech.get('/catalog')).text).not.toContain('176.00');
		expect((await tech.get('/catalog/parts.csv')).text).not.toContain('176.00');
		expect((await owner.get('/catalog')).text).toContain('$176.00');
	});
});

describe('bad settings are refused with the message beside the field, and nothing is saved', () => {
	const cases: [string, Record<string, string | string[]>, string, string][] = [
		['a negative tax rate', { taxPercent: '-1' }, 'taxPercent', 'Enter a tax rate in percent at least 0 and at most 100.'],
		['tiers out of order', { tierUpTo: ['50', '10', ''], tierMultiplier: ['2', '1.5', '1.2'] }, 'tierUpTo.1', 'Markup tiers must be in order of rising unit cost.'],
		['a middle tier without a limit', { tierUpTo: ['50', '', ''], tierMultiplier: ['2', '1.5', '1.2'] }, 'tierUpTo.1', 'Only the last markup tier may have no upper bound.'],
		['a tier without a multiplier', { tierUpTo: ['50', ''], tierMultiplier: ['', '1.2'] }, 'tierMultiplier.0', 'Enter the multiplier for this tier, such as 1.75.'],
		['an unknown currency', { currency: 'ZZZ' }, 'currency', 'Unknown currency "ZZZ": use a three-letter ISO 4217 code such as USD, EUR or JPY.'],
		['a labour rate that is not a number', { labourRate: 'lots' }, 'labourRate', 'Enter a labour rate per hour as plain digits with an optional decimal point, such as "12.50".'],
		['a condition factor above 1', { conditionGood: '1.5' }, 'conditionGood', 'Enter a condition factor between 0 and 1 at least 0 and at most 1.'],
		['zero days of validity', { quoteValidityDays: '0' }, 'quoteValidityDays', 'An estimate stays valid for at least 1 day.'],
		['a negative fee', { feeDiagnostic: '-5' }, 'feeDiagnostic', 'Enter the diagnostic fee at least 0 and at most 1000000000.'],
		['a close-call band over 50%', { closeCallPercent: '60' }, 'closeCallPercent', 'Enter a close-call band in percent at least 0 and at most 50.'],
		['a bad e-mail', { email: 'front desk' }, 'email', 'Enter a valid e-mail address, like desk@example.com, or leave it empty.'],
		['no shop name', { name: '  ' }, 'name', 'Enter the shop name.']
	];
	it.each(cases)('%s', async (_what, changes, field, message) => {
		const before = await stored(shop.id);
		const reply = await save(clients.owner, withFields(await currentForm(shop.id), { ...changes, phone: '555-0199' }));
		expect(reply.status).toBe(400);
		expect(textOf(reply)).toContain('Nothing was saved.');
		if (field.startsWith('tier')) expect(textOf(reply)).toContain(message);
		else expect(fieldError(reply, field)).toBe(message);
		// What was typed is still in the form.
		expect(reply.text).toContain('value="555-0199"');
		for (const [key, value] of Object.entries(changes)) {
			if (key === 'currency') continue; // a list to choose from, not typed
			for (const v of [value].flat()) if (v.trim()) expect(textOf(reply)).toContain(`value="${v}"`);
		}
		expect(await stored(shop.id)).toEqual(before);
	});
});

describe('stored settings are read defensively', () => {
	it('a stored value that no longer validates falls back to its default; the rest is kept', async () => {
		const own = await createShop('Old settings');
		await Shop.update(
			{ currency: 'CAD', settings: { pricing: { labourRate: 'abc', taxRate: '0.05', retiredKey: 1 }, quoteValidityDays: -3, fees: { diagnostic: '70' } } },
			{ where: { id: own.id } }
		);
		const s = await settings.get(own.id);
		expect(s.pricing.labourRate.toString()).toBe('95');
		expect(s.pricing.taxRate.toString()).toBe('0.05');
		expect(s.currency).toBe('CAD');
		expect(s.quoteValidityDays).toBe(30);
		expect(s.fees.diagnostic.toString()).toBe('70');
		expect(s.fees.pickup.toFixed(2)).toBe('45.00');
		expect(pricingSettingsOverridesSchema.safeParse(await settings.pricingOverrides(own.id)).success).toBe(true);
	});
});
