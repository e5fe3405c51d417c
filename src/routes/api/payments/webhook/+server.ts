import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import * as payments from '$lib/server/payments';

// Public on purpose: Stripe calls it. The signature over the raw body, checked with the
// endpoint's secret, is the only credential; nothing is read or changed before it checks out.
const MAX_BYTES = 512 * 1024;

export const POST: RequestHandler = async ({ request }) => {
	const length = Number(request.headers.get('content-length') ?? 0);
	if (length > MAX_BYTES) return json({ message: 'The event is too large.', issues: [{ path: 'body', message: `at most ${MAX_BYTES} bytes` }] }, { status: 413 });
	const raw = await request.text();
	if (raw.length > MAX_BYTES) return json({ message: 'The event is too large.', issues: [{ path: 'body', message: `at most ${MAX_BYTES} bytes` }] }, { status: 413 });
	try {
		const result = await payments.handleWebhook(raw, request.headers.get('stripe-signature'));
		return json({ received: true, duplicate: result.duplicate, flagged: result.flagged });
	} catch (e) {
		if (e instanceof payments.WebhookRejected) {
			return json({ message: e.message, issues: [{ path: 'stripe-signature', message: e.message }] }, { status: 400 });
		}
		if (e instanceof payments.WebhookNotConfigured || e instanceof payments.WebhookRetryLater) {
			console.warn(`[payments] webhook answered 503: ${e.message}`);
			return json({ message: e.message, issues: [] }, { status: 503, headers: { 'retry-after': '5' } });
		}
		throw e;
	}
};
