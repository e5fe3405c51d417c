import { error, fail } from '@sveltejs/kit';
import { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';
import { hideCosts } from '$lib/components/quote/costs';
import { describeUnit } from '$lib/domain';
import { currencyDigits } from '$lib/pricing/money';
import { FRONT_DESK, STAFF } from '$lib/roles';
import { requireRole, type AuthUser } from '$lib/server/auth/guard';
import * as catalog from '$lib/server/catalog';
import { UserError } from '$lib/server/errors';
import { parseForm } from '$lib/server/forms';
import { parseJson } from '$lib/server/json';
import { plainNumber } from '$lib/server/validators';
import * as jobs from '$lib/server/jobs';
import * as quoteMail from '$lib/server/quote-mail';
import * as quotes from '$lib/server/quotes';
import * as settings from '$lib/server/settings';
import { catalogPartIds, maskDraft, partView, unmaskDraft, type DraftShape } from './masking';

// Every staff role edits and sends: the bench prices the work, the desk adjusts fees and
// discounts at the counter. Withdrawing customer links is the desk's call (FRONT_DESK).
const EDITORS = STAFF;
const SENDERS = STAFF;
const REVOKERS = FRONT_DESK;
const SENDABLE = ['checked_in', 'diagnosing', 'quoted'];

const saveSchema = z.object({
	draft: z.string({ error: 'Send the estimate as JSON.' }).max(512 * 1024, 'The estimate is too large to save.'),
	lockVersion: z.preprocess(plainNumber, z.coerce.number({ error: 'Reload the page and try again.' }).int().min(0).max(2_147_483_646))
});

/** The job of the caller's shop, or 404: another shop's job id is simply not found. */
async function jobOf(user: AuthUser, id: string) {
	const job = await jobs.get(user.shopId, id);
	if (!job) error(404, 'No such job in your shop.');
	return job;
}

export const load: PageServerLoad = async ({ params }) => {
	const user = requireRole(STAFF);
	const found = await jobs.detail(user.shopId, params.id);
	if (!found) error(404, 'No such job in your shop.');
	const { job, unit, customer } = found;
	const [shop, { quote, versions, approval }, parts, labour, replacements] = await Promise.all([
		settings.get(user.shopId),
		quotes.forJob(user.shopId, job.id),
		catalog.list(user.shopId, 'parts'),
		catalog.list(user.shopId, 'labour'),
		catalog.list(user.shopId, 'replacements')
	]);
	const seesCosts = settings.seesCosts(user.role, shop);
	const stored = quote.draft as unknown as DraftShape;
	const draft = seesCosts ? stored : maskDraft(stored, shop.pricing);
	const priced = await quotes.evaluateDraft(user.shopId, job, stored);
	const links = await quotes.openLinks(user.shopId, quote.id);
	const pricing = shop.pricing;
	return {
		job: { id: job.id, number: job.number, status: job.status, diagnosticFee: String(job.diagnosticFee) },
		unitLabel: describeUnit(unit),
		unitKind: unit.kind as string,
		customerName: customer.name,
		currency: pricing.currency,
		labourRate: pricing.labourRate.toFixed(currencyDigits(pricing.currency)),
		seesCosts,
		/** No labour cost set: every labour line would show its whole price as margin. */
		labourCostUnset: seesCosts && pricing.labourCostRate.isZero(),
		targetMarginPercent: pricing.targetMarginPercent.toString(),
		canSend: SENDERS.includes(user.role),
		canRevoke: REVOKERS.includes(user.role),
		sendBlocked: approval
			? 'The customer has already answered this estimate.'
			: SENDABLE.includes(job.status)
				? null
				: 'This job is past quoting, so the estimate cannot be sent again.',
		quote: { lockVersion: quote.lockVersion, sentVersions: quote.sentVersions, editedSinceSend: quote.editedSinceSend, draft },
		versions: versions.map((v) => ({ number: v.number, contentHash: v.contentHash, validUntil: v.validUntil, sentAt: v.sentAt.toISOString() })),
		approval: approval ? { decision: approval.decision, optionLabel: approval.optionLabel, at: approval.createdAt.toISOString() } : null,
		openLinks: links.length,
		initial: priced.ok
			? { result: seesCosts ? priced.result : hideCosts(priced.result), issues: [], message: null }
			: { result: null, issues: priced.issues, message: priced.message },
		catalog: {
			parts: parts.rows.map((p) => partView(p, pricing, seesCosts)),
			partsTotal: parts.total,
			labour: labour.rows.map(catalog.labourView),
			replacements: replacements.rows.map(catalog.replacementView)
		}
	};
};

export const actions: Actions = {
	save: async ({ request, params }) => {
		const user = requireRole(EDITORS);
		const job = await jobOf(user, params.id);
		const parsed = parseForm(saveSchema, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'save', message: Object.values(parsed.errors)[0] ?? parsed.message, issues: [] });
		let draft: unknown;
		try {
			draft = parseJson(parsed.data.draft);
		} catch {
			return fail(400, { action: 'save', message: 'The quote could not be read. Reload the page and try again.', issues: [] });
		}
		// PostgreSQL's jsonb cannot hold the NUL character.
		if (JSON.stringify(draft).includes('\\u0000')) {
			return fail(400, { action: 'save', message: 'Nothing was saved: the estimate contains a NUL character. Remove it and save again.', issues: [] });
		}
		const shop = await settings.get(user.shopId);
		if (!settings.seesCosts(user.role, shop)) {
			const { quote } = await quotes.forJob(user.shopId, job.id);
			const costs = new Map<string, string>();
			for (const id of catalogPartIds(draft)) {
				const part = await catalog.find(user.shopId, 'parts', id);
				if (part) costs.set(id, String(part.cost));
			}
			draft = unmaskDraft(draft, quote.draft as unknown as DraftShape, (id) => costs.get(id) ?? null, shop.pricing);
		}
		try {
			const saved = await quotes.saveDraft(user, job.id, draft, parsed.data.lockVersion);
			return { action: 'save', lockVersion: saved.lockVersion, savedAt: new Date().toISOString() };
		} catch (e) {
			if (e instanceof quotes.QuoteConflict) return fail(409, { action: 'save', conflict: true, message: e.message, issues: [] });
			if (e instanceof quotes.DraftInvalid) return fail(400, { action: 'save', message: `Nothing was saved. ${e.message}`, issues: e.issues });
			if (e instanceof UserError) return fail(400, { action: 'save', message: e.message, issues: [] });
			throw e;
		}
	},
	send: async ({ params, url }) => {
		const user = requireRole(SENDERS);
		const job = await jobOf(user, params.id);
		try {
			const sent = await quotes.send(user, job.id);
			const link = `${url.origin}/q/${sent.token}`;
			const mail = await quoteMail.quoteSent(user.shopId, job.id, sent.version, link);
			return {
				action: 'send',
				mailed: mail.queued,
				mailNote: mail.reason ?? null,
				version: sent.version.number,
				contentHash: sent.version.contentHash,
				validUntil: sent.version.validUntil,
				link
			};
		} catch (e) {
			if (e instanceof quotes.DraftInvalid) return fail(400, { action: 'send', message: `Not sent. ${e.message}` });
			if (e instanceof UserError) return fail(400, { action: 'send', message: e.message });
			throw e;
		}
	},
	revoke: async ({ params }) => {
		const user = requireRole(REVOKERS);
		const job = await jobOf(user, params.id);
		try {
			const count = await quotes.revokeLinks(user, job.id);
			return { action: 'revoke', revoked: count };
		} catch (e) {
			if (e instanceof UserError) return fail(400, { action: 'revoke', message: e.message });
			throw e;
		}
	}
};
