// The quote builder on a job: the live verdict is the engine's, saves are locked against each
// other, sent versions never change, costs stay with the roles allowed to see them, and every
// route answers only for the caller's own shop.
import { createHash } from 'node:crypto';
import * as devalue from 'devalue';
import { beforeAll, describe, expect, it } from 'vitest';
import { carriesCosts } from '../../src/lib/components/quote/costs';
import { evaluateRequest } from '../../src/lib/pricing/evaluate';
import { AuditEvent, Job, Part, Quote, QuoteLink, QuoteVersion, Shop } from '../../src/lib/server/db/models';
import { db } from '../../src/lib/server/db';
import * as quotes from '../../src/lib/server/quotes';
import * as settings from '../../src/lib/server/settings';
import { Client, signedIn } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';
import { createJob } from '../helpers/shopdata';

type Role = 'owner' | 'manager' | 'writer' | 'technician';

let shop: ShopFixture;
let other: ShopFixture;
const as = {} as Record<Role, Client>;
let outsider: Client;

beforeAll(async () => {
	[shop, other] = await Promise.all([createShop('Quote builder'), createShop('Quote builder other')]);
	for (const role of ['owner', 'manager', 'writer', 'technician'] as const) as[role] = await signedIn(shop.staff[role].email, shop.staff[role].password);
	outsider = await signedIn(other.staff.owner.email, other.staff.owner.password);
});

/** A form action called as the page calls it (fetch with x-sveltekit-action); data decoded with devalue. */
async function action(client: Client, path: string, fields: Record<string, string> = {}) {
	const reply = await client.request('POST', path, {
		body: new URLSearchParams(fields).toString(),
		headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'application/json', 'x-sveltekit-action': 'true', origin: client.base }
	});
	const body = reply.status === 200 || reply.headers.get('content-type')?.includes('json') ? reply.json() : {};
	return {
		status: reply.status,
		type: body.type as 'success' | 'failure' | 'redirect' | 'error' | undefined,
		actionStatus: body.status as number | undefined,
		data: (typeof body.data === 'string' ? devalue.parse(body.data) : body.data) as Record<string, any>,
		error: body.error as { message: string } | undefined
	};
}

/** The page's load data, as the browser receives it (__data.json, devalue-encoded). */
async function pageData(client: Client, jobId: string) {
	const reply = await client.get(`/jobs/${jobId}/quote/__data.json`);
	expect(reply.status).toBe(200);
	const nodes = reply.json().nodes as { type: string; data: unknown[] }[];
	const node = nodes[nodes.length - 1];
	return { raw: reply.text, data: devalue.unflatten(node.data) as Record<string, any> };
}

/** The alternator-head example of docs/api.md, as a draft (the request without currency and fee). */
function alternatorDraft(partCost = '148.00') {
	return {
		unit: { description: 'Harrowgate PG-5500 portable generator', ageYears: '4', engineHours: '380', lifeYears: '10', lifeHours: '1500', condition: 'good', asIsValue: '60.00' },
		options: [
			{
				id: 'repair-head',
				label: 'Rebuild the alternator head',
				kind: 'repair',
				creditDiagnosticFee: true,
				lines: [
					{ kind: 'part', id: 'stator', description: 'Stator, 5.5 kW', quantity: '1', unitCost: partCost, specialOrder: true },
					{ kind: 'part', id: 'brushes', description: 'Brush set', quantity: '1', unitCost: '16.40' },
					{ kind: 'part', id: 'avr', description: 'Voltage regulator', quantity: '1', unitCost: '38.00' },
					{ kind: 'labour', id: 'fit', description: 'Strip the alternator head, fit stator, brushes and regulator, test under load', hours: '2.8' }
				]
			},
			{
				id: 'replace',
				label: 'New Harrowgate PG-5500',
				kind: 'replacement',
				lines: [
					{ kind: 'unit', id: 'new-unit', description: 'Harrowgate PG-5500, new', cost: '715.00', price: '949.00' },
					{ kind: 'fee', id: 'disposal', description: 'Disposal of the old unit', amount: '20.00', feeType: 'disposal' },
					{ kind: 'fee', id: 'setup', description: 'Set-up and first start', amount: '30.00', feeType: 'setup' }
				]
			},
			{ id: 'decline', label: 'Return unrepaired', kind: 'decline', lines: [{ kind: 'fee', id: 'diag', description: 'Diagnosis', amount: '89.00', feeType: 'diagnostic' }] }
		]
	};
}

async function setShopSettings(shopId: string, extra: Record<string, unknown>) {
	const row = (await Shop.findByPk(shopId))!;
	row.set({ settings: { ...(row.settings as object), ...extra } });
	row.changed('settings', true);
	await row.save();
}

/** Saves a draft as `client`, at the quote's current lock version. */
async function saveDraft(client: Client, jobId: string, draft: unknown) {
	return action(client, `/jobs/${jobId}/quote?/save`, { draft: JSON.stringify(draft), lockVersion: String(await lockOf(jobId)) });
}

async function lockOf(jobId: string) {
	return (await Quote.findOne({ where: { jobId } }))!.lockVersion;
}

describe('the live verdict is the engine’s', () => {
	it('POST /api/pricing/evaluate and the page data equal evaluateRequest of the same body', async () => {
		// The shop's 7% tax makes this the worked example of docs/api.md.
		await setShopSettings(shop.id, { pricing: { taxRate: '0.07' } });
		const { job } = await createJob(shop);
		await pageData(as.technician, job.id);
		const draft = alternatorDraft();
		const saved = await saveDraft(as.technician, job.id, draft);
		expect(saved.type).toBe('success');

		const body = { currency: 'USD', diagnosticFee: '89.00', ...draft };
		const direct = evaluateRequest(body, await settings.pricingOverrides(shop.id));
		expect(direct.ok).toBe(true);
		if (!direct.ok) return;
		// Figures of the worked example in docs/api.md: total 584.78, break-even 674.02, verdict repair.
		expect(direct.result.options[0].total).toBe('584.78');
		expect(direct.result.repairs[0].comparison?.breakEvenRepair).toBe('674.02');
		expect(direct.result.recommendation.verdict).toBe('repair');

		const live = await as.technician.postJson('/api/pricing/evaluate', body);
		expect(live.status).toBe(200);
		expect(live.json()).toEqual(JSON.parse(JSON.stringify(direct.result)));

		const { data } = await pageData(as.technician, job.id);
		expect(data.initial.result).toEqual(JSON.parse(JSON.stringify(direct.result)));
		expect(data.quote.draft).toEqual(draft);
		await setShopSettings(shop.id, { pricing: {} });
	});

	it('a bad figure comes back as a 400 with the path of the field', async () => {
		const draft = alternatorDraft();
		(draft.options[0].lines[0] as Record<string, unknown>).unitCost = '12,50';
		const reply = await as.technician.postJson('/api/pricing/evaluate', { currency: 'USD', diagnosticFee: '89.00', ...draft });
		expect(reply.status).toBe(400);
		expect(reply.json().issues.map((i: { path: string }) => i.path)).toContain('options.0.lines.0.unitCost');
	});
});

describe('saving with a lock version', () => {
	it('the second of two saves from the same starting point gets a conflict, and the first save is kept', async () => {
		const { job } = await createJob(shop);
		await pageData(as.writer, job.id);
		const start = await lockOf(job.id);
		const first = alternatorDraft('150.00');
		const second = alternatorDraft('170.00');
		const a = await action(as.technician, `/jobs/${job.id}/quote?/save`, { draft: JSON.stringify(first), lockVersion: String(start) });
		expect(a.type).toBe('success');
		expect(a.data.lockVersion).toBe(start + 1);
		const b = await action(as.writer, `/jobs/${job.id}/quote?/save`, { draft: JSON.stringify(second), lockVersion: String(start) });
		expect(b.type).toBe('failure');
		expect(b.actionStatus).toBe(409);
		expect(b.data.conflict).toBe(true);
		expect(b.data.message).toContain('Someone else saved this estimate');
		const stored = (await Quote.findOne({ where: { jobId: job.id } }))!;
		expect(stored.lockVersion).toBe(start + 1);
		expect((stored.draft as any).options[0].lines[0].unitCost).toBe('150.00');
	});

	it('a draft whose JSON spells half a UTF-16 pair is saved with U+FFFD in its place', async () => {
		const { job } = await createJob(shop);
		await pageData(as.writer, job.id);
		const start = await lockOf(job.id);
		const draft = alternatorDraft();
		draft.options[0].label = 'Rebuild \ud800';
		const json = JSON.stringify(draft);
		expect(json).toContain('\\ud800'); // JSON.stringify escapes a lone half (ES2019 well-formed JSON.stringify)
		const reply = await action(as.writer, `/jobs/${job.id}/quote?/save`, { draft: json, lockVersion: String(start) });
		expect(reply.type).toBe('success');
		const stored = (await Quote.findOne({ where: { jobId: job.id } }))!;
		expect((stored.draft as any).options[0].label).toBe('Rebuild \ufffd');
	});

	it('a draft the engine refuses is not saved; the issues name the fields', async () => {
		const { job } = await createJob(shop);
		await pageData(as.writer, job.id);
		const start = await lockOf(job.id);
		const draft = alternatorDraft();
		(draft.options[0].lines[1] as Record<string, unknown>).quantity = '-1';
		const reply = await action(as.writer, `/jobs/${job.id}/quote?/save`, { draft: JSON.stringify(draft), lockVersion: String(start) });
		expect(reply.actionStatus).toBe(400);
		expect(reply.data.message).toMatch(/^Nothing was saved\./);
		expect(reply.data.issues.map((i: { path: string }) => i.path)).toContain('options.0.lines.1.quantity');
		const notJson = await action(as.writer, `/jobs/${job.id}/quote?/save`, { draft: '{"unit":', lockVersion: String(start) });
		expect(notJson.actionStatus).toBe(400);
		const withNul = alternatorDraft();
		withNul.options[0].label = 'Rebuild\u0000';
		const nul = await action(as.writer, `/jobs/${job.id}/quote?/save`, { draft: JSON.stringify(withNul), lockVersion: String(start) });
		expect(nul.actionStatus).toBe(400);
		expect(nul.data.message).toContain('NUL');
		expect(await lockOf(job.id)).toBe(start);
	});
});

describe('versions', () => {
	it('sending freezes a version; the database refuses to change it; a later edit sends version 2 with another hash', async () => {
		const { job } = await createJob(shop);
		await pageData(as.technician, job.id);
		const draft = alternatorDraft();
		await saveDraft(as.technician, job.id, draft);

		const sent = await action(as.technician, `/jobs/${job.id}/quote?/send`);
		expect(sent.type).toBe('success');
		expect(sent.data.version).toBe(1);
		const token = String(sent.data.link).split('/q/')[1];
		expect(sent.data.link).toBe(`${as.technician.base}/q/${token}`);
		const link = await QuoteLink.findOne({ where: { tokenHash: createHash('sha256').update(token).digest('hex') } });
		expect(link).not.toBeNull();
		expect((await Job.findByPk(job.id))!.status).toBe('quoted');

		const v1 = (await QuoteVersion.findOne({ where: { quoteId: link!.quoteId, number: 1 } }))!;
		const frozen = { hash: v1.contentHash, content: JSON.stringify(v1.content) };
		await expect(QuoteVersion.update({ contentHash: '0'.repeat(64) }, { where: { id: v1.id } })).rejects.toThrow(/cannot be changed/);
		v1.set({ content: { ...v1.content, currency: 'EUR' } });
		await expect(v1.save()).rejects.toThrow(/cannot be changed/);

		// Sending again without an edit gives the same version a new link.
		const again = await action(as.writer, `/jobs/${job.id}/quote?/send`);
		expect(again.data.version).toBe(1);

		(draft.options[0].lines[1] as Record<string, unknown>).quantity = '2';
		const edited = await saveDraft(as.technician, job.id, draft);
		expect(edited.type).toBe('success');
		const second = await action(as.technician, `/jobs/${job.id}/quote?/send`);
		expect(second.data.version).toBe(2);
		const v2 = (await QuoteVersion.findOne({ where: { quoteId: link!.quoteId, number: 2 } }))!;
		expect(v2.contentHash).not.toBe(frozen.hash);
		const v1After = (await QuoteVersion.findByPk(v1.id))!;
		expect(v1After.contentHash).toBe(frozen.hash);
		expect(JSON.stringify(v1After.content)).toBe(frozen.content);

		const { data } = await pageData(as.writer, job.id);
		expect(data.versions.map((v: { number: number }) => v.number)).toEqual([2, 1]);
		expect(data.openLinks).toBe(3);
	});

	it('sending again leaves the job where it is: no step back to diagnosing, the opened time untouched', async () => {
		const { job } = await createJob(shop);
		await db().query(`UPDATE jobs SET created_at = '2026-11-30T12:12:00Z' WHERE id = :id`, { replacements: { id: job.id } });
		await pageData(as.writer, job.id);
		await saveDraft(as.writer, job.id, alternatorDraft());
		expect((await action(as.writer, `/jobs/${job.id}/quote?/send`)).type).toBe('success');
		const moves = async () =>
			(await AuditEvent.findAll({ where: { shopId: shop.id, entityId: job.id, action: 'job.status' }, order: [['createdAt', 'ASC'], ['id', 'ASC']] })).map(
				(e) => `${(e.detail as { from: string }).from}>${(e.detail as { to: string }).to}`
			);
		expect(await moves()).toEqual(['null>checked_in', 'checked_in>diagnosing', 'diagnosing>quoted']);
		expect((await action(as.writer, `/jobs/${job.id}/quote?/send`)).type).toBe('success');
		expect(await moves()).toEqual(['null>checked_in', 'checked_in>diagnosing', 'diagnosing>quoted']);
		const after = (await Job.findByPk(job.id))!;
		expect(after.status).toBe('quoted');
		expect(after.createdAt.toISOString()).toBe('2026-11-30T12:12:00.000Z');
	});

	it('once the customer has answered, the estimate is kept as answered: a save is refused and changes nothing', async () => {
		const { job } = await createJob(shop);
		await pageData(as.writer, job.id);
		const draft = alternatorDraft();
		await saveDraft(as.writer, job.id, draft);
		const sent = await action(as.writer, `/jobs/${job.id}/quote?/send`);
		const token = String(sent.data.link).split('/q/')[1];
		await quotes.decide(token, { decision: 'declined', optionIndex: null, signerName: null, reason: 'Buying new', clientAddress: '203.0.113.9', userAgent: 'test' });
		const before = (await Quote.findOne({ where: { shopId: shop.id, jobId: job.id } }))!;

		(draft.options[0].lines[1] as Record<string, unknown>).quantity = '3';
		const refused = await action(as.writer, `/jobs/${job.id}/quote?/save`, { draft: JSON.stringify(draft), lockVersion: String(before.lockVersion) });
		expect(refused.type).toBe('failure');
		expect(String(refused.data.message)).toContain('the customer has declined this estimate');
		const after = (await Quote.findOne({ where: { shopId: shop.id, jobId: job.id } }))!;
		expect(after.lockVersion).toBe(before.lockVersion);
		expect(JSON.stringify(after.draft)).toBe(JSON.stringify(before.draft));
	});

	it('an option with nothing in it is not sent: the message names it and no version is made', async () => {
		const { job } = await createJob(shop);
		await pageData(as.writer, job.id);
		const draft = alternatorDraft();
		draft.options[0].lines = [];
		const saved = await saveDraft(as.writer, job.id, draft);
		expect(saved.type).toBe('success');
		const refused = await action(as.writer, `/jobs/${job.id}/quote?/send`);
		expect(refused.type).toBe('failure');
		expect(refused.data.message).toContain(`"${draft.options[0].label}" has nothing in it yet`);
		const quote = (await Quote.findOne({ where: { jobId: job.id } }))!;
		expect(await QuoteVersion.count({ where: { quoteId: quote.id } })).toBe(0);
		expect((await Job.findByPk(job.id))!.status).toBe('checked_in');
	});

	it('the desk withdraws the customer links; a technician may not', async () => {
		const { job } = await createJob(shop);
		await pageData(as.writer, job.id);
		await saveDraft(as.writer, job.id, alternatorDraft());
		await action(as.writer, `/jobs/${job.id}/quote?/send`);
		const refused = await action(as.technician, `/jobs/${job.id}/quote?/revoke`);
		expect(refused.status).toBe(403);
		const quote = (await Quote.findOne({ where: { jobId: job.id } }))!;
		expect(await QuoteLink.count({ where: { quoteId: quote.id, revokedAt: null } })).toBe(1);
		const done = await action(as.writer, `/jobs/${job.id}/quote?/revoke`);
		expect(done.type).toBe('success');
		expect(done.data.revoked).toBe(1);
		expect(await QuoteLink.count({ where: { quoteId: quote.id, revokedAt: null } })).toBe(0);
	});
});

describe('costs and margins by role', () => {
	it('when technicians may not see costs, neither the route nor the page gives them any; a save keeps the stored costs', async () => {
		await setShopSettings(shop.id, { techniciansSeeCosts: false });
		try {
			const { job } = await createJob(shop);
			const part = await Part.create({ shopId: shop.id, number: 'HG-AH55', description: 'Alternator head assembly, 5.5 kW', cost: '312.47', specialOrder: true });
			// A cost no other figure on the page shares, so finding it means it leaked.
			const draft = alternatorDraft('148.37');
			await pageData(as.manager, job.id);
			await saveDraft(as.manager, job.id, draft);

			const body = { currency: 'USD', diagnosticFee: '89.00', ...draft };
			const techReply = (await as.technician.postJson('/api/pricing/evaluate', body)).json();
			const managerReply = (await as.manager.postJson('/api/pricing/evaluate', body)).json();
			expect(carriesCosts(techReply)).toBe(false);
			expect(carriesCosts(managerReply)).toBe(true);
			expect(managerReply.options[0].cost).toBe('202.77');
			// Same prices and verdict for both.
			expect(techReply.options.map((o: { total: string }) => o.total)).toEqual(managerReply.options.map((o: { total: string }) => o.total));
			expect(techReply.recommendation).toEqual(managerReply.recommendation);

			const tech = await pageData(as.technician, job.id);
			expect(tech.data.seesCosts).toBe(false);
			expect(tech.raw).not.toContain('148.37');
			expect(tech.raw).not.toContain('312.47');
			expect(carriesCosts(tech.data.initial.result)).toBe(false);
			// The part is priced by its sell price each: 148.37 × 1.75 (default tier up to 200) = 259.6475 → 259.65.
			expect(tech.data.quote.draft.options[0].lines[0]).toMatchObject({ unitCost: '0', unitPrice: '259.65' });
			const manager = await pageData(as.manager, job.id);
			expect(manager.raw).toContain('148.37');
			expect(manager.data.initial.result.options[0].marginPercent).toBeTypeOf('string');

			// The technician's masked copy priced live gives the same totals as the stored draft.
			const masked = (await as.technician.postJson('/api/pricing/evaluate', { currency: 'USD', diagnosticFee: '89.00', ...tech.data.quote.draft })).json();
			expect(masked.options.map((o: { total: string }) => o.total)).toEqual(managerReply.options.map((o: { total: string }) => o.total));

			// The technician changes a quantity and adds the catalog part; the saved draft carries the real costs.
			const edited = structuredClone(tech.data.quote.draft);
			edited.options[0].lines[0].quantity = '2';
			edited.options[0].lines.push({ kind: 'part', id: `part:${part.id}:x1`, description: 'Alternator head assembly, 5.5 kW', quantity: '1', unitCost: '0', unitPrice: tech.data.catalog.parts[0].price, specialOrder: true });
			expect(tech.data.catalog.parts[0].cost).toBeUndefined();
			const saved = await action(as.technician, `/jobs/${job.id}/quote?/save`, { draft: JSON.stringify(edited), lockVersion: String(tech.data.quote.lockVersion) });
			expect(saved.type).toBe('success');
			const stored = (await Quote.findOne({ where: { jobId: job.id } }))!.draft as any;
			expect(stored.options[0].lines[0]).toMatchObject({ quantity: '2', unitCost: '148.37' });
			expect(stored.options[0].lines[0].unitPrice).toBeUndefined();
			expect(stored.options[0].lines[4]).toMatchObject({ unitCost: '312.47' });
			expect(stored.options[0].lines[4].unitPrice).toBeUndefined();
			expect(stored.options[1].lines[0]).toMatchObject({ cost: '715.00', price: '949.00' });
		} finally {
			await setShopSettings(shop.id, { techniciansSeeCosts: true });
		}
	});

	it('with the default setting technicians see costs', async () => {
		const { job } = await createJob(shop);
		const { data } = await pageData(as.technician, job.id);
		expect(data.seesCosts).toBe(true);
		const reply = (await as.technician.postJson('/api/pricing/evaluate', { currency: 'USD', diagnosticFee: '89.00', ...alternatorDraft() })).json();
		expect(carriesCosts(reply)).toBe(true);
	});
});

describe('the part picker', () => {
	it('a long parts list is searched on the server: own shop only, costs only for those who see them', async () => {
		const big = await createShop('Quote builder big catalog');
		const owner = await signedIn(big.staff.owner.email, big.staff.owner.password);
		const technician = await signedIn(big.staff.technician.email, big.staff.technician.password);
		await Part.bulkCreate(
			Array.from({ length: 305 }, (_, i) => ({ shopId: big.id, number: `BK-${String(i).padStart(4, '0')}`, description: `Spare ${i}`, cost: '20.00' }))
		);
		await Part.create({ shopId: other.id, number: 'BK-0304', description: 'Another shop', cost: '1.00' });
		const { job } = await createJob(big);
		const { data } = await pageData(owner, job.id);
		expect(data.catalog.parts).toHaveLength(300);
		expect(data.catalog.partsTotal).toBe(305);

		const found = await owner.get(`/jobs/${job.id}/quote/parts?q=BK-0304`);
		expect(found.status).toBe(200);
		// 20.00 × 2.00 (default tier up to 50) = 40.00.
		expect(found.json().parts).toEqual([expect.objectContaining({ number: 'BK-0304', description: 'Spare 304', cost: '20.00', price: '40.00' })]);

		await setShopSettings(big.id, { techniciansSeeCosts: false });
		const hidden = (await technician.get(`/jobs/${job.id}/quote/parts?q=BK-0304`)).json().parts;
		expect(hidden[0].price).toBe('40.00');
		expect(hidden[0].cost).toBeUndefined();

		expect((await new Client().get(`/jobs/${job.id}/quote/parts?q=BK`)).status).toBe(401);
		const foreign = await outsider.get(`/jobs/${job.id}/quote/parts?q=BK`);
		expect(foreign.status).toBe(404);
		expect(foreign.text).not.toContain('Spare');
	});
});

describe('who may reach the builder', () => {
	it('anonymous visitors are sent to sign in; JSON answers 401', async () => {
		const { job } = await createJob(shop);
		const anonymous = new Client();
		const page = await anonymous.get(`/jobs/${job.id}/quote`);
		expect(page.status).toBe(303);
		expect(page.location).toBe(`/signin?next=${encodeURIComponent(`/jobs/${job.id}/quote`)}`);
		expect((await anonymous.postJson('/api/pricing/evaluate', { currency: 'USD' })).status).toBe(401);
		const save = await action(anonymous, `/jobs/${job.id}/quote?/save`, { draft: '{}', lockVersion: '0' });
		expect(save.type).toBe('redirect');
		expect(await Quote.count({ where: { jobId: job.id } })).toBe(0);
	});

	it('every staff role opens the builder and saves', async () => {
		const { job } = await createJob(shop);
		for (const role of ['owner', 'manager', 'writer', 'technician'] as const) {
			expect((await as[role].get(`/jobs/${job.id}/quote`)).status).toBe(200);
			const reply = await saveDraft(as[role], job.id, alternatorDraft());
			expect(reply.type).toBe('success');
		}
		const page = await as.owner.get(`/jobs/${job.id}`);
		expect(page.text).toContain(`/jobs/${job.id}/quote`);
		expect(page.text).toContain('Build the estimate');
	});

	it("another shop's job is not found on the page and on every action, and nothing changes", async () => {
		const { job } = await createJob(shop);
		await pageData(as.writer, job.id);
		await saveDraft(as.writer, job.id, alternatorDraft());
		await action(as.writer, `/jobs/${job.id}/quote?/send`);
		const before = await Quote.findOne({ where: { jobId: job.id } });
		expect((await outsider.get(`/jobs/${job.id}/quote`)).status).toBe(404);
		expect((await outsider.get(`/jobs/${job.id}/quote/__data.json`)).text).not.toContain('Rebuild the alternator head');
		for (const name of ['save', 'send', 'revoke']) {
			const reply = await action(outsider, `/jobs/${job.id}/quote?/${name}`, { draft: JSON.stringify(alternatorDraft('1.00')), lockVersion: String(before!.lockVersion) });
			expect(reply.status, name).toBe(404);
		}
		expect((await outsider.get('/jobs/not-a-uuid/quote')).status).toBe(404);
		const after = await Quote.findOne({ where: { jobId: job.id } });
		expect(after!.lockVersion).toBe(before!.lockVersion);
		expect(after!.sentVersions).toBe(1);
		expect(await QuoteLink.count({ where: { quoteId: after!.id, revokedAt: null } })).toBe(1);
	});
});
