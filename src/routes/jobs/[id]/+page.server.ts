import { error, fail } from '@sveltejs/kit';
import { Decimal } from 'decimal.js';
import { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';
import { formatMoney } from '$lib/pricing/money';
import { BENCH, FRONT_DESK, MANAGERS, STAFF } from '$lib/roles';
import { attempt } from '$lib/server/actions';
import { requireRole } from '$lib/server/auth/guard';
import { QuoteVersion } from '$lib/server/db/models';
import { echo, parseForm } from '$lib/server/forms';
import * as jobs from '$lib/server/jobs';
import * as payments from '$lib/server/payments';
import * as photos from '$lib/server/photos';
import * as readings from '$lib/server/readings';
import * as settings from '$lib/server/settings';
import * as specs from '$lib/server/specs';

const optionalId = z.object({
	id: z.preprocess((v) => (v === '' ? undefined : v), z.uuid({ error: 'Pick one from the list.' }).optional()).transform((v) => v ?? null)
});
const moveSchema = z.object({ to: z.string().max(20) });
const readingId = z.object({ readingId: z.uuid({ error: 'Pick a reading from the list.' }) });

export const load: PageServerLoad = async ({ params }) => {
	const user = requireRole(STAFF);
	const found = await jobs.detail(user.shopId, params.id);
	if (!found) error(404, 'No such job in your shop.');
	const { job, unit, customer, technician } = found;
	const [taken, sheets, sheet, history, techs, pictures, shop, money] = await Promise.all([
		readings.list(user.shopId, job.id),
		specs.list(user.shopId),
		job.specSheetId ? specs.get(user.shopId, job.specSheetId) : null,
		jobs.history(user.shopId, job.id),
		jobs.technicians(user.shopId),
		photos.list(user.shopId, job.id),
		settings.get(user.shopId),
		payments.summaryFor(user.shopId, job.id)
	]);
	// The money terms have already read the job's quote and its answer.
	const { approval, quote } = money.terms;
	const moves = jobs.movesFor(job.status, user.role);
	const sent = quote ? await QuoteVersion.findAll({ where: { shopId: user.shopId, quoteId: quote.id }, attributes: ['number', 'sentAt', 'validUntil'], order: [['number', 'DESC']] }) : [];
	return {
		role: user.role,
		canAssign: FRONT_DESK.includes(user.role),
		canBench: BENCH.includes(user.role) || user.role === 'writer',
		canEditSpecs: MANAGERS.includes(user.role),
		// "Quoted" comes from sending the estimate (jobs.transition refuses it before one went out).
		moves: moves.filter((to) => to !== 'quoted' || sent.length > 0),
		quotedBySending: sent.length === 0 && moves.includes('quoted'),
		job: {
			id: job.id, number: job.number, status: job.status, complaint: job.complaint, diagnosticFee: job.diagnosticFee,
			promisedOn: job.promisedOn, failedComponent: job.failedComponent, findings: job.findings, lockVersion: job.lockVersion,
			specSheetId: job.specSheetId, openedAt: job.createdAt.toISOString(), diagnosticFeeText: formatMoney(new Decimal(job.diagnosticFee), shop.currency)
		},
		unit: { id: unit.id, kind: unit.kind, maker: unit.maker, model: unit.model, serial: unit.serial, runningWatts: unit.runningWatts, voltage: unit.voltage, engineHours: unit.engineHours },
		customer: { id: customer.id, name: customer.name, phone: customer.phone, email: customer.email },
		technician: technician ? { id: technician.id, name: technician.name } : null,
		technicians: techs.map((t) => ({ id: t.id, name: t.name })),
		sheets: sheets.map((s) => ({ id: s.id, name: s.name })),
		sheet: sheet
			? {
					name: sheet.sheet.name,
					notes: sheet.sheet.notes,
					items: sheet.items.map((i) => ({ id: i.id, label: i.label, unit: i.unit, min: i.minValue, max: i.maxValue, running: i.running }))
				}
			: null,
		readings: taken.map((r) => ({
			id: r.id, specItemId: r.specItemId, label: r.label, shown: readings.show(r), result: r.result, min: r.minValue, max: r.maxValue, unit: r.unit, note: r.note,
			at: r.createdAt.toISOString()
		})),
		photos: pictures,
		estimate: {
			started: !!quote,
			versions: sent.map((v) => ({ number: v.number, sentAt: v.sentAt.toISOString(), validUntil: v.validUntil })),
			// The customer's answer and what has been paid against it, so the job page says where the money stands.
			answer: approval
				? { decision: approval.decision, optionLabel: money.summary.optionLabel, signerName: approval.signerName, at: approval.createdAt.toISOString(), version: money.terms.version?.number ?? null }
				: null,
			money: approval ? payments.summaryJson(money.summary) : null
		},
		history: history.map((h) => ({ ...h, at: new Date(h.at).toISOString() }))
	};
};

export const actions: Actions = {
	move: async ({ request, params }) => {
		const user = requireRole(STAFF);
		const parsed = parseForm(moveSchema, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'move', message: 'Choose what happens next.' });
		const result = await attempt(() => jobs.transition(user, params.id, parsed.data.to), { action: 'move' });
		return result.ok ? { action: 'move', done: 'Status updated.' } : result.failure;
	},
	assign: async ({ request, params }) => {
		const user = requireRole(FRONT_DESK);
		const parsed = parseForm(optionalId, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'assign', message: parsed.errors.id });
		const result = await attempt(() => jobs.assign(user, params.id, parsed.data.id), { action: 'assign' });
		return result.ok ? { action: 'assign', done: 'Technician assigned.' } : result.failure;
	},
	sheet: async ({ request, params }) => {
		const user = requireRole(STAFF);
		const parsed = parseForm(optionalId, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'sheet', message: parsed.errors.id });
		if (parsed.data.id && !(await specs.get(user.shopId, parsed.data.id))) return fail(400, { action: 'sheet', message: 'No such spec sheet in your shop.' });
		const result = await attempt(() => jobs.setSpecSheet(user, params.id, parsed.data.id), { action: 'sheet' });
		return result.ok ? { action: 'sheet' } : result.failure;
	},
	reading: async ({ request, params }) => {
		const user = requireRole(STAFF);
		const form = await request.formData();
		const parsed = parseForm(readings.readingSchema, form);
		if (!parsed.ok) return fail(400, { action: 'reading', message: Object.values(parsed.errors)[0], errors: parsed.errors, ...echo(form) });
		const result = await attempt(() => readings.add(user, params.id, parsed.data), { action: 'reading', ...echo(form) });
		return result.ok ? { action: 'reading', saved: result.value.id, result: result.value.result } : result.failure;
	},
	removeReading: async ({ request, params }) => {
		const user = requireRole(STAFF);
		const parsed = parseForm(readingId, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'removeReading', message: parsed.errors.readingId });
		const result = await attempt(() => readings.remove(user, params.id, parsed.data.readingId), { action: 'removeReading' });
		return result.ok ? { action: 'removeReading' } : result.failure;
	},
	findings: async ({ request, params }) => {
		const user = requireRole(STAFF);
		const form = await request.formData();
		const parsed = parseForm(jobs.findingsSchema, form);
		if (!parsed.ok) return fail(400, { action: 'findings', message: parsed.message, errors: parsed.errors, ...echo(form) });
		const result = await attempt(() => jobs.saveFindings(user, params.id, parsed.data), { action: 'findings', conflict: true, ...echo(form) });
		return result.ok ? { action: 'findings', done: 'Findings saved.' } : result.failure;
	}
};
