// A local stand-in for the parts of Stripe that Mendwise uses, for development and tests. It speaks
// Stripe's HTTP API to the official SDK (form-encoded requests, JSON objects with `object` and
// `id`), hosts a test checkout page, and sends webhooks signed exactly as Stripe signs them.
// It never touches real money and says so on every page.
//
//   tsx scripts/payment-fake.ts [--port 2590] [--data .data/payment-fake.json]
//   env: WEBHOOK_URL (where events go), STRIPE_WEBHOOK_SECRET (signs them),
//        STRIPE_SECRET_KEY (the key the app must send; any sk_test_ key when unset)
//
// Stripe API subset:
//   POST /v1/checkout/sessions            GET /v1/checkout/sessions/:id
//   POST /v1/checkout/sessions/:id/expire GET /v1/payment_intents/:id
//   POST /v1/refunds                      GET /v1/refunds/:id
// Checkout page:   GET /pay/:session, POST /pay/:session (field `card`)
//   4242 4242 4242 4242 succeeds; 4000 0000 0000 0002 is declined.
// Test control (loopback only):
//   GET  /__health
//   POST /__control  {session?, duplicate?: n, delayMs?: ms, reverseOrder?: true, webhookUrl?}
//        shapes the next batch of webhooks (of that session when `session` is given): each event
//        sent n times at once, the batch sent ms late, or in reverse order.
//   GET  /__deliveries[?session=cs_…]     what was sent and how the app answered
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import Stripe from 'stripe';
import { formatFixedMoney, fromMinorUnits } from '../src/lib/pricing/money';
import { announce, argument, runAsMain, stopOnSignal } from './lib/fake-cli';

export const SUCCEEDING_CARD = '4242424242424242';
export const DECLINED_CARD = '4000000000000002';
export const BANNER = 'TEST PAYMENT PAGE — local fake, no real money moves';
const API_VERSION = Stripe.API_VERSION;
const SESSION_HOURS = 24;
const RETRY_DELAYS_MS = [500, 1_000, 2_000, 4_000, 8_000];
const THREE_DECIMAL = new Set(['bhd', 'jod', 'kwd', 'omr', 'tnd']);

type Json = Record<string, unknown>;

interface Session extends Json {
	id: string;
	object: 'checkout.session';
	amount_subtotal: number;
	amount_total: number;
	cancel_url: string | null;
	client_reference_id: string | null;
	created: number;
	currency: string;
	customer: null;
	customer_email: string | null;
	expires_at: number;
	livemode: false;
	metadata: Record<string, string>;
	mode: 'payment';
	payment_intent: string | null;
	payment_method_types: string[];
	payment_status: 'unpaid' | 'paid';
	status: 'open' | 'complete' | 'expired';
	success_url: string;
	url: string | null;
}

interface Intent extends Json {
	id: string;
	object: 'payment_intent';
	amount: number;
	amount_received: number;
	currency: string;
	status: 'requires_payment_method' | 'succeeded';
	metadata: Record<string, string>;
	description: string | null;
	last_payment_error: Json | null;
	latest_charge: string | null;
}

interface RefundObject extends Json {
	id: string;
	object: 'refund';
	amount: number;
	currency: string;
	payment_intent: string;
	charge: string | null;
	status: 'succeeded';
	metadata: Record<string, string>;
}

interface Extra {
	name: string;
	description: string;
	intentMetadata: Record<string, string>;
	intentDescription: string | null;
}

interface State {
	sessions: Record<string, Session>;
	intents: Record<string, Intent>;
	refunds: Record<string, RefundObject>;
	extras: Record<string, Extra>;
	idempotency: Record<string, { status: number; body: Json }>;
}

interface Plan {
	duplicate: number;
	delayMs: number;
	reverseOrder: boolean;
}

export interface Delivery {
	eventId: string;
	type: string;
	session: string | null;
	attempt: number;
	status: number | null;
	error: string | null;
	at: string;
}

export interface PaymentFakeOptions {
	port?: number;
	host?: string;
	dataFile?: string | null;
	webhookUrl?: string | null;
	webhookSecret: string;
	apiKey?: string | null;
	log?: (line: string) => void;
}

export interface PaymentFake {
	url: string;
	port: number;
	stop(): Promise<void>;
}

class ApiError extends Error {
	constructor(
		readonly status: number,
		message: string,
		readonly extra: Json = {}
	) {
		super(message);
	}
}

const now = () => Math.floor(Date.now() / 1000);
const makeId = (prefix: string) => `${prefix}${randomBytes(18).toString('base64url').replace(/[-_]/g, 'x')}`;

/** `a[b][0][c]=1` → { a: { b: [ { c: '1' } ] } }, the way the SDK encodes nested parameters. */
export function parseStripeForm(body: string): Json {
	const out: Json = {};
	for (const [key, value] of new URLSearchParams(body)) {
		const parts = key.replace(/\]/g, '').split('[');
		let node: Record<string, unknown> | unknown[] = out;
		parts.forEach((part, i) => {
			const last = i === parts.length - 1;
			const nextIsIndex = !last && /^\d+$/.test(parts[i + 1]);
			const slot = Array.isArray(node) ? Number(part) : part;
			const container = node as Record<string | number, unknown>;
			if (last) container[slot] = value;
			else {
				container[slot] ??= nextIsIndex ? [] : {};
				node = container[slot] as Record<string, unknown> | unknown[];
			}
		});
	}
	return out;
}

function escapeHtml(value: string): string {
	return value.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function shownAmount(minor: number, currency: string): string {
	try {
		return formatFixedMoney(fromMinorUnits(minor, currency), currency);
	} catch {
		return `${minor} (minor units of ${currency.toUpperCase()})`;
	}
}

function page(title: string, body: string, status = 200) {
	const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>${escapeHtml(title)} · test payment page</title>
<style>
body{margin:0;font-family:system-ui,sans-serif;background:#eef0f3;color:#1f2a30;line-height:1.5}
.banner{background:#b00020;color:#fff;font-weight:800;text-align:center;padding:14px 12px;font-size:18px;letter-spacing:.02em}
main{max-width:440px;margin:24px auto;padding:0 16px}
.box{background:#fff;border:1px solid #d5d9de;border-radius:10px;padding:20px;margin-bottom:16px}
h1{font-size:20px;margin:0 0 4px}.amount{font-size:28px;font-weight:700;margin:8px 0}
label{display:block;font-weight:600;font-size:14px;margin-top:12px}
input{display:block;width:100%;box-sizing:border-box;font-size:18px;padding:10px;border:1px solid #9aa4ad;border-radius:6px;margin-top:4px}
button{width:100%;margin-top:16px;font-size:18px;font-weight:700;padding:12px;border:0;border-radius:6px;background:#2f4858;color:#fff;cursor:pointer}
.bad{background:#fde2e2;border:1px solid #e3a1a1;color:#8a1f1f;padding:10px 12px;border-radius:6px}
.good{background:#dcefe1;border:1px solid #9cc7a8;color:#1d5b32;padding:10px 12px;border-radius:6px}
.small{font-size:13px;color:#56616a}code{font-size:14px}
</style></head>
<body><div class="banner" role="note">${BANNER}</div><main>${body}</main></body></html>`;
	return { status, html };
}

export async function startPaymentFake(options: PaymentFakeOptions): Promise<PaymentFake> {
	const host = options.host ?? '127.0.0.1';
	const log = options.log ?? (() => {});
	const dataFile = options.dataFile ?? null;
	let webhookUrl = options.webhookUrl ?? null;
	const state: State = { sessions: {}, intents: {}, refunds: {}, extras: {}, idempotency: {} };
	if (dataFile && fs.existsSync(dataFile)) Object.assign(state, JSON.parse(fs.readFileSync(dataFile, 'utf8')) as State);
	const deliveries: Delivery[] = [];
	let nextPlan: Partial<Plan> | null = null;
	const sessionPlans = new Map<string, Partial<Plan>>();
	const timers = new Set<NodeJS.Timeout>();
	let baseUrl = '';

	const save = () => {
		if (!dataFile) return;
		fs.mkdirSync(path.dirname(dataFile), { recursive: true });
		const temporary = `${dataFile}.${process.pid}.tmp`;
		fs.writeFileSync(temporary, JSON.stringify(state));
		fs.renameSync(temporary, dataFile);
	};

	const wait = (ms: number) =>
		new Promise<void>((resolve) => {
			const timer = setTimeout(() => (timers.delete(timer), resolve()), ms);
			timers.add(timer);
		});

	async function sendOnce(event: Json, session: string | null, attempt: number): Promise<boolean> {
		if (!webhookUrl) return true;
		const payload = JSON.stringify(event);
		// Signed per attempt, with the attempt's time, as Stripe does.
		const signature = Stripe.webhooks.generateTestHeaderString({ payload, secret: options.webhookSecret });
		const record: Delivery = { eventId: String(event.id), type: String(event.type), session, attempt, status: null, error: null, at: new Date().toISOString() };
		deliveries.push(record);
		if (deliveries.length > 5000) deliveries.splice(0, 1000);
		try {
			const res = await fetch(webhookUrl, {
				method: 'POST',
				headers: { 'content-type': 'application/json; charset=utf-8', 'stripe-signature': signature, 'user-agent': 'Stripe/1.0 (+https://stripe.com/docs/webhooks)' },
				body: payload,
				signal: AbortSignal.timeout(10_000)
			});
			record.status = res.status;
			await res.arrayBuffer();
			return res.ok;
		} catch (e) {
			record.error = e instanceof Error ? e.message : String(e);
			return false;
		}
	}

	async function send(event: Json, session: string | null) {
		for (let attempt = 1; ; attempt++) {
			if (await sendOnce(event, session, attempt)) return;
			if (attempt > RETRY_DELAYS_MS.length) {
				log(`[payment fake] gave up delivering ${event.id} (${event.type}) to ${webhookUrl}`);
				return;
			}
			await wait(RETRY_DELAYS_MS[attempt - 1]);
		}
	}

	function event(type: string, object: Json): Json {
		return {
			id: makeId('evt_test_'),
			object: 'event',
			api_version: API_VERSION,
			created: now(),
			data: { object: JSON.parse(JSON.stringify(object)) },
			livemode: false,
			pending_webhooks: 1,
			request: { id: null, idempotency_key: null },
			type
		};
	}

	/** Sends a batch of events for one session, shaped by the control plan waiting for it. */
	function dispatch(session: string | null, events: Json[]) {
		const plan: Plan = { duplicate: 1, delayMs: 0, reverseOrder: false, ...((session && sessionPlans.get(session)) || nextPlan || {}) };
		if (session && sessionPlans.has(session)) sessionPlans.delete(session);
		else nextPlan = null;
		const ordered = plan.reverseOrder ? [...events].reverse() : events;
		void (async () => {
			if (plan.delayMs > 0) await wait(plan.delayMs);
			for (const e of ordered) await Promise.all(Array.from({ length: Math.max(1, plan.duplicate) }, () => send(e, session)));
		})();
	}

	function expireIfDue(session: Session) {
		if (session.status === 'open' && session.expires_at <= now()) {
			session.status = 'expired';
			session.url = null;
			save();
			dispatch(session.id, [event('checkout.session.expired', session)]);
		}
	}

	function getSession(id: string): Session {
		const session = state.sessions[id];
		if (!session) throw new ApiError(404, `No such checkout.session: '${id}'`, { code: 'resource_missing', param: 'id' });
		expireIfDue(session);
		return session;
	}

	function createSession(params: Json): Session {
		if (params.mode !== 'payment') throw new ApiError(400, 'This test service supports only mode=payment.', { param: 'mode' });
		const items = params.line_items;
		if (!Array.isArray(items) || items.length === 0) throw new ApiError(400, 'line_items is required.', { param: 'line_items' });
		let total = 0;
		let currency = '';
		let name = '';
		let description = '';
		items.forEach((raw, i) => {
			const item = raw as { quantity?: string; price_data?: { currency?: string; unit_amount?: string; product_data?: { name?: string; description?: string } } };
			const unit = item.price_data?.unit_amount ?? '';
			const quantity = item.quantity ?? '1';
			const cur = item.price_data?.currency ?? '';
			if (!/^[a-z]{3}$/.test(cur)) throw new ApiError(400, 'Invalid currency.', { param: `line_items[${i}][price_data][currency]` });
			if (!/^\d{1,12}$/.test(unit)) throw new ApiError(400, 'unit_amount must be a whole number of the smallest currency unit.', { param: `line_items[${i}][price_data][unit_amount]` });
			if (!/^[1-9]\d{0,5}$/.test(quantity)) throw new ApiError(400, 'Invalid quantity.', { param: `line_items[${i}][quantity]` });
			if (THREE_DECIMAL.has(cur) && Number(unit) % 10 !== 0) {
				throw new ApiError(400, `Amounts in ${cur.toUpperCase()} must be divisible by 10.`, { param: `line_items[${i}][price_data][unit_amount]` });
			}
			if (currency && cur !== currency) throw new ApiError(400, 'All line items must use the same currency.', { param: 'line_items' });
			currency = cur;
			total += Number(unit) * Number(quantity);
			name ||= item.price_data?.product_data?.name ?? '';
			description ||= item.price_data?.product_data?.description ?? '';
		});
		const successUrl = typeof params.success_url === 'string' ? params.success_url : '';
		if (!/^https?:\/\//.test(successUrl)) throw new ApiError(400, 'success_url must be an http(s) URL.', { param: 'success_url' });
		const id = makeId('cs_test_');
		const created = now();
		const intentData = (params.payment_intent_data ?? {}) as { metadata?: Record<string, string>; description?: string };
		const session: Session = {
			id,
			object: 'checkout.session',
			amount_subtotal: total,
			amount_total: total,
			cancel_url: typeof params.cancel_url === 'string' ? params.cancel_url : null,
			client_reference_id: typeof params.client_reference_id === 'string' ? params.client_reference_id : null,
			created,
			currency,
			customer: null,
			customer_email: typeof params.customer_email === 'string' ? params.customer_email : null,
			expires_at: created + SESSION_HOURS * 3600,
			livemode: false,
			metadata: (params.metadata ?? {}) as Record<string, string>,
			mode: 'payment',
			payment_intent: null,
			payment_method_types: ['card'],
			payment_status: 'unpaid',
			status: 'open',
			success_url: successUrl,
			url: `${baseUrl}/pay/${id}`
		};
		state.sessions[id] = session;
		state.extras[id] = { name: name || 'Payment', description, intentMetadata: intentData.metadata ?? {}, intentDescription: intentData.description ?? null };
		save();
		log(`[payment fake] checkout session ${id} for ${shownAmount(total, currency)}`);
		return session;
	}

	function intentFor(session: Session): Intent {
		if (session.payment_intent && state.intents[session.payment_intent]) return state.intents[session.payment_intent];
		const extra = state.extras[session.id];
		const intent: Intent = {
			id: makeId('pi_test_'),
			object: 'payment_intent',
			amount: session.amount_total,
			amount_received: 0,
			currency: session.currency,
			status: 'requires_payment_method',
			metadata: extra?.intentMetadata ?? {},
			description: extra?.intentDescription ?? null,
			last_payment_error: null,
			latest_charge: null,
			created: now(),
			livemode: false,
			payment_method_types: ['card']
		};
		state.intents[intent.id] = intent;
		session.payment_intent = intent.id;
		return intent;
	}

	function createRefund(params: Json): RefundObject {
		const intentId = typeof params.payment_intent === 'string' ? params.payment_intent : '';
		const intent = state.intents[intentId];
		if (!intent) throw new ApiError(404, `No such payment_intent: '${intentId}'`, { code: 'resource_missing', param: 'payment_intent' });
		if (intent.status !== 'succeeded') throw new ApiError(400, 'This PaymentIntent has not succeeded, so it cannot be refunded.', { code: 'charge_not_refundable' });
		const already = Object.values(state.refunds).filter((r) => r.payment_intent === intent.id).reduce((sum, r) => sum + r.amount, 0);
		const left = intent.amount_received - already;
		const amount = params.amount === undefined ? left : Number(params.amount);
		if (!Number.isSafeInteger(amount) || amount <= 0) throw new ApiError(400, 'Invalid amount.', { param: 'amount' });
		if (amount > left) {
			throw new ApiError(400, `Refund amount (${shownAmount(amount, intent.currency)}) is greater than unrefunded amount on charge (${shownAmount(left, intent.currency)})`, { code: 'amount_too_large', param: 'amount' });
		}
		const refund: RefundObject = {
			id: makeId('re_test_'),
			object: 'refund',
			amount,
			balance_transaction: null,
			charge: intent.latest_charge,
			created: now(),
			currency: intent.currency,
			metadata: (params.metadata ?? {}) as Record<string, string>,
			payment_intent: intent.id,
			reason: typeof params.reason === 'string' ? params.reason : null,
			status: 'succeeded'
		};
		state.refunds[refund.id] = refund;
		save();
		const session = Object.values(state.sessions).find((s) => s.payment_intent === intent.id)?.id ?? null;
		dispatch(session, [event('refund.created', refund)]);
		return refund;
	}

	function checkAuth(req: http.IncomingMessage) {
		const header = req.headers.authorization ?? '';
		const key = header.startsWith('Bearer ') ? header.slice(7) : '';
		const ok = options.apiKey ? key === options.apiKey : key.startsWith('sk_test_');
		if (!ok) throw new ApiError(401, `Invalid API Key provided: ${key ? `${key.slice(0, 8)}…` : '(none)'}`, { type: 'invalid_request_error' });
	}

	function api(method: string, pathname: string, params: Json): Json {
		let m: RegExpMatchArray | null;
		if (method === 'POST' && pathname === '/v1/checkout/sessions') return createSession(params);
		if (method === 'GET' && (m = pathname.match(/^\/v1\/checkout\/sessions\/([\w]+)$/))) return getSession(m[1]);
		if (method === 'POST' && (m = pathname.match(/^\/v1\/checkout\/sessions\/([\w]+)\/expire$/))) {
			const session = getSession(m[1]);
			if (session.status !== 'open') throw new ApiError(400, `Only Checkout Sessions with a status in ["open"] can be expired. This session has status "${session.status}".`);
			session.expires_at = now();
			expireIfDue(session);
			return session;
		}
		if (method === 'GET' && (m = pathname.match(/^\/v1\/payment_intents\/([\w]+)$/))) {
			const intent = state.intents[m[1]];
			if (!intent) throw new ApiError(404, `No such payment_intent: '${m[1]}'`, { code: 'resource_missing', param: 'intent' });
			return intent;
		}
		if (method === 'POST' && pathname === '/v1/refunds') return createRefund(params);
		if (method === 'GET' && (m = pathname.match(/^\/v1\/refunds\/([\w]+)$/))) {
			const refund = state.refunds[m[1]];
			if (!refund) throw new ApiError(404, `No such refund: '${m[1]}'`, { code: 'resource_missing', param: 'id' });
			return refund;
		}
		throw new ApiError(404, `Unrecognized request URL (${method}: ${pathname}). This local test service answers only the calls Mendwise makes.`);
	}

	function checkoutPage(session: Session, message: { tone: 'bad' | 'good'; text: string } | null = null, status = 200) {
		const extra = state.extras[session.id];
		const amount = shownAmount(session.amount_total, session.currency);
		const head = `<div class="box"><p class="small">Paying</p><h1>${escapeHtml(extra?.name ?? 'Payment')}</h1>${extra?.description ? `<p class="small">${escapeHtml(extra.description)}</p>` : ''}<p class="amount">${escapeHtml(amount)}</p></div>`;
		const back = session.cancel_url ? `<p><a href="${escapeHtml(session.cancel_url)}">Cancel and go back to the shop's page</a></p>` : '';
		if (session.status === 'expired') {
			return page('Expired', `${head}<div class="box"><p class="bad" role="alert">This payment page has expired. Nothing was charged. Go back to the shop's page to start again.</p>${back}</div>`, status);
		}
		if (session.status === 'complete') {
			const done = session.success_url.replace('{CHECKOUT_SESSION_ID}', session.id);
			return page('Paid', `${head}<div class="box"><p class="good" role="status">This payment is complete.</p><p><a href="${escapeHtml(done)}">Back to the shop's page</a></p></div>`, status);
		}
		const note = message ? `<p class="${message.tone}" role="${message.tone === 'bad' ? 'alert' : 'status'}">${escapeHtml(message.text)}</p>` : '';
		return page(
			'Pay',
			`${head}<div class="box">${note}
<form method="post" action="/pay/${escapeHtml(session.id)}">
<label for="card">Card number</label><input id="card" name="card" inputmode="numeric" autocomplete="off" placeholder="4242 4242 4242 4242" required>
<label for="expiry">Expiry (MM / YY)</label><input id="expiry" name="expiry" autocomplete="off" placeholder="12 / 34">
<label for="cvc">Security code</label><input id="cvc" name="cvc" inputmode="numeric" autocomplete="off" placeholder="123">
<button type="submit">Pay ${escapeHtml(amount)}</button>
</form>${back}</div>
<div class="box small"><p><strong>Test cards</strong> (any expiry and code):</p>
<p><code>4242 4242 4242 4242</code> — payment succeeds<br><code>4000 0000 0000 0002</code> — card is declined</p>
<p>This page is a local test service. It never charges a card; real card numbers are refused.</p></div>`,
			status
		);
	}

	function pay(session: Session, card: string) {
		const digits = card.replace(/[\s-]/g, '');
		if (session.status !== 'open') return { page: checkoutPage(session, null, 409) };
		if (digits === SUCCEEDING_CARD) {
			const intent = intentFor(session);
			intent.status = 'succeeded';
			intent.amount_received = intent.amount;
			intent.last_payment_error = null;
			intent.latest_charge = makeId('ch_test_');
			session.status = 'complete';
			session.payment_status = 'paid';
			session.url = null;
			save();
			log(`[payment fake] ${session.id} paid ${shownAmount(session.amount_total, session.currency)}`);
			dispatch(session.id, [event('checkout.session.completed', session), event('payment_intent.succeeded', intent)]);
			return { redirect: session.success_url.replace('{CHECKOUT_SESSION_ID}', session.id) };
		}
		if (digits === DECLINED_CARD) {
			const intent = intentFor(session);
			intent.last_payment_error = { type: 'card_error', code: 'card_declined', decline_code: 'generic_decline', message: 'Your card was declined.' };
			save();
			dispatch(session.id, [event('payment_intent.payment_failed', intent)]);
			return { page: checkoutPage(session, { tone: 'bad', text: 'Your card was declined. No money was taken. Try another card, or go back to the shop\'s page.' }, 402) };
		}
		return { page: checkoutPage(session, { tone: 'bad', text: 'This test page accepts only the test card numbers listed below. Nothing was charged.' }, 400) };
	}

	const readBody = (req: http.IncomingMessage) =>
		new Promise<string>((resolve, reject) => {
			let size = 0;
			const chunks: Buffer[] = [];
			req.on('data', (chunk: Buffer) => {
				size += chunk.length;
				if (size > 1024 * 1024) reject(new ApiError(413, 'Request too large.'));
				else chunks.push(chunk);
			});
			req.on('end', () => resolve(Buffer.concat(chunks).toString('utf8')));
			req.on('error', reject);
		});

	const sendJson = (res: http.ServerResponse, status: number, body: unknown) => {
		res.writeHead(status, { 'content-type': 'application/json', 'request-id': makeId('req_'), 'stripe-version': API_VERSION });
		res.end(JSON.stringify(body));
	};
	const sendHtml = (res: http.ServerResponse, { status, html }: { status: number; html: string }) => {
		res.writeHead(status, { 'content-type': 'text/html; charset=utf-8', 'cache-control': 'no-store', 'x-robots-tag': 'noindex' });
		res.end(html);
	};

	async function handle(req: http.IncomingMessage, res: http.ServerResponse) {
		const url = new URL(req.url ?? '/', baseUrl);
		const method = req.method ?? 'GET';
		const body = method === 'POST' ? await readBody(req) : '';
		if (url.pathname.startsWith('/v1/')) {
			try {
				checkAuth(req);
				const key = req.headers['idempotency-key'];
				const cacheKey = typeof key === 'string' && method === 'POST' ? `${url.pathname} ${key}` : null;
				if (cacheKey && state.idempotency[cacheKey]) {
					const cached = state.idempotency[cacheKey];
					return sendJson(res, cached.status, cached.body);
				}
				const params = method === 'POST' ? parseStripeForm(body) : Object.fromEntries(url.searchParams);
				const result = api(method, url.pathname, params);
				if (cacheKey) (state.idempotency[cacheKey] = { status: 200, body: result }), save();
				return sendJson(res, 200, result);
			} catch (e) {
				if (e instanceof ApiError) {
					return sendJson(res, e.status, { error: { type: e.status === 401 ? 'invalid_request_error' : 'invalid_request_error', message: e.message, ...e.extra } });
				}
				throw e;
			}
		}
		let m: RegExpMatchArray | null;
		if ((m = url.pathname.match(/^\/pay\/([\w]+)$/))) {
			const session = state.sessions[m[1]];
			if (!session) return sendHtml(res, page('Not found', '<div class="box"><p class="bad" role="alert">There is no payment at this address.</p></div>', 404));
			expireIfDue(session);
			if (method === 'GET') return sendHtml(res, checkoutPage(session));
			if (method === 'POST') {
				const card = new URLSearchParams(body).get('card') ?? '';
				const outcome = pay(session, card);
				if (outcome.redirect) {
					res.writeHead(303, { location: outcome.redirect });
					return res.end();
				}
				return sendHtml(res, outcome.page!);
			}
		}
		if (url.pathname === '/' || url.pathname === '/__health') {
			if (url.pathname === '/') return sendHtml(res, page('Local payment service', `<div class="box"><h1>Local payment service</h1><p>Answers Mendwise's Stripe calls during development and tests. Nothing here touches real money.</p></div>`));
			return sendJson(res, 200, { ok: true, fake: true, webhookUrl });
		}
		if (url.pathname === '/__control' && method === 'POST') {
			const input = (body ? JSON.parse(body) : {}) as Partial<Plan> & { session?: string; webhookUrl?: string };
			const plan: Partial<Plan> = {};
			if (input.duplicate !== undefined) plan.duplicate = Math.min(Math.max(1, Math.floor(Number(input.duplicate))), 20);
			if (input.delayMs !== undefined) plan.delayMs = Math.min(Math.max(0, Math.floor(Number(input.delayMs))), 120_000);
			if (input.reverseOrder !== undefined) plan.reverseOrder = Boolean(input.reverseOrder);
			if (input.webhookUrl) webhookUrl = input.webhookUrl;
			if (Object.keys(plan).length) {
				if (input.session) sessionPlans.set(input.session, plan);
				else nextPlan = plan;
			}
			return sendJson(res, 200, { ok: true, session: input.session ?? null, plan, webhookUrl });
		}
		if (url.pathname === '/__deliveries' && method === 'GET') {
			const session = url.searchParams.get('session');
			return sendJson(res, 200, { deliveries: session ? deliveries.filter((d) => d.session === session) : deliveries });
		}
		return sendJson(res, 404, { error: { type: 'invalid_request_error', message: `Unrecognized request URL (${method}: ${url.pathname}).` } });
	}

	const server = http.createServer((req, res) => {
		handle(req, res).catch((e) => {
			log(`[payment fake] ${req.method} ${req.url} failed: ${e instanceof Error ? e.stack : e}`);
			if (!res.headersSent) sendJson(res, e instanceof ApiError ? e.status : 500, { error: { type: 'api_error', message: e instanceof Error ? e.message : String(e) } });
			else res.end();
		});
	});
	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(options.port ?? 0, host, () => resolve());
	});
	const port = (server.address() as AddressInfo).port;
	baseUrl = `http://${host}:${port}`;
	return {
		url: baseUrl,
		port,
		stop: () =>
			new Promise<void>((resolve) => {
				for (const timer of timers) clearTimeout(timer);
				timers.clear();
				server.closeAllConnections();
				server.close(() => resolve());
			})
	};
}

async function main() {
	const secret = process.env.STRIPE_WEBHOOK_SECRET;
	if (!secret) throw new Error('STRIPE_WEBHOOK_SECRET is not set: the fake signs webhooks with it.');
	const dataFile = path.resolve(argument('data') ?? process.env.PAYMENT_FAKE_DATA ?? path.join(process.env.MENDWISE_DATA_DIR ?? '.data', 'payment-fake.json'));
	const fake = await startPaymentFake({
		port: Number(argument('port') ?? process.env.PAYMENT_FAKE_PORT ?? 2590),
		dataFile,
		webhookUrl: process.env.WEBHOOK_URL ?? null,
		webhookSecret: secret,
		apiKey: process.env.STRIPE_SECRET_KEY ?? null,
		log: (line) => console.log(line)
	});
	announce([
		'LOCAL PAYMENT FAKE — Stripe test stand-in, no real money moves',
		`API ${fake.url}/v1    checkout pages ${fake.url}/pay/…`,
		`Webhooks to ${process.env.WEBHOOK_URL ?? '(none: set WEBHOOK_URL)'}`,
		'Test cards: 4242 4242 4242 4242 succeeds, 4000 0000 0000 0002 is declined.'
	]);
	stopOnSignal(() => fake.stop());
}

runAsMain(import.meta.url, 'payment fake', main);
