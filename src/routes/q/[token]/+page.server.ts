import { error, fail, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';
import { attempt } from '$lib/server/actions';
import { customerView } from '$lib/server/customer-view';
import { parseForm } from '$lib/server/forms';
import { plainNumber } from '$lib/server/validators';
import * as payments from '$lib/server/payments';
import { Quote, type Approval } from '$lib/server/db/models';
import * as quoteMail from '$lib/server/quote-mail';
import * as quotes from '$lib/server/quotes';

// Public on purpose: the token in the address is the customer's credential. Everything shown
// is built from that token's quote alone.

const approveSchema = z.object({
	optionIndex: z.preprocess(plainNumber, z.coerce.number({ error: 'Choose the option you approve.' }).int().min(0).max(50)),
	signerName: z
		.string({ error: 'Type your full name as your signature.' })
		.trim()
		.min(3, 'Type your full name as your signature.')
		.max(120, 'Keep the name under 120 characters.'),
	consent: z.literal('yes', { error: 'Tick the box to confirm you authorise the work.' })
});
const declineSchema = z.object({ reason: z.string().trim().max(1000, 'Keep the reason under 1,000 characters.').optional().transform((v) => v ?? '') });

/** The answer is recorded; the e-mails about it are queued (and retried) by the outbox. */
async function notify(approval: Approval, url: URL, token: string) {
	const quote = await Quote.findByPk(approval.quoteId, { attributes: ['jobId'] });
	await quoteMail.decisionMade(approval.shopId, approval.id, { customer: `${url.origin}/q/${token}`, job: `${url.origin}/jobs/${quote!.jobId}` });
}

async function find(token: string) {
	const found = await quotes.byToken(token);
	if (!found) error(404, 'This estimate link is not valid. Check the address in your e-mail.');
	return found;
}

export const load: PageServerLoad = async ({ params, setHeaders, url }) => {
	setHeaders({ 'cache-control': 'private, no-store', 'x-robots-tag': 'noindex' });
	const found = await find(params.token);
	const [view, payment] = await Promise.all([customerView(found), payments.customerState(found, url.searchParams)]);
	return { ...view, payment };
};

export const actions: Actions = {
	approve: async ({ params, request, getClientAddress, url }) => {
		const form = await request.formData();
		const parsed = parseForm(approveSchema, form);
		const echoed = { signerName: String(form.get('signerName') ?? ''), optionIndex: String(form.get('optionIndex') ?? '') };
		if (!parsed.ok) return fail(400, { action: 'approve', message: Object.values(parsed.errors)[0], errors: parsed.errors, ...echoed });
		const result = await attempt(
			() =>
				quotes.decide(params.token, {
					decision: 'approved',
					optionIndex: parsed.data.optionIndex,
					signerName: parsed.data.signerName,
					reason: '',
					clientAddress: getClientAddress(),
					userAgent: request.headers.get('user-agent') ?? ''
				}),
			{ action: 'approve', ...echoed }
		);
		if (!result.ok) return result.failure;
		if (result.value.created) await notify(result.value.approval, url, params.token);
		redirect(303, `/q/${params.token}`);
	},
	decline: async ({ params, request, getClientAddress, url }) => {
		const parsed = parseForm(declineSchema, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'decline', message: parsed.errors.reason });
		const result = await attempt(
			() =>
				quotes.decide(params.token, {
					decision: 'declined',
					optionIndex: null,
					signerName: null,
					reason: parsed.data.reason,
					clientAddress: getClientAddress(),
					userAgent: request.headers.get('user-agent') ?? ''
				}),
			{ action: 'decline' }
		);
		if (!result.ok) return result.failure;
		if (result.value.created) await notify(result.value.approval, url, params.token);
		redirect(303, `/q/${params.token}`);
	},
	// The payment page is on the payment service's site; the page navigates there (the CSP's
	// form-action keeps form posts themselves on this site).
	pay: async ({ params, url }) => {
		const result = await attempt(() => payments.startCheckout(params.token, url.origin), { action: 'pay' });
		if (!result.ok) return result.failure;
		return { action: 'pay', checkoutUrl: result.value };
	}
};
