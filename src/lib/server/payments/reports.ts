// Lists for the job's payments page and the manager's payments page, and the CSV export.
import { stringify } from 'csv-stringify/sync';
import { Op, QueryTypes, type WhereOptions } from 'sequelize';
import { z } from 'zod';
import { Dec } from '../../pricing/money';
import { db } from '../db';
import { User } from '../db/models';
import { PAYMENT_KINDS, PAYMENT_METHODS, PAYMENT_STATUSES, Payment, PaymentEvent, Refund, type PaymentStatus } from '../db/payment-models';
import { UserError } from '../errors';
import { isUuid } from '../validators';
import { fixed, money, summaryFor, summaryJson } from './ledger';
import { METHOD_LABELS } from './mail';

export const STATUS_LABELS = { pending: 'Waiting for payment', paid: 'Paid', failed: 'Not paid', refunded: 'Refunded', partially_refunded: 'Partly refunded' } as const;
export const KIND_LABELS = { deposit: 'Deposit', balance: 'Balance' } as const;

const blank = (v: unknown) => (v === '' || v === null ? undefined : v);
const day = z.preprocess(blank, z.iso.date({ error: 'Enter dates as YYYY-MM-DD.' }).optional());

export const filterSchema = z.object({
	status: z.preprocess(blank, z.enum(PAYMENT_STATUSES, { error: 'Choose a status from the list.' }).optional()),
	kind: z.preprocess(blank, z.enum(PAYMENT_KINDS, { error: 'Choose deposit or balance.' }).optional()),
	method: z.preprocess(blank, z.enum(PAYMENT_METHODS, { error: 'Choose a method from the list.' }).optional()),
	from: day,
	to: day,
	job: z.preprocess(blank, z.coerce.number({ error: 'A job number is a whole number.' }).int('A job number is a whole number.').min(1).max(2_000_000_000).optional())
});
export type Filters = z.infer<typeof filterSchema>;

export function parseFilters(query: URLSearchParams) {
	const raw = Object.fromEntries(['status', 'kind', 'method', 'from', 'to', 'job'].map((k) => [k, query.get(k) ?? undefined]));
	return filterSchema.safeParse(raw);
}

export interface PaymentRow {
	id: string;
	jobId: string;
	jobNumber: number;
	customerName: string;
	kind: keyof typeof KIND_LABELS;
	method: keyof typeof METHOD_LABELS;
	status: keyof typeof STATUS_LABELS;
	amount: string;
	refunded: string;
	currency: string;
	shown: string;
	reference: string;
	checkoutSessionId: string | null;
	paymentIntentId: string | null;
	lastError: string | null;
	createdAt: string;
	paidAt: string | null;
}

interface RawPayment {
	id: string;
	job_id: string;
	job_number: number;
	customer_name: string;
	kind: PaymentRow['kind'];
	method: PaymentRow['method'];
	status: PaymentRow['status'];
	amount: string;
	refunded_amount: string;
	currency: string;
	reference: string;
	checkout_session_id: string | null;
	payment_intent_id: string | null;
	last_error: string | null;
	created_at: Date;
	paid_at: Date | null;
}

function row(r: RawPayment): PaymentRow {
	return {
		id: r.id,
		jobId: r.job_id,
		jobNumber: r.job_number,
		customerName: r.customer_name,
		kind: r.kind,
		method: r.method,
		status: r.status,
		amount: fixed(r.amount, r.currency),
		refunded: fixed(r.refunded_amount, r.currency),
		currency: r.currency,
		shown: money(r.amount, r.currency),
		reference: r.reference,
		checkoutSessionId: r.checkout_session_id,
		paymentIntentId: r.payment_intent_id,
		lastError: r.last_error,
		createdAt: new Date(r.created_at).toISOString(),
		paidAt: r.paid_at ? new Date(r.paid_at).toISOString() : null
	};
}

const LIMIT = 1000;

/** The shop's payments, newest first, narrowed by the filters. */
export async function listForShop(shopId: string, filters: Filters = {}, limit = LIMIT): Promise<PaymentRow[]> {
	const clauses = ['p.shop_id = :shopId'];
	const replacements: Record<string, unknown> = { shopId, limit };
	for (const key of ['status', 'kind', 'method'] as const) {
		if (filters[key]) {
			clauses.push(`p.${key} = :${key}`);
			replacements[key] = filters[key];
		}
	}
	if (filters.from) (clauses.push('p.created_at >= CAST(:from AS date)'), (replacements.from = filters.from));
	if (filters.to) (clauses.push("p.created_at < CAST(:to AS date) + interval '1 day'"), (replacements.to = filters.to));
	if (filters.job) (clauses.push('j.number = :job'), (replacements.job = filters.job));
	const rows = await db().query<RawPayment>(
		`SELECT p.id, p.job_id, j.number AS job_number, c.name AS customer_name, p.kind, p.method, p.status, p.amount,
			p.refunded_amount, p.currency, p.reference, p.checkout_session_id, p.payment_intent_id, p.last_error, p.created_at, p.paid_at
		 FROM payments p
		 JOIN jobs j ON j.id = p.job_id AND j.shop_id = p.shop_id
		 JOIN customers c ON c.id = j.customer_id AND c.shop_id = p.shop_id
		 WHERE ${clauses.join(' AND ')}
		 ORDER BY p.created_at DESC
		 LIMIT :limit`,
		{ replacements, type: QueryTypes.SELECT }
	);
	return rows.map(row);
}

/** Refunds of the shop, newest first, within the date filters. */
export async function refundsForShop(shopId: string, filters: Filters = {}) {
	const where: WhereOptions = { shopId };
	const range: Record<symbol, Date> = {};
	if (filters.from) range[Op.gte] = new Date(`${filters.from}T00:00:00Z`);
	if (filters.to) range[Op.lt] = new Date(new Date(`${filters.to}T00:00:00Z`).getTime() + 86_400_000);
	if (filters.from || filters.to) Object.assign(where, { createdAt: range });
	const refunds = await Refund.findAll({ where, order: [['createdAt', 'DESC']], limit: LIMIT });
	return describeRefunds(shopId, refunds);
}

async function describeRefunds(shopId: string, refunds: Refund[]) {
	const userIds = [...new Set(refunds.map((r) => r.createdBy).filter((v): v is string => Boolean(v)))];
	const paymentIds = [...new Set(refunds.map((r) => r.paymentId))];
	const [users, payments] = await Promise.all([
		userIds.length ? User.findAll({ where: { shopId, id: userIds }, attributes: ['id', 'name'] }) : [],
		paymentIds.length ? Payment.findAll({ where: { shopId, id: paymentIds }, attributes: ['id', 'jobId', 'kind'] }) : []
	]);
	const names = new Map(users.map((u) => [u.id, u.name]));
	const byId = new Map(payments.map((p) => [p.id, p]));
	return refunds.map((r) => ({
		id: r.id,
		paymentId: r.paymentId,
		jobId: byId.get(r.paymentId)?.jobId ?? null,
		kind: byId.get(r.paymentId)?.kind ?? null,
		amount: fixed(r.amount, r.currency),
		shown: money(r.amount, r.currency),
		currency: r.currency,
		reason: r.reason,
		status: r.status,
		stripeRefundId: r.stripeRefundId,
		by: r.createdBy ? (names.get(r.createdBy) ?? '') : '',
		at: r.createdAt.toISOString()
	}));
}

/** Events the manager must look at: amount mismatches, unknown checkouts, failed refunds. */
export async function flaggedForShop(shopId: string, { includeResolved = false } = {}) {
	const events = await PaymentEvent.findAll({
		where: { shopId, flagged: true, ...(includeResolved ? {} : { resolvedAt: null }) },
		attributes: ['id', 'stripeEventId', 'type', 'paymentId', 'flagReason', 'receivedAt', 'resolvedAt'],
		order: [['receivedAt', 'DESC']],
		limit: 200
	});
	const paymentIds = [...new Set(events.map((e) => e.paymentId).filter((v): v is string => Boolean(v)))];
	const payments = paymentIds.length ? await Payment.findAll({ where: { shopId, id: paymentIds }, attributes: ['id', 'jobId'] }) : [];
	const jobOf = new Map(payments.map((p) => [p.id, p.jobId]));
	return events.map((e) => ({
		id: e.id,
		eventId: e.stripeEventId,
		type: e.type,
		paymentId: e.paymentId,
		jobId: e.paymentId ? (jobOf.get(e.paymentId) ?? null) : null,
		reason: e.flagReason ?? '',
		at: e.receivedAt.toISOString(),
		resolvedAt: e.resolvedAt?.toISOString() ?? null
	}));
}

export async function resolveFlag(actor: { id: string; shopId: string }, eventId: string) {
	if (!isUuid(eventId)) throw new UserError('No such flagged event in your shop.');
	const [count] = await PaymentEvent.update({ resolvedAt: new Date(), resolvedBy: actor.id }, { where: { id: eventId, shopId: actor.shopId, flagged: true, resolvedAt: null } });
	if (count === 0) throw new UserError('No such open flagged event in your shop.');
}

/** Everything the job's payments page shows. */
export async function listForJob(shopId: string, jobId: string) {
	const { terms, payments, summary } = await summaryFor(shopId, jobId);
	const refunds = payments.length ? await Refund.findAll({ where: { shopId, paymentId: payments.map((p) => p.id) }, order: [['createdAt', 'ASC']] }) : [];
	return {
		summary: summaryJson(summary),
		approved: terms.approval?.decision === 'approved',
		payments: payments.map((p) => ({
			id: p.id,
			kind: p.kind,
			method: p.method,
			status: p.status as PaymentStatus,
			amount: fixed(p.amount, p.currency),
			shown: money(p.amount, p.currency),
			refundable: fixed(new Dec(p.amount).minus(p.refundedAmount), p.currency),
			refunded: money(p.refundedAmount, p.currency),
			reference: p.reference || p.paymentIntentId || '',
			lastError: p.lastError,
			createdAt: p.createdAt.toISOString(),
			paidAt: p.paidAt?.toISOString() ?? null
		})),
		refunds: await describeRefunds(shopId, refunds)
	};
}

const FORMULA_START = /^[=+\-@\t\r]/;
const cell = (text: string) => (FORMULA_START.test(text) ? `'${text}` : text);

/** The filtered payments as CSV (UTF-8 with BOM, CRLF, for spreadsheets). */
export async function exportCsv(shopId: string, filters: Filters): Promise<string> {
	const rows = await listForShop(shopId, filters, 50_000);
	const header = ['Created', 'Job', 'Customer', 'Kind', 'Method', 'Status', 'Amount', 'Refunded', 'Currency', 'Reference', 'Paid at', 'Checkout session', 'Payment intent'];
	const records = rows.map((r) =>
		[r.createdAt, String(r.jobNumber), r.customerName, KIND_LABELS[r.kind], METHOD_LABELS[r.method], STATUS_LABELS[r.status], r.amount, r.refunded, r.currency, r.reference, r.paidAt ?? '', r.checkoutSessionId ?? '', r.paymentIntentId ?? ''].map(cell)
	);
	return '\ufeff' + stringify([header, ...records], { record_delimiter: '\r\n' });
}
