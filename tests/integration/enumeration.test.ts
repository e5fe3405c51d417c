// Enumeration sweep: every route with an id in its address, asked by a user of shop A for shop
// B's ids, for random ids and for malformed ones, answers 404 or 403 (a form action may answer a
// 400 message), never the other shop's data, and changes nothing of either shop. The list of
// routes comes from src/routes: a new route with an id fails this file until it has a case.
import { randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../src/lib/server/db/index';
import { Invite, SpecItem } from '../../src/lib/server/db/models';
import * as outbox from '../../src/lib/server/mail/outbox';
import { Client, signedIn } from '../helpers/client';
import { listMessages } from '../helpers/mailbox';
import { actionsOf, methodsOf, routeTree } from '../helpers/routes';
import { sampleDraft } from '../helpers/quotes';
import { buildWorld, tinyJpeg, type World } from '../helpers/world';

type Params = Record<string, string>;
type Fields = Record<string, string>;

interface IdRoute {
	/** Who asks: staff of shop A, or a visitor with no session (the token routes). */
	who: 'owner' | 'anonymous';
	/** Addresses naming shop B's rows (or A's rows under B's, or rows of the wrong kind). */
	foreign: (a: World, b: World) => Params[];
	/** Addresses naming nothing: random and malformed values. */
	random: () => Params[];
	/** A valid body per form action, so only the id can be the reason for a refusal. */
	actions?: (a: World, b: World) => Record<string, Fields>;
	/** Methods of a +server.ts beside GET, with their bodies. */
	other?: Partial<Record<'POST' | 'DELETE', () => Promise<{ body?: BodyInit; headers?: Record<string, string> }>>>;
	/** A token route may show a "not valid" page (200) as long as it holds no data. */
	okWithoutData?: boolean;
}

const uuid = () => randomUUID();
const malformed = ['not-an-id', "1' OR '1'='1", '..%2F..%2Fetc%2Fpasswd', '00000000-0000-0000-0000-000000000000', 'x'.repeat(300)];
const randomIds = (): Params[] => [uuid(), uuid(), ...malformed].map((id) => ({ id }));
const randomTokens = (): Params[] => ['A'.repeat(43), randomUUID().replace(/-/g, '') + 'abcdefghijk', 'short', ...malformed].map((token) => ({ token }));

const unitFields: Fields = {
	kind: 'portable', maker: 'Ostrander', model: 'OX-3', serial: 'OX-1', runningWatts: '3000', startingWatts: '3600', voltage: '120', fuel: 'gasoline',
	engineHours: '12.0', yearBought: '2022', pricePaid: '500.00', condition: 'fair', notes: 'changed by a stranger'
};
const customerFields: Fields = { name: 'Changed By Stranger', phone: '555-0000', email: '', address: '', notes: '' };
const partFields: Fields = { number: 'P-STRANGER', description: 'Changed by a stranger', cost: '1.00', supplier: '', stock: '1' };

export const ID_ROUTES: Record<string, IdRoute> = {
	'/customers/[id]': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.customerId }],
		random: randomIds,
		actions: () => ({ update: customerFields, addUnit: unitFields })
	},
	'/units/[id]': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.unitId }],
		random: randomIds,
		actions: (a) => ({ update: unitFields, checkIn: { complaint: 'Stranger', diagnosticFee: '1.00', promisedOn: '', technicianId: a.shop.staff.technician.id } })
	},
	'/jobs/[id]': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.jobId }, { id: b.approvedJobId }],
		random: randomIds,
		actions: (a, b) => ({
			move: { to: 'diagnosing' },
			assign: { id: a.shop.staff.technician.id },
			sheet: { id: a.specId },
			reading: { specItemId: '', label: 'Stranger', unit: 'V', value: '120', note: '' },
			removeReading: { readingId: b.readingId },
			findings: { failedComponent: 'Stranger', findings: 'Stranger', lockVersion: '0' }
		})
	},
	'/jobs/[id]/actuals': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.approvedJobId }],
		random: randomIds,
		actions: (_a, b) => ({
			hours: { technicianId: '', hours: '1.00', workedOn: '', note: 'Stranger' },
			removeHours: { entryId: b.labourEntryId },
			part: { description: 'Stranger', quantity: '1', unitCost: '1.00' },
			removePart: { entryId: b.labourEntryId }
		})
	},
	'/jobs/[id]/payments': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.approvedJobId }],
		random: randomIds,
		actions: (_a, b) => ({
			recordPayment: { kind: 'balance', method: 'cash', amount: '1.00', reference: '' },
			sendBalanceLink: {},
			refund: { paymentId: b.paymentId, amount: '1.00', reason: 'Stranger' }
		})
	},
	'/jobs/[id]/photos': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.jobId }],
		random: randomIds,
		other: {
			POST: async () => {
				const form = new FormData();
				form.append('photo', new Blob([new Uint8Array(await tinyJpeg())], { type: 'image/jpeg' }), 'stranger.jpg');
				return { body: form };
			}
		}
	},
	'/jobs/[id]/photos/[photoId]': {
		who: 'owner',
		foreign: (a, b) => [{ id: b.jobId, photoId: b.photoId }, { id: a.jobId, photoId: b.photoId }, { id: b.jobId, photoId: a.photoId }, { id: a.quotedJobId, photoId: a.photoId }],
		random: () => [{ id: uuid(), photoId: uuid() }, ...malformed.map((m) => ({ id: m, photoId: m }))],
		other: {
			POST: async () => ({ body: JSON.stringify({ caption: 'Stranger', showCustomer: false }), headers: { 'content-type': 'application/json' } }),
			DELETE: async () => ({})
		}
	},
	'/jobs/[id]/photos/[photoId]/thumb': {
		who: 'owner',
		foreign: (a, b) => [{ id: b.jobId, photoId: b.photoId }, { id: a.jobId, photoId: b.photoId }],
		random: () => [{ id: uuid(), photoId: uuid() }, ...malformed.map((m) => ({ id: m, photoId: m }))]
	},
	'/jobs/[id]/quote': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.jobId }, { id: b.quotedJobId }],
		random: randomIds,
		actions: () => ({ save: { draft: JSON.stringify(sampleDraft()), lockVersion: '0' }, send: {}, revoke: {} })
	},
	'/jobs/[id]/quote/parts': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.jobId }],
		random: randomIds
	},
	'/jobs/[id]/quote/v/[number]/quote.pdf': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.quotedJobId, number: '1' }, { id: b.approvedJobId, number: '1' }],
		random: () => [{ id: uuid(), number: '1' }, ...malformed.map((m) => ({ id: m, number: m })), { id: uuid(), number: '99999999999999999999' }]
	},
	'/jobs/[id]/ticket': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.jobId }],
		random: randomIds
	},
	'/specs/[id]': {
		who: 'owner',
		foreign: (_a, b) => [{ id: b.specId }],
		random: randomIds,
		actions: () => ({
			save: { name: 'Stranger', appliesTo: '', notes: '', label: 'Stator', unit: 'Ω', min: '1', max: '2', openAbove: '', shortBelow: '', running: 'off', source: '' },
			delete: {}
		})
	},
	'/catalog/[list]/[id]': {
		who: 'owner',
		foreign: (a, b) => [
			{ list: 'parts', id: b.partId },
			{ list: 'labour', id: b.labourId },
			{ list: 'replacements', id: b.replacementId },
			{ list: 'labour', id: a.partId },
			{ list: 'parts', id: a.replacementId }
		],
		random: () => [{ list: 'parts', id: uuid() }, { list: 'nothing', id: uuid() }, ...malformed.map((m) => ({ list: 'parts', id: m })), { list: '__proto__', id: uuid() }],
		actions: () => ({ save: partFields, delete: { confirm: 'yes' } })
	},
	'/q/[token]': {
		who: 'anonymous',
		foreign: () => [],
		random: randomTokens,
		actions: () => ({ approve: { optionIndex: '0', signerName: 'A Stranger', consent: 'yes' }, decline: { reason: 'Stranger' }, pay: {} })
	},
	'/q/[token]/photos/[photoId]': {
		who: 'anonymous',
		// A's link names A's quoted job; A's photo is on another job, B's photo in another shop.
		foreign: (a, b) => [{ token: a.token, photoId: b.photoId }, { token: a.token, photoId: a.photoId }, { token: a.approvedToken, photoId: b.photoId }],
		random: () => [{ token: 'A'.repeat(43), photoId: uuid() }, ...malformed.map((m) => ({ token: m, photoId: m }))]
	},
	'/q/[token]/quote.pdf': {
		who: 'anonymous',
		foreign: () => [],
		random: randomTokens
	},
	'/invite/[token]': {
		who: 'anonymous',
		foreign: () => [],
		random: randomTokens,
		actions: () => ({ default: { name: 'A Stranger', password: 'a-long-enough-password' } }),
		okWithoutData: true
	},
	'/api/reports/[name]': {
		who: 'owner',
		foreign: () => [],
		random: () => ['nothing', '__proto__', 'constructor', '..', ...malformed].map((name) => ({ name }))
	},
	'/reports/[name].csv': {
		who: 'owner',
		foreign: () => [],
		random: () => ['nothing', '__proto__', 'toString', ...malformed].map((name) => ({ name }))
	},
	'/dev/mailbox/[id]/attachments/[n]': {
		who: 'owner',
		foreign: (_a, b) => [{ id: mailOf(b), n: '0' }],
		random: () => [{ id: uuid(), n: '0' }, ...malformed.map((m) => ({ id: m, n: m })), { id: uuid(), n: '99999' }]
	}
};

// ------------------------------------------------------------------------------------------------

const fill = (id: string, params: Params) => id.replace(/\[(\w+)\]/g, (_, name: string) => encodeURIComponent(params[name] ?? 'missing'));

let a: World;
let b: World;
let ownerA: Client;
const anonymous = new Client();
const bMail = new Map<string, string>();
const mailOf = (w: World) => bMail.get(w.shop.id) ?? 'none';

/** A digest of every row a shop owns, to show nothing of it changed. */
async function digest(shopId: string): Promise<string> {
	const tables = await db().query<{ table_name: string }>(
		"SELECT table_name FROM information_schema.columns WHERE table_schema = 'public' AND column_name = 'shop_id' ORDER BY table_name",
		{ type: QueryTypes.SELECT }
	);
	const parts: string[] = [];
	// The outbox is left out: the mail worker moves its delivery state on by itself.
	for (const { table_name } of [{ table_name: 'shops' }, ...tables.filter((t) => t.table_name !== 'outbox_messages')]) {
		const column = table_name === 'shops' ? 'id' : 'shop_id';
		const [row] = await db().query<{ rows: number; sum: string | null }>(
			`SELECT count(*) AS rows, md5(string_agg(to_jsonb(t)::text, ',' ORDER BY to_jsonb(t)::text)) AS sum FROM "${table_name}" t WHERE t."${column}" = :shopId`,
			{ replacements: { shopId }, type: QueryTypes.SELECT }
		);
		parts.push(`${table_name}:${row.rows}:${row.sum}`);
	}
	return parts.join('\n');
}

let before: { a: string; b: string };

beforeAll(async () => {
	[a, b] = await Promise.all([buildWorld('Enumerate A'), buildWorld('Enumerate B')]);
	// A message of shop B in the development mailbox.
	const to = `mailbox.${b.marker.toLowerCase()}@shop.example`;
	await outbox.enqueue({ to, subject: `Estimate ${b.marker}`, text: b.marker, html: `<p>${b.marker}</p>`, attachments: [{ filename: 'estimate.txt', contentType: 'text/plain', content: Buffer.from(b.marker) }] }, { shopId: b.shop.id, kind: 'quote_sent' });
	const until = Date.now() + 30_000;
	while (!bMail.has(b.shop.id) && Date.now() < until) {
		const [message] = await listMessages({ to });
		if (message) bMail.set(b.shop.id, message.id);
		else await new Promise((r) => setTimeout(r, 250));
	}
	ownerA = await signedIn(a.shop.staff.owner.email, a.shop.staff.owner.password);
	before = { a: await digest(a.shop.id), b: await digest(b.shop.id) };
}, 120_000);

afterAll(async () => {
	// Nothing any of these requests did changed either shop.
	expect(await digest(b.shop.id)).toBe(before.b);
	expect(await digest(a.shop.id)).toBe(before.a);
});

function expectNothingOf(reply: { status: number; text: string }, what: string, allowed: number[], world: World) {
	expect(allowed, `${what} answered ${reply.status}: ${reply.text.slice(0, 200)}`).toContain(reply.status);
	expect(reply.text, `${what} leaked data`).not.toContain(world.marker);
}

describe('the route tree', () => {
	const dynamic = routeTree().filter((r) => r.id.includes('['));

	it('has a case for every route with an id in its address', () => {
		expect(dynamic.length).toBeGreaterThan(15);
		const missing = dynamic.map((r) => r.id).filter((id) => !(id in ID_ROUTES));
		expect(missing, 'add these routes to ID_ROUTES').toEqual([]);
		const stale = Object.keys(ID_ROUTES).filter((id) => !dynamic.some((r) => r.id === id));
		expect(stale, 'these cases name no route').toEqual([]);
	});

	it('has a body for every form action and every extra method of those routes', () => {
		for (const route of dynamic) {
			const c = ID_ROUTES[route.id];
			if (!c) continue;
			const bodies = c.actions?.(a, b) ?? {};
			expect(Object.keys(bodies).sort(), `${route.id} actions`).toEqual(actionsOf(route.dir).sort());
			const extra = methodsOf(route.dir).filter((m) => m !== 'GET');
			expect(Object.keys(c.other ?? {}).sort(), `${route.id} methods`).toEqual(extra.sort());
		}
	});
});

describe('ids of another shop, random ids and malformed ids', () => {
	for (const [id, c] of Object.entries(ID_ROUTES)) {
		const dir = () => routeTree().find((r) => r.id === id)!.dir;

		it(`${id}: GET is 404 or 403 and shows nothing`, async () => {
			const client = c.who === 'owner' ? ownerA : anonymous;
			for (const [kind, sets] of [['foreign', c.foreign(a, b)], ['random', c.random()]] as const) {
				for (const params of sets) {
					const url = fill(id, params);
					const reply = await client.get(url, { accept: 'text/html' });
					const allowed = c.okWithoutData ? [200, 404] : [403, 404];
					expectNothingOf(reply, `${kind} GET ${url}`, allowed, b);
					if (kind === 'foreign' && c.who === 'anonymous') expect(reply.text).not.toContain(a.marker);
				}
			}
		});

		if (c.actions || c.other) {
			it(`${id}: every action and method refuses without changing anything`, async () => {
				const client = c.who === 'owner' ? ownerA : anonymous;
				const bodies = c.actions?.(a, b) ?? {};
				for (const [kind, sets] of [['foreign', c.foreign(a, b)], ['random', c.random()]] as const) {
					for (const params of sets) {
						const url = fill(id, params);
						for (const [action, fields] of Object.entries(bodies)) {
							const target = action === 'default' ? url : `${url}?/${action}`;
							const reply = await client.form(target, fields);
							expectNothingOf(reply, `${kind} POST ${target}`, [400, 403, 404], b);
						}
						for (const [method, make] of Object.entries(c.other ?? {})) {
							const { body, headers } = await make!();
							const reply = await client.request(method, url, { body, headers: { origin: client.base, ...headers } });
							expectNothingOf(reply, `${kind} ${method} ${url}`, [403, 404], b);
						}
					}
				}
				expect(dir()).toBeTruthy();
			}, 60_000);
		}
	}
});

describe("form fields naming another shop's rows", () => {
	it('are refused with a message on the user’s own routes', async () => {
		const item = await SpecItem.findOne({ where: { shopId: b.shop.id } });
		const invite = await Invite.findOne({ where: { shopId: b.shop.id } });
		const cases: [string, Fields][] = [
			[`/jobs/${a.jobId}?/assign`, { id: b.shop.staff.technician.id }],
			[`/jobs/${a.jobId}?/sheet`, { id: b.specId }],
			[`/jobs/${a.jobId}?/reading`, { specItemId: item!.id, label: '', unit: '', value: '1.0', note: '' }],
			[`/jobs/${a.jobId}?/removeReading`, { readingId: b.readingId }],
			[`/jobs/${a.approvedJobId}/actuals?/hours`, { technicianId: b.shop.staff.technician.id, hours: '1.00', workedOn: '', note: '' }],
			[`/jobs/${a.approvedJobId}/actuals?/removeHours`, { entryId: b.labourEntryId }],
			[`/jobs/${a.approvedJobId}/payments?/refund`, { paymentId: b.paymentId, amount: '1.00', reason: 'Stranger' }],
			[`/units/${a.unitId}?/checkIn`, { complaint: 'Stranger', diagnosticFee: '1.00', promisedOn: '', technicianId: b.shop.staff.technician.id }],
			['/team?/revoke', { id: invite!.id }],
			['/team?/remove', { id: b.shop.staff.writer.id }],
			['/payments?/resolve', { eventId: uuid() }]
		];
		for (const [target, fields] of cases) {
			const reply = await ownerA.form(target, fields);
			expectNothingOf(reply, `POST ${target}`, [400, 404], b);
		}
	});
});
