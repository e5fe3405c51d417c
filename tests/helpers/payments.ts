// Paying through the local payment fake (scripts/payment-fake.ts) from tests.
//
// `npm test` starts one fake for the run and gives its address to vitest as PAYMENT_FAKE_URL and
// the webhook secret as STRIPE_WEBHOOK_SECRET. Test files share it: shape webhooks only for your
// own checkout session (`control({ session, … })`).
//
//   approvedQuote(shop, { email?, draft? })  a sent quote approved by the customer through the link
//   startPayment(client, token)              the pay action → the fake's checkout page address
//   payAt(checkoutUrl, card)                 posts the card on the fake's page, like the browser
//   control({ session?, duplicate?, delayMs?, reverseOrder? })
//   deliveries(session)                      what the fake sent for a session and how the app answered
//   signedDelivery(event)                    a webhook body and a Stripe-Signature made with the run's secret
//   postWebhook(body, signature, base?)      posts it to the app
//   until(what, check, timeoutMs?)           polls until check() gives a truthy value
import { randomBytes } from 'node:crypto';
import Stripe from 'stripe';
import { Customer } from '../../src/lib/server/db/models';
import { BASE_URL, Client } from './client';
import type { ShopFixture } from './fixtures';
import { sampleDraft, sentQuote } from './quotes';

export const SUCCEEDS = '4242 4242 4242 4242';
export const DECLINED = '4000 0000 0000 0002';

export function fakeUrl(): string {
	const url = process.env.PAYMENT_FAKE_URL;
	if (!url) throw new Error('PAYMENT_FAKE_URL is not set: run the tests with `npm test`, which starts the local payment fake.');
	return url.replace(/\/+$/, '');
}

export function webhookSecret(): string {
	const secret = process.env.STRIPE_WEBHOOK_SECRET;
	if (!secret) throw new Error('STRIPE_WEBHOOK_SECRET is not set: run the tests with `npm test`.');
	return secret;
}

export async function until<T>(what: string, check: () => Promise<T | false | null | undefined>, timeoutMs = 20_000): Promise<T> {
	const deadline = Date.now() + timeoutMs;
	for (;;) {
		const value = await check();
		if (value) return value;
		if (Date.now() > deadline) throw new Error(`timed out waiting until ${what}`);
		await new Promise((r) => setTimeout(r, 100));
	}
}

/** A quote sent and approved (option 0, the repair with a special-order part) by the customer. */
export async function approvedQuote(shop: ShopFixture, options: { email?: string | null; draft?: ReturnType<typeof sampleDraft>; base?: string } = {}) {
	const sent = await sentQuote(shop, options.draft);
	if (options.email) await Customer.update({ email: options.email }, { where: { id: sent.customer.id, shopId: shop.id } });
	const customer = new Client(options.base ?? BASE_URL);
	const reply = await customer.form(`/q/${sent.token}?/approve`, { optionIndex: '0', signerName: 'Tamsin Yarrow', consent: 'yes' });
	if (reply.status !== 303) throw new Error(`approval failed with ${reply.status}`);
	return { ...sent, customer, option: sent.result.options[0] };
}

/** The pay action as a browser without JavaScript posts it; the page then links to the fake. */
export async function startPayment(client: Client, token: string) {
	const reply = await client.form(`/q/${token}?/pay`, {});
	const url = reply.text.match(/href="(https?:\/\/[^"]+\/pay\/(cs_test_\w+))"/);
	return { reply, checkoutUrl: url ? url[1].replace(/&amp;/g, '&') : null, session: url ? url[2] : null };
}

export async function payAt(checkoutUrl: string, card: string) {
	const res = await fetch(checkoutUrl, {
		method: 'POST',
		redirect: 'manual',
		body: new URLSearchParams({ card, expiry: '12 / 34', cvc: '123' }).toString(),
		headers: { 'content-type': 'application/x-www-form-urlencoded' }
	});
	return { status: res.status, location: res.headers.get('location'), text: await res.text() };
}

export async function control(plan: { session?: string; duplicate?: number; delayMs?: number; reverseOrder?: boolean; webhookUrl?: string }, base = fakeUrl()) {
	const res = await fetch(`${base}/__control`, { method: 'POST', body: JSON.stringify(plan), headers: { 'content-type': 'application/json' } });
	if (!res.ok) throw new Error(`the fake refused the control call: ${res.status}`);
}

export interface FakeDelivery {
	eventId: string;
	type: string;
	session: string | null;
	attempt: number;
	status: number | null;
}

export async function deliveries(session: string, base = fakeUrl()): Promise<FakeDelivery[]> {
	const res = await fetch(`${base}/__deliveries?session=${encodeURIComponent(session)}`);
	return ((await res.json()) as { deliveries: FakeDelivery[] }).deliveries;
}

/** A Stripe API object from the fake, read with the run's key (as the app's SDK reads it). */
export async function fakeObject<T = Record<string, unknown>>(path: string, base = fakeUrl()): Promise<T> {
	const res = await fetch(`${base}/v1/${path}`, { headers: { authorization: `Bearer ${process.env.STRIPE_SECRET_KEY ?? 'sk_test_local_fake'}` } });
	if (!res.ok) throw new Error(`${path} answered ${res.status}`);
	return (await res.json()) as T;
}

export const eventId = () => `evt_test_${randomBytes(12).toString('hex')}`;

/** An event as Stripe sends it, signed with the run's webhook secret. */
export function signedDelivery(event: { id?: string; type: string; object: Record<string, unknown> }, secret = webhookSecret()) {
	const body = JSON.stringify({
		id: event.id ?? eventId(),
		object: 'event',
		api_version: Stripe.API_VERSION,
		created: Math.floor(Date.now() / 1000),
		data: { object: event.object },
		livemode: false,
		pending_webhooks: 1,
		request: { id: null, idempotency_key: null },
		type: event.type
	});
	return { body, signature: Stripe.webhooks.generateTestHeaderString({ payload: body, secret }) };
}

export async function postWebhook(body: string, signature: string | null, base = BASE_URL) {
	const res = await fetch(`${base}/api/payments/webhook`, {
		method: 'POST',
		body,
		headers: { 'content-type': 'application/json', ...(signature === null ? {} : { 'stripe-signature': signature }) }
	});
	const text = await res.text();
	return { status: res.status, body: text ? (JSON.parse(text) as { received?: boolean; duplicate?: boolean; flagged?: boolean; message?: string }) : {} };
}

/** A completed checkout session as Stripe describes it in checkout.session.completed. */
export function completedSession(session: string, amountTotal: number, currency: string, paymentIntent: string, metadata: Record<string, string> = {}) {
	return {
		id: session,
		object: 'checkout.session',
		amount_subtotal: amountTotal,
		amount_total: amountTotal,
		currency: currency.toLowerCase(),
		livemode: false,
		metadata,
		mode: 'payment',
		payment_intent: paymentIntent,
		payment_status: 'paid',
		status: 'complete'
	};
}
