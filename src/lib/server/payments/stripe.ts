// The one Stripe client of this process. With STRIPE_API_HOST/PORT/PROTOCOL set it talks to the
// local fake that `npm start` and `npm test` run; without them the same calls go to Stripe.
import Stripe from 'stripe';
import { UserError } from '../errors';

/** Online payment cannot be taken right now; the message is for the customer or the desk. */
export class PaymentsUnavailable extends UserError {}

export const FAKE_KEY = 'sk_test_local_fake';

let client: Stripe | null = null;
let warned = false;

export function configured(): boolean {
	return Boolean(process.env.STRIPE_SECRET_KEY?.trim());
}

/** Where API calls go, for logs and the manager page: "Stripe" or the fake's address. */
export function describeApi(): string {
	const host = process.env.STRIPE_API_HOST?.trim();
	if (!host) return 'Stripe';
	const protocol = process.env.STRIPE_API_PROTOCOL?.trim() || 'https';
	const port = process.env.STRIPE_API_PORT?.trim();
	return `${protocol}://${host}${port ? `:${port}` : ''}`;
}

/** True when payments go to the local fake: pages then say no real money moves. */
export function isLocalFake(): boolean {
	return process.env.STRIPE_SECRET_KEY?.trim() === FAKE_KEY || Boolean(process.env.STRIPE_API_HOST?.trim());
}

export function stripe(): Stripe {
	if (client) return client;
	const key = process.env.STRIPE_SECRET_KEY?.trim();
	if (!key) {
		if (!warned) {
			warned = true;
			console.warn('[payments] STRIPE_SECRET_KEY is not set: customers cannot pay online. See docs/payments.md.');
		}
		throw new PaymentsUnavailable('Online payment is not set up at this shop yet. Please pay at the counter.');
	}
	const host = process.env.STRIPE_API_HOST?.trim();
	const port = process.env.STRIPE_API_PORT?.trim();
	const protocol = process.env.STRIPE_API_PROTOCOL?.trim();
	client = new Stripe(key, {
		...(host ? { host } : {}),
		...(port ? { port: Number(port) } : {}),
		...(protocol === 'http' || protocol === 'https' ? { protocol } : {}),
		maxNetworkRetries: 0,
		telemetry: false,
		timeout: 20_000
	});
	if (isLocalFake()) console.log(`[payments] using the local payment fake at ${describeApi()} — no real money moves`);
	return client;
}

export function webhookSecret(): string | null {
	return process.env.STRIPE_WEBHOOK_SECRET?.trim() || null;
}

/** Stripe's SDK errors in words a customer or the desk can act on. */
export function explain(e: unknown, customer: boolean): Error {
	if (e instanceof PaymentsUnavailable) return e;
	if (e instanceof Stripe.errors.StripeConnectionError) {
		console.error(`[payments] cannot reach ${describeApi()}: ${e.message}`);
		return new PaymentsUnavailable(
			customer
				? 'The payment service is not answering right now. Nothing was charged and your approval is saved. Please try again in a few minutes, or pay at the shop.'
				: 'The payment service is not answering right now. Nothing was changed; try again in a few minutes.'
		);
	}
	if (e instanceof Stripe.errors.StripeError) {
		console.error(`[payments] ${describeApi()} refused a request: ${e.type} ${e.code ?? ''} ${e.message}`);
		return new PaymentsUnavailable(
			customer
				? 'The payment service could not start this payment. Nothing was charged; please try again later or pay at the shop.'
				: `The payment service refused: ${e.message}`
		);
	}
	return e instanceof Error ? e : new Error(String(e));
}
