// Hostile input, generated: every form action and JSON route gets malformed, oversized, wrongly
// typed and boundary values (fast-check, 100 runs each; FUZZ_RUNS=n for a longer hunt). Whatever arrives, the answer is never a
// 500 and never a stack trace; a refusal is a 4xx with a message. Numbers that would be NaN,
// Infinity or absurd are refused outright. Uploads are covered in photos.test.ts.
//
// To cover a new route, add a line to FORMS or JSON_ROUTES: its address, who calls it, and one
// valid value per field (the generator mutates from there).
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CONDITIONS, FUELS, UNIT_KINDS, VOLTAGES } from '../../src/lib/domain';
import { Quote } from '../../src/lib/server/db/models';
import * as settings from '../../src/lib/server/settings';
import { startApp, type AppInstance } from '../helpers/app';
import { PASSWORD } from '../helpers/fixtures';
import { actionsOf, methodsOf, routeOf, routeTree } from '../helpers/routes';
import { sampleDraft } from '../helpers/quotes';
import { buildWorld, type World } from '../helpers/world';

const RUNS = Number(process.env.FUZZ_RUNS) > 0 ? Math.floor(Number(process.env.FUZZ_RUNS)) : 100;
type Who = 'owner' | 'manager' | 'anonymous';
type Value = string | string[] | Blob;
type Fields = Record<string, Value>;

interface FormCase {
	/** The route and action, as a stable name for the report. */
	name: string;
	path: (w: World) => string;
	who: Who;
	/** One valid value per field; arrays are repeated fields. */
	valid: (w: World) => Fields;
	/** Fields that take a number: absurd numbers there must be refused. */
	numeric?: string[];
	/** Bodies go as multipart (a file field) rather than url-encoded. */
	multipart?: boolean;
}

interface JsonCase {
	name: string;
	method: 'GET' | 'POST';
	path: (w: World) => string;
	who: Who;
	/** POST: a valid body to mutate. GET: valid query fields to mutate. */
	valid: (w: World) => unknown;
	headers?: (w: World) => Record<string, string>;
	/** Query fields that take a number (GET) or JSON leaves that do (POST). */
	numeric?: string[];
	/** Answers with a page or a file, not JSON. */
	page?: boolean;
}

const unit = {
	kind: 'portable', maker: 'Harrowgate', model: 'PG-5500', serial: 'HG-9', runningWatts: '5500', startingWatts: '6875', voltage: '120/240',
	fuel: 'gasoline', engineHours: '210.5', yearBought: '2021', pricePaid: '899.00', condition: 'good', notes: ''
};
const part = { list: 'parts', number: 'P-100', description: 'Brush set', cost: '12.50', supplier: 'Brevik Power', stock: '3' };
const csv = (text: string) => new Blob([text], { type: 'text/csv' });

export const FORMS: FormCase[] = [
	{ name: 'signin', path: () => '/signin', who: 'anonymous', valid: (w) => ({ email: w.shop.staff.technician.email, password: PASSWORD }) },
	{ name: 'signup', path: () => '/signup', who: 'anonymous', valid: () => ({ shopName: 'Larch Lane Repair', name: 'Ada Penhallow', email: 'ada.fuzz@shop.example', password: 'a-long-enough-password' }) },
	{ name: 'signout', path: () => '/signout', who: 'anonymous', valid: () => ({}) },
	{ name: 'invite accept', path: (w) => `/invite/${w.inviteToken}`, who: 'anonymous', valid: () => ({ name: 'Nell Ostrander', password: 'a-long-enough-password' }) },
	{ name: 'account password', path: () => '/account?/password', who: 'manager', valid: () => ({ current: PASSWORD, next: 'another-long-password', confirm: 'another-long-password' }) },
	{ name: 'customers create', path: () => '/customers?/create', who: 'owner', valid: () => ({ name: 'Tamsin Yarrow', phone: '555-0101', email: 'tamsin@example.com', address: '4 Mill Row', notes: '' }) },
	{ name: 'customer update', path: (w) => `/customers/${w.customerId}?/update`, who: 'owner', valid: () => ({ name: 'Tamsin Yarrow', phone: '555-0101', email: '', address: '', notes: 'Calls after five' }) },
	{ name: 'customer addUnit', path: (w) => `/customers/${w.customerId}?/addUnit`, who: 'owner', valid: () => unit, numeric: ['runningWatts', 'startingWatts', 'engineHours', 'yearBought', 'pricePaid'] },
	{ name: 'unit update', path: (w) => `/units/${w.unitId}?/update`, who: 'owner', valid: () => unit, numeric: ['runningWatts', 'startingWatts', 'engineHours', 'yearBought', 'pricePaid'] },
	{ name: 'unit checkIn', path: (w) => `/units/${w.unitId}?/checkIn`, who: 'owner', valid: (w) => ({ complaint: 'Surges under load', diagnosticFee: '89.00', promisedOn: '2030-01-15', technicianId: w.shop.staff.technician.id }), numeric: ['diagnosticFee'] },
	{ name: 'job move', path: (w) => `/jobs/${w.jobId}?/move`, who: 'owner', valid: () => ({ to: 'diagnosing' }) },
	{ name: 'job assign', path: (w) => `/jobs/${w.jobId}?/assign`, who: 'owner', valid: (w) => ({ id: w.shop.staff.technician.id }) },
	{ name: 'job sheet', path: (w) => `/jobs/${w.jobId}?/sheet`, who: 'owner', valid: (w) => ({ id: w.specId }) },
	{ name: 'job reading', path: (w) => `/jobs/${w.jobId}?/reading`, who: 'owner', valid: () => ({ specItemId: '', label: 'Rotor', unit: 'Ω', value: '3.4', note: '' }), numeric: ['value'] },
	{ name: 'job removeReading', path: (w) => `/jobs/${w.jobId}?/removeReading`, who: 'owner', valid: (w) => ({ readingId: w.readingId }) },
	{ name: 'job findings', path: (w) => `/jobs/${w.jobId}?/findings`, who: 'owner', valid: () => ({ failedComponent: 'Stator', findings: 'Burnt winding', lockVersion: '0' }), numeric: ['lockVersion'] },
	{ name: 'actuals hours', path: (w) => `/jobs/${w.approvedJobId}/actuals?/hours`, who: 'owner', valid: (w) => ({ technicianId: w.shop.staff.technician.id, hours: '1.25', workedOn: '', note: '' }), numeric: ['hours'] },
	{ name: 'actuals removeHours', path: (w) => `/jobs/${w.approvedJobId}/actuals?/removeHours`, who: 'owner', valid: (w) => ({ entryId: w.labourEntryId }) },
	{ name: 'actuals part', path: (w) => `/jobs/${w.approvedJobId}/actuals?/part`, who: 'owner', valid: () => ({ description: 'Brush set', quantity: '1', unitCost: '16.40' }), numeric: ['quantity', 'unitCost'] },
	{ name: 'actuals removePart', path: (w) => `/jobs/${w.approvedJobId}/actuals?/removePart`, who: 'owner', valid: (w) => ({ entryId: w.labourEntryId }) },
	{ name: 'payments recordPayment', path: (w) => `/jobs/${w.approvedJobId}/payments?/recordPayment`, who: 'owner', valid: () => ({ kind: 'balance', method: 'cash', amount: '1.00', reference: '' }), numeric: ['amount'] },
	{ name: 'payments sendBalanceLink', path: (w) => `/jobs/${w.approvedJobId}/payments?/sendBalanceLink`, who: 'owner', valid: () => ({}) },
	{ name: 'payments refund', path: (w) => `/jobs/${w.approvedJobId}/payments?/refund`, who: 'owner', valid: (w) => ({ paymentId: w.paymentId, amount: '0.01', reason: 'Overcharged' }), numeric: ['amount'] },
	{ name: 'quote save', path: (w) => `/jobs/${w.jobId}/quote?/save`, who: 'owner', valid: () => ({ draft: JSON.stringify(sampleDraft()), lockVersion: '0' }), numeric: ['lockVersion'] },
	{ name: 'quote send', path: (w) => `/jobs/${w.jobId}/quote?/send`, who: 'owner', valid: () => ({}) },
	{ name: 'quote revoke', path: (w) => `/jobs/${w.quotedJobId}/quote?/revoke`, who: 'owner', valid: () => ({}) },
	{ name: 'payments resolve', path: () => '/payments?/resolve', who: 'owner', valid: (w) => ({ eventId: w.paymentId }) },
	{ name: 'customer approve', path: (w) => `/q/${w.token}?/approve`, who: 'anonymous', valid: () => ({ optionIndex: '0', signerName: 'Tamsin Yarrow', consent: 'yes' }), numeric: ['optionIndex'] },
	{ name: 'customer decline', path: (w) => `/q/${w.token}?/decline`, who: 'anonymous', valid: () => ({ reason: 'Too dear' }) },
	{ name: 'customer pay', path: (w) => `/q/${w.approvedToken}?/pay`, who: 'anonymous', valid: () => ({}) },
	{
		name: 'settings save', path: () => '/settings?/save', who: 'owner', valid: () => settingsForm,
		numeric: ['labourRate', 'labourCostRate', 'suppliesPercent', 'suppliesCap', 'depositPercent', 'annualHours', 'taxPercent', 'quoteValidityDays', 'feeDiagnostic', 'tierMultiplier']
	},
	{
		name: 'spec save', path: (w) => `/specs/${w.specId}?/save`, who: 'owner',
		valid: () => ({ name: 'Stator checks', appliesTo: '', notes: '', label: ['Stator', 'Rotor'], unit: ['Ω', 'Ω'], min: ['0.5', '2'], max: ['2', '8'], openAbove: ['', ''], shortBelow: ['', ''], running: ['off', 'off'], source: ['', ''] }),
		numeric: ['min', 'max', 'openAbove', 'shortBelow']
	},
	{ name: 'spec new', path: () => '/specs/new?/save', who: 'owner', valid: () => ({ name: 'Brush checks', appliesTo: '', notes: '', label: 'Brush length', unit: 'mm', min: '8', max: '', openAbove: '', shortBelow: '', running: 'off', source: '' }), numeric: ['min'] },
	{ name: 'spec delete', path: (w) => `/specs/${w.specId}?/delete`, who: 'owner', valid: () => ({}) },
	{ name: 'team invite', path: () => '/team?/invite', who: 'owner', valid: () => ({ email: 'new.hand@shop.example', role: 'technician' }) },
	{ name: 'team revoke', path: () => '/team?/revoke', who: 'owner', valid: (w) => ({ id: w.shop.staff.writer.id }) },
	{ name: 'team remove', path: () => '/team?/remove', who: 'owner', valid: (w) => ({ id: w.shop.staff.writer.id }) },
	{ name: 'catalog add', path: () => '/catalog?/add', who: 'owner', valid: () => part, numeric: ['cost', 'stock'] },
	{ name: 'catalog import', path: () => '/catalog?/import', who: 'owner', multipart: true, valid: () => ({ list: 'labour', file: csv('name,hours\nReplace brushes,0.80\n') }) },
	{ name: 'catalog save', path: (w) => `/catalog/parts/${w.partId}?/save`, who: 'owner', valid: () => part, numeric: ['cost', 'stock'] },
	{ name: 'catalog delete', path: (w) => `/catalog/labour/${w.labourId}?/delete`, who: 'owner', valid: () => ({ confirm: 'yes' }) }
];

const pricingRequest = () => ({ currency: 'USD', diagnosticFee: '89.00', ...sampleDraft() });
const reportQuery = { from: '2026-01-01', to: '2026-06-30', technician: '', kind: 'portable' };

export const JSON_ROUTES: JsonCase[] = [
	{ name: 'pricing evaluate', method: 'POST', path: () => '/api/pricing/evaluate', who: 'owner', valid: pricingRequest, numeric: ['unit.ageYears', 'options.0.lines.0.quantity', 'options.0.lines.0.unitCost', 'diagnosticFee'] },
	{ name: 'photo update', method: 'POST', path: (w) => `/jobs/${w.jobId}/photos/${w.photoId}`, who: 'owner', valid: () => ({ caption: 'Burnt stator', showCustomer: true }) },
	{ name: 'payment webhook', method: 'POST', path: () => '/api/payments/webhook', who: 'anonymous', valid: () => ({ id: 'evt_1', type: 'checkout.session.completed', data: { object: { id: 'cs_1', amount_total: 1000 } } }), headers: () => ({ 'stripe-signature': `t=${Math.floor(Date.now() / 1000)},v1=${'0'.repeat(64)}` }) },
	{ name: 'job board', method: 'GET', path: () => '/api/jobs', who: 'owner', valid: () => ({ q: 'harrowgate', status: 'quoted', tech: 'none', age: '30', sort: 'customer', dir: 'asc', page: '1', per: '25' }), numeric: ['page', 'per'] },
	{ name: 'report json', method: 'GET', path: () => '/api/reports/revenue', who: 'owner', valid: () => reportQuery },
	{ name: 'report csv', method: 'GET', path: () => '/reports/margin.csv', who: 'owner', valid: () => reportQuery, page: true },
	{ name: 'payments csv', method: 'GET', path: () => '/payments/payments.csv', who: 'owner', valid: () => ({ status: 'paid', kind: 'deposit', method: 'cash', from: '2026-01-01', to: '2030-01-01', job: '1' }), numeric: ['job'], page: true },
	{ name: 'quote parts', method: 'GET', path: (w) => `/jobs/${w.jobId}/quote/parts`, who: 'owner', valid: () => ({ q: 'brush' }) },
	{ name: 'board page', method: 'GET', path: () => '/jobs', who: 'owner', valid: () => ({ q: 'harrowgate', status: 'quoted', page: '2' }), page: true },
	{ name: 'customers page', method: 'GET', path: () => '/customers', who: 'owner', valid: () => ({ q: 'yarrow', page: '2' }), page: true },
	{ name: 'catalog page', method: 'GET', path: () => '/catalog', who: 'owner', valid: () => ({ q: 'brush', done: 'saved' }), page: true },
	{ name: 'payments page', method: 'GET', path: () => '/payments', who: 'owner', valid: () => ({ status: 'paid', from: '2026-01-01', job: '2' }), page: true },
	{ name: 'reports page', method: 'GET', path: () => '/reports', who: 'owner', valid: () => reportQuery, page: true },
	{ name: 'customer page', method: 'GET', path: (w) => `/q/${w.approvedToken}`, who: 'anonymous', valid: () => ({ paid: '1', session_id: 'cs_test_1' }), page: true },
	{ name: 'signin page', method: 'GET', path: () => '/signin', who: 'anonymous', valid: () => ({ next: '/jobs' }), page: true }
];

// ------------------------------------------------------------------------------------------------
// Generators

const ABSURD_NUMBERS = ['NaN', 'Infinity', '-Infinity', '1e309', '-1e309', '1e21', '9'.repeat(40), '0x1F', '1.2.3', '1e-400', '12,5,0', '٣'];

const hostileString: fc.Arbitrary<string> = fc.oneof(
	{ weight: 4, arbitrary: fc.constantFrom(
		'', ' ', '\t\n', ...ABSURD_NUMBERS, '-1', '-0', '0', '0.000000001', '1.999', '12.345678', ' 7 ', 'null', 'undefined', 'true', 'false', '[]', '{}',
		'__proto__', 'constructor', '../../../etc/passwd', 'C:\\Windows\\win.ini', '<script>alert(1)</script>', '"><img src=x onerror=alert(1)>', "' OR '1'='1",
		'1; DROP TABLE jobs; --', '%00', '\u0000', 'a\u0000b', '\u202eevil', '\ud800', '😀🛠️', 'ＡＢＣ', '2026-02-30', '0000-00-00', '9999-12-31', '2026-13-01',
		'00000000-0000-0000-0000-000000000000', 'ffffffff-ffff-ffff-ffff-ffffffffffff', '${7*7}', '{{7*7}}', 'x'.repeat(5_000)
	) },
	{ weight: 2, arbitrary: fc.string({ maxLength: 40 }) },
	{ weight: 1, arbitrary: fc.string({ unit: 'binary', maxLength: 40 }) },
	{ weight: 1, arbitrary: fc.oneof(fc.integer(), fc.double(), fc.bigInt()).map(String) },
	{ weight: 1, arbitrary: fc.uuid().map(String) },
	// Past every field's limit, and past the size of a whole sensible form.
	{ weight: 1, arbitrary: fc.constantFrom(1_000, 20_000, 70_000).map((n) => 'é'.repeat(n)) }
);

const hostileJson: fc.Arbitrary<unknown> = fc.oneof(
	hostileString,
	fc.constantFrom(null, true, false, 0, -1, 1e308, -1e308, Number.MAX_SAFE_INTEGER, 0.1, [], {}, [[[[[]]]]], JSON.parse('{"__proto__":{"admin":true}}')),
	fc.jsonValue({ maxDepth: 3 })
);

/** A form built from the valid one: each field kept, replaced, dropped, repeated or turned into a file. */
function formArb(valid: Fields): fc.Arbitrary<Fields> {
	const field = (value: Value): fc.Arbitrary<Value | undefined> =>
		fc.oneof(
			{ weight: 3, arbitrary: fc.constant(value) },
			{ weight: 3, arbitrary: hostileString },
			{ weight: 1, arbitrary: fc.constant(undefined) },
			{ weight: 1, arbitrary: fc.array(hostileString, { minLength: 2, maxLength: 3 }) },
			{ weight: 1, arbitrary: fc.uint8Array({ maxLength: 64 }).map((bytes) => new Blob([bytes])) }
		);
	const shape = Object.fromEntries(Object.entries(valid).map(([k, v]) => [k, field(v)]));
	return fc
		.tuple(fc.record(shape), fc.dictionary(fc.string({ minLength: 1, maxLength: 12 }), hostileString, { maxKeys: 2 }))
		.map(([fields, extra]) => {
			const out: Fields = { ...extra };
			for (const [k, v] of Object.entries(fields)) if (v !== undefined) out[k] = v as Value;
			return out;
		});
}

/** Leaf paths of a JSON value ("options.0.lines.1.unitCost"). */
function leaves(value: unknown, prefix = ''): string[] {
	if (value && typeof value === 'object') {
		return Object.entries(value).flatMap(([k, v]) => leaves(v, prefix ? `${prefix}.${k}` : k));
	}
	return [prefix];
}

function setPath(target: unknown, path: string, value: unknown): unknown {
	if (path === '') return value;
	const keys = path.split('.');
	let node = target as Record<string, unknown>;
	for (const key of keys.slice(0, -1)) node = node[key] as Record<string, unknown>;
	node[keys.at(-1)!] = value;
	return target;
}

/** A JSON body built from the valid one, or something else altogether. */
function jsonBodyArb(valid: unknown): fc.Arbitrary<string> {
	const paths = leaves(valid);
	const mutated = fc
		.array(fc.tuple(fc.constantFrom(...paths), hostileJson), { minLength: 1, maxLength: 4 })
		.map((changes) => JSON.stringify(changes.reduce((body, [path, value]) => setPath(body, path, value), structuredClone(valid))));
	return fc.oneof(
		{ weight: 6, arbitrary: mutated },
		{ weight: 1, arbitrary: hostileJson.map((v) => JSON.stringify(v) ?? '') },
		{ weight: 1, arbitrary: fc.constantFrom('', '{', '{"a":}', 'NaN', '[1,2', '\u0000', '{"a":1e999}', '['.repeat(20_000) + ']'.repeat(20_000)) },
		{ weight: 1, arbitrary: fc.string({ maxLength: 60 }) }
	);
}

// ------------------------------------------------------------------------------------------------
// Sending and judging

let app: AppInstance;
let world: World;
let settingsForm: Fields;
const cookies: Record<Who, string> = { owner: '', manager: '', anonymous: '' };
let address = 0;

/** Every request speaks from its own documentation-range address, so the sign-in throttle sees many clients. */
function headersFor(who: Who, extra: Record<string, string> = {}): Record<string, string> {
	address++;
	return {
		'x-forwarded-for': `2001:db8::${address.toString(16)}`,
		origin: app.url,
		...(cookies[who] ? { cookie: cookies[who] } : {}),
		...extra
	};
}

async function signIn(email: string): Promise<string> {
	const res = await fetch(`${app.url}/signin`, {
		method: 'POST', redirect: 'manual',
		headers: headersFor('anonymous', { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' }),
		body: new URLSearchParams({ email, password: PASSWORD })
	});
	if (res.status !== 303) throw new Error(`sign-in failed: ${res.status}`);
	return res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
}

function encode(fields: Fields, multipart: boolean): { body: BodyInit; type?: string } {
	const hasFile = Object.values(fields).some((v) => v instanceof Blob);
	if (multipart || hasFile) {
		const form = new FormData();
		for (const [k, v] of Object.entries(fields)) {
			if (Array.isArray(v)) v.forEach((item) => form.append(k, item));
			else if (v instanceof Blob) form.append(k, v, 'upload.bin');
			else form.append(k, v);
		}
		return { body: form };
	}
	const params = new URLSearchParams();
	for (const [k, v] of Object.entries(fields)) {
		if (Array.isArray(v)) v.forEach((item) => params.append(k, item));
		else params.append(k, v as string);
	}
	return { body: params.toString(), type: 'application/x-www-form-urlencoded' };
}

interface Answer {
	status: number;
	type: string;
	text: string;
}

async function send(method: string, path: string, who: Who, body?: BodyInit, headers: Record<string, string> = {}): Promise<Answer> {
	const res = await fetch(app.url + path, { method, body, redirect: 'manual', headers: headersFor(who, headers) });
	return { status: res.status, type: res.headers.get('content-type') ?? '', text: await res.text() };
}

const STACK_LINE = /^\s+at .+(:\d+:\d+\)?|\(native\)|\(node:[\w/]+\))$/m;
const ERROR_NAME = /\b(?:Type|Range|Reference|Syntax|Sequelize\w*|Database|Zod|Postgres|Aggregate)?Error: /;
const SERVER_PATHS = /\/(?:node_modules|src\/lib\/server|build\/server|\.svelte-kit)\//;

function expectNoLeak(answer: Answer, what: string) {
	expect(answer.status, `${what}: ${answer.text.slice(0, 300)}`).toBeLessThan(500);
	expect(answer.text, what).not.toMatch(STACK_LINE);
	expect(answer.text, what).not.toMatch(ERROR_NAME);
	expect(answer.text, what).not.toMatch(SERVER_PATHS);
}

/** A form action's JSON answer (as use:enhance asks for it): a refusal carries a message. */
function expectClearAction(answer: Answer, what: string) {
	expectNoLeak(answer, what);
	if (answer.status >= 400) {
		// An error() in an action answers {type: 'error', error: {message}}; SvelteKit's own refusals too.
		if (answer.type.includes('json')) {
			const body = JSON.parse(answer.text);
			expect(body.message ?? body.error?.message, what).toMatch(/\w/);
		}
		return;
	}
	if (!answer.type.includes('json')) return;
	const reply = JSON.parse(answer.text) as { type: string; status?: number; data?: string; error?: { message?: string } };
	if (reply.type === 'failure') {
		expect(reply.status, what).toBeGreaterThanOrEqual(400);
		expect(reply.status, what).toBeLessThan(500);
		expect(reply.data, what).toMatch(/"message":\d+/);
	}
	if (reply.type === 'error') expect(reply.error?.message, what).toMatch(/\w/);
}

/** Node's own refusals of an address or headers too long to parse: a status and no body, before the app runs. */
const TOO_LONG = [414, 431];

function expectClearJson(answer: Answer, what: string, page = false) {
	expectNoLeak(answer, what);
	if (TOO_LONG.includes(answer.status)) return;
	if (answer.status >= 400 && answer.type.includes('json')) {
		const body = JSON.parse(answer.text);
		expect(typeof body.message, what).toBe('string');
		expect(body.message.length, what).toBeGreaterThan(0);
	} else if (answer.status >= 400 && !page) {
		expect(answer.text.length, what).toBeGreaterThan(0);
	}
}

function isRefusal(answer: Answer): boolean {
	if (answer.status >= 400 && answer.status < 500) return true;
	if (answer.status === 200 && answer.type.includes('json')) {
		const reply = JSON.parse(answer.text) as { type?: string; status?: number };
		return (reply.type === 'failure' && (reply.status ?? 0) >= 400) || reply.type === 'error';
	}
	return false;
}

beforeAll(async () => {
	app = await startApp({ ADDRESS_HEADER: 'x-forwarded-for', XFF_DEPTH: '1' });
	world = await buildWorld('Fuzz', app.url);
	const values = await settings.formValues(world.shop.id);
	settingsForm = {
		...values.fields, techniciansSeeCosts: 'on', tierUpTo: values.tierUpTo, tierMultiplier: values.tierMultiplier, taxable: values.taxable
	};
	cookies.owner = await signIn(world.shop.staff.owner.email);
	cookies.manager = await signIn(world.shop.staff.manager.email);
}, 120_000);

afterAll(async () => {
	await app?.stop();
});

describe('the case tables', () => {
	it('name every form action and JSON route once', () => {
		const names = [...FORMS, ...JSON_ROUTES].map((c) => c.name);
		expect(new Set(names).size).toBe(names.length);
		expect(FORMS.length).toBeGreaterThanOrEqual(40);
	});

	it('cover every form action and every POST endpoint under src/routes', () => {
		const tree = routeTree();
		const wanted = new Set<string>();
		for (const route of tree) {
			for (const action of actionsOf(route.dir)) wanted.add(`${route.id} ${action}`);
			for (const method of methodsOf(route.dir)) if (method !== 'GET' && method !== 'DELETE') wanted.add(`${route.id} ${method}`);
		}
		const covered = new Set<string>();
		for (const c of FORMS) {
			const [address, action] = c.path(world).split('?/');
			covered.add(`${routeOf(address, tree)} ${action ?? 'default'}`);
		}
		for (const c of JSON_ROUTES.filter((r) => r.method === 'POST')) covered.add(`${routeOf(c.path(world), tree)} POST`);
		// Photo uploads: tests/integration/photos.test.ts.
		const elsewhere = ['/jobs/[id]/photos POST'];
		expect([...wanted].filter((w) => !covered.has(w) && !elsewhere.includes(w)), 'add these to FORMS or JSON_ROUTES').toEqual([]);
	});
});

describe.concurrent('form actions under generated hostile input', () => {
	for (const c of FORMS) {
		it(`${c.name}: never a 500 or a stack trace, refusals carry a message`, async () => {
			const valid = c.valid(world);
			await fc.assert(
				// One run in five as a browser without JavaScript (a whole page back), the rest as use:enhance.
				fc.asyncProperty(formArb(valid), fc.nat(4).map((n) => n === 0), async (fields, html) => {
					const { body, type } = encode(fields, !!c.multipart);
					const headers: Record<string, string> = { accept: html ? 'text/html' : 'application/json', ...(type ? { 'content-type': type } : {}) };
					const answer = await send('POST', c.path(world), c.who, body, headers);
					if (html) expectNoLeak(answer, c.name);
					else expectClearAction(answer, c.name);
				}),
				{ numRuns: RUNS }
			);
		}, 300_000);
	}
});

describe.concurrent('absurd numbers are refused', () => {
	for (const c of FORMS.filter((f) => f.numeric?.length)) {
		it(`${c.name}: ${c.numeric!.join(', ')}`, async () => {
			const valid = c.valid(world);
			for (const field of c.numeric!) {
				for (const absurd of ABSURD_NUMBERS) {
					// Fresh lock versions so a refusal is about the number, not a conflict.
					const fields = { ...valid, [field]: Array.isArray(valid[field]) ? [absurd, ...(valid[field] as string[]).slice(1)] : absurd };
					if ('lockVersion' in valid && field !== 'lockVersion') fields.lockVersion = String(await currentLock(c.name));
					const { body, type } = encode(fields, !!c.multipart);
					const answer = await send('POST', c.path(world), c.who, body, { accept: 'application/json', ...(type ? { 'content-type': type } : {}) });
					expectClearAction(answer, `${c.name} ${field}=${absurd}`);
					expect(isRefusal(answer), `${c.name} ${field}=${absurd} was accepted: ${answer.text.slice(0, 200)}`).toBe(true);
				}
			}
		}, 120_000);
	}

	for (const c of JSON_ROUTES.filter((r) => r.numeric?.length && r.method === 'POST')) {
		it(`${c.name}: ${c.numeric!.join(', ')}`, async () => {
			for (const field of c.numeric!) {
				for (const absurd of [...ABSURD_NUMBERS, 1e308, -1e308, Number.MAX_VALUE]) {
					const body = JSON.stringify(setPath(structuredClone(c.valid(world)), field, absurd));
					const answer = await send('POST', c.path(world), c.who, body, { 'content-type': 'application/json', ...c.headers?.(world) });
					expectClearJson(answer, `${c.name} ${field}=${absurd}`);
					expect(answer.status, `${c.name} ${field}=${absurd}`).toBe(400);
				}
			}
		});
	}

	it('the job board clamps absurd paging instead of passing it to the database', async () => {
		for (const absurd of ABSURD_NUMBERS) {
			const answer = await send('GET', `/api/jobs?page=${encodeURIComponent(absurd)}&per=${encodeURIComponent(absurd)}`, 'owner');
			expect(answer.status).toBe(200);
			const board = JSON.parse(answer.text);
			expect(board.query.page).toBe(1);
			expect(board.query.per).toBe(25);
		}
	});
});

async function currentLock(name: string): Promise<number> {
	if (name !== 'quote save') return 0;
	const quote = await Quote.findOne({ where: { jobId: world.jobId } });
	return quote?.lockVersion ?? 0;
}

describe.concurrent('JSON routes and queries under generated hostile input', () => {
	for (const c of JSON_ROUTES) {
		it(`${c.name}: never a 500 or a stack trace, 4xx JSON carries a message`, async () => {
			const valid = c.valid(world) as Record<string, unknown>;
			if (c.method === 'POST') {
				const contentType = fc.oneof(
					{ weight: 8, arbitrary: fc.constant('application/json') },
					{ weight: 1, arbitrary: fc.constantFrom('text/plain', 'application/x-www-form-urlencoded', 'application/json; charset=latin1', 'multipart/form-data; boundary=x', '') }
				);
				await fc.assert(
					fc.asyncProperty(jsonBodyArb(valid), contentType, async (body, type) => {
						const answer = await send('POST', c.path(world), c.who, body, { ...(type ? { 'content-type': type } : {}), accept: 'application/json', ...c.headers?.(world) });
						expectClearJson(answer, c.name);
					}),
					{ numRuns: RUNS }
				);
			} else {
				await fc.assert(
					fc.asyncProperty(formArb(valid as Fields), async (fields) => {
						const query = new URLSearchParams();
						for (const [k, v] of Object.entries(fields)) {
							if (Array.isArray(v)) v.forEach((item) => query.append(k, item.slice(0, 2_000)));
							else if (typeof v === 'string') query.append(k, v.slice(0, 2_000));
						}
						const answer = await send('GET', `${c.path(world)}?${query}`, c.who, undefined, { accept: c.page ? 'text/html' : 'application/json' });
						expectClearJson(answer, c.name, c.page);
					}),
					{ numRuns: RUNS }
				);
			}
		}, 300_000);
	}
});

describe('bodies that cannot be read', () => {
	const cases: [string, string, BodyInit][] = [
		['text/plain', 'text/plain', 'name=Tamsin'],
		['multipart without its boundary', 'multipart/form-data', 'name=Tamsin'],
		['multipart with a wrong boundary', 'multipart/form-data; boundary=abc', '--xyz\r\nContent-Disposition: form-data; name="name"\r\n\r\nTamsin\r\n--xyz--\r\n'],
		['multipart cut short', 'multipart/form-data; boundary=abc', '--abc\r\nContent-Disposition: form-data; name="name"\r\n\r\nTams'],
		['url-encoded with broken escapes', 'application/x-www-form-urlencoded', 'name=%E0%A4%A&phone=%zz']
	];
	for (const [what, type, body] of cases) {
		it(`${what}: a 4xx with a message, never a 500`, async () => {
			for (const accept of ['text/html', 'application/json']) {
				const answer = await send('POST', '/customers?/create', 'owner', body, { 'content-type': type, accept });
				expectClearAction(answer, what);
			}
		});
	}

	it('a form sent as JSON is a 415 with a message', async () => {
		const answer = await send('POST', '/customers?/create', 'owner', '{"name":"Tamsin"}', { 'content-type': 'application/json', accept: 'application/json' });
		expect(answer.status).toBe(415);
		expect(JSON.parse(answer.text).error.message).toMatch(/form/);
	});

	it('a post to a page without actions is a 405 in plain words', async () => {
		const answer = await send('POST', '/home', 'owner', 'a=1', { 'content-type': 'application/x-www-form-urlencoded', accept: 'application/json' });
		expect(answer.status).toBe(405);
		expectClearAction(answer, 'POST /home');
		expect(JSON.parse(answer.text).error.message).toBe('This address does not take that kind of request.');
	});
});
