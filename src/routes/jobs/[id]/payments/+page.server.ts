import { error, fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { FRONT_DESK, MANAGERS, STAFF } from '$lib/roles';
import { attempt } from '$lib/server/actions';
import { requireRole } from '$lib/server/auth/guard';
import { echo, parseForm } from '$lib/server/forms';
import * as jobs from '$lib/server/jobs';
import * as payments from '$lib/server/payments';

// Everyone on the job sees what is paid and owed; the desk takes payments and sends the balance
// link; only managers and owners give money back.
export const load: PageServerLoad = async ({ params }) => {
	const user = requireRole(STAFF);
	const job = await jobs.get(user.shopId, params.id);
	if (!job) error(404, 'No such job in your shop.');
	const ledger = await payments.listForJob(user.shopId, job.id);
	const desk = FRONT_DESK.includes(user.role);
	return {
		job: { id: job.id, number: job.number, status: job.status },
		summary: ledger.summary,
		approved: ledger.approved,
		// Technicians see the summary only: who paid how, and refunds, are desk business.
		payments: desk ? ledger.payments : [],
		refunds: desk ? ledger.refunds : [],
		canRecord: desk,
		canSendLink: desk,
		canRefund: MANAGERS.includes(user.role),
		online: payments.configured()
	};
};

export const actions: Actions = {
	recordPayment: async ({ request, params }) => {
		const user = requireRole(FRONT_DESK);
		const form = await request.formData();
		const parsed = parseForm(payments.counterSchema, form);
		if (!parsed.ok) return fail(400, { action: 'recordPayment', message: Object.values(parsed.errors)[0], errors: parsed.errors, ...echo(form) });
		const result = await attempt(() => payments.recordCounterPayment(user, params.id, parsed.data), { action: 'recordPayment', ...echo(form) });
		if (!result.ok) return result.failure;
		return { action: 'recordPayment', done: `${result.value.label} payment recorded.${result.value.receipt ? ' A receipt was e-mailed to the customer.' : ''}` };
	},
	sendBalanceLink: async ({ params, url }) => {
		const user = requireRole(FRONT_DESK);
		const result = await attempt(() => payments.sendBalanceLink(user, params.id, url.origin), { action: 'sendBalanceLink' });
		if (!result.ok) return result.failure;
		return { action: 'sendBalanceLink', done: `A link to pay ${result.value.balance} was e-mailed to ${result.value.to}.` };
	},
	refund: async ({ request, params }) => {
		const user = requireRole(MANAGERS);
		const form = await request.formData();
		const parsed = parseForm(payments.refundSchema, form);
		if (!parsed.ok) return fail(400, { action: 'refund', message: Object.values(parsed.errors)[0], errors: parsed.errors, ...echo(form) });
		const { paymentId, ...input } = parsed.data;
		const result = await attempt(() => payments.refund(user, paymentId, input, params.id), { action: 'refund', ...echo(form) });
		if (!result.ok) return result.failure;
		return { action: 'refund', done: `Refund of ${result.value.refund.amount} ${result.value.refund.currency} recorded.${result.value.notified ? ' The customer was e-mailed.' : ''}` };
	}
};
