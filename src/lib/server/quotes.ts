import { createHash, randomBytes } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { EXPECTED_LIFE, emptyOption, emptyOptionMessage, type JobStatus } from '../domain';
import { evaluateRequest, type EvaluateResponse, type PricingResult } from '../pricing/evaluate';
import { settingsToJson } from '../pricing/settings';
import type { RoleName } from '../roles';
import * as audit from './audit';
import { db } from './db';
import { Approval, Job, Quote, QuoteLink, QuoteVersion, Unit } from './db/models';
import { UserError } from './errors';
import * as jobs from './jobs';
import * as settings from './settings';
import { isUuid } from './validators';

interface Actor {
	id: string;
	shopId: string;
	role: RoleName;
}

/** The editable part of a quote: the engine's request without currency, settings or fee. */
export interface QuoteDraft {
	unit: Record<string, unknown>;
	options: Record<string, unknown>[];
}

export class QuoteConflict extends Error {}

/** The engine refused the draft: each issue has a path into the draft and a message. */
export class DraftInvalid extends Error {
	constructor(
		message: string,
		readonly issues: { path: string; message: string }[]
	) {
		super(message);
	}
}

const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

/** JSON with keys in a fixed order, so the same content always hashes the same. */
export function canonicalJson(value: unknown): string {
	if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
	if (value && typeof value === 'object') {
		const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined);
		entries.sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
		return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
	}
	return JSON.stringify(value);
}

/** A sensible first draft for a job: a repair to fill in and the decline option. */
export function initialDraft(job: Job, unit: Unit, today = new Date()): QuoteDraft {
	const life = EXPECTED_LIFE[unit.kind];
	const age = unit.yearBought ? Math.max(0, today.getFullYear() - unit.yearBought) : 0;
	return {
		unit: {
			description: [unit.maker, unit.model].filter(Boolean).join(' ') || undefined,
			ageYears: String(age),
			engineHours: unit.engineHours ?? '0',
			lifeYears: String(life.years),
			lifeHours: String(life.hours),
			condition: unit.condition,
			asIsValue: '0',
			annualUpkeep: '0'
		},
		options: [
			{ label: 'Repair', kind: 'repair', lines: [], creditDiagnosticFee: true },
			{
				label: 'Decline the repair',
				kind: 'decline',
				lines: [{ kind: 'fee', description: 'Diagnostic fee', amount: job.diagnosticFee, feeType: 'diagnostic' }]
			}
		]
	};
}

async function requestFor(shopId: string, job: Job, draft: QuoteDraft, transaction?: Transaction) {
	const shopSettings = await settings.get(shopId, transaction);
	return {
		currency: shopSettings.pricing.currency,
		diagnosticFee: job.diagnosticFee,
		unit: draft.unit,
		options: draft.options
	};
}

/** Prices a draft for a job with the shop's settings, exactly as the JSON route does. */
export async function evaluateDraft(shopId: string, job: Job, draft: unknown, transaction?: Transaction): Promise<EvaluateResponse> {
	const body = draft && typeof draft === 'object' ? (draft as QuoteDraft) : { unit: {}, options: [] };
	return evaluateRequest(await requestFor(shopId, job, body, transaction), await settings.pricingOverrides(shopId, transaction));
}

async function jobOf(shopId: string, jobId: string, transaction?: Transaction) {
	const job = isUuid(jobId) ? await Job.findOne({ where: { id: jobId, shopId }, transaction }) : null;
	if (!job) throw new UserError('No such job in your shop.');
	return job;
}

/** The job's quote, made with a first draft when there is none yet. */
export async function forJob(shopId: string, jobId: string) {
	const job = await jobOf(shopId, jobId);
	let quote = await Quote.findOne({ where: { shopId, jobId } });
	if (!quote) {
		const unit = await Unit.findOne({ where: { id: job.unitId, shopId } });
		[quote] = await Quote.findOrCreate({ where: { jobId }, defaults: { shopId, jobId, draft: initialDraft(job, unit!) as unknown as Record<string, unknown>, updatedBy: null } });
	}
	const versions = await QuoteVersion.findAll({
		where: { shopId, quoteId: quote.id },
		attributes: ['id', 'number', 'contentHash', 'validUntil', 'sentAt', 'currency'],
		order: [['number', 'DESC']]
	});
	const approval = await Approval.findOne({ where: { shopId, quoteId: quote.id } });
	return { job, quote, versions, approval };
}

/** Saves the draft unless someone saved since `lockVersion`; the engine must accept it. */
export async function saveDraft(actor: Actor, jobId: string, draft: unknown, lockVersion: number) {
	const job = await jobOf(actor.shopId, jobId);
	const priced = await evaluateDraft(actor.shopId, job, draft);
	if (!priced.ok) throw new DraftInvalid(priced.message, priced.issues);
	const clean = { unit: (draft as QuoteDraft).unit, options: (draft as QuoteDraft).options };
	// The draft, its lock version and the audit record land together or not at all.
	await db().transaction(async (transaction) => {
		// Under the quote's row lock, as an answer is recorded: an answered estimate stays as it was answered.
		const current = await Quote.findOne({ where: { shopId: actor.shopId, jobId }, attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
		const answered = current ? await Approval.findOne({ where: { shopId: actor.shopId, quoteId: current.id }, attributes: ['decision'], transaction }) : null;
		if (answered) throw new UserError(`Not saved: the customer has ${answered.decision} this estimate, so it stays as they answered it. Record work beyond it under Actuals.`);
		const [count] = await Quote.update(
			{ draft: clean as unknown as Record<string, unknown>, lockVersion: lockVersion + 1, editedSinceSend: true, updatedBy: actor.id },
			{ where: { shopId: actor.shopId, jobId, lockVersion }, transaction }
		);
		if (count === 0) {
			if (!(await Quote.findOne({ where: { shopId: actor.shopId, jobId }, transaction }))) throw new UserError('Open the estimate builder first.');
			throw new QuoteConflict('Someone else saved this estimate after you opened it. Your changes are still on screen: reload to see theirs, then apply yours again.');
		}
		await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'quote.saved', entity: 'job', entityId: jobId }, transaction);
	});
	return { lockVersion: lockVersion + 1, result: priced.result };
}

const SENDABLE: JobStatus[] = ['checked_in', 'diagnosing', 'quoted'];

/**
 * Freezes the draft as a new version (content, engine result and hash), moves the job to
 * "quoted" and returns a fresh customer link token (only its hash is stored).
 */
export async function send(actor: Actor, jobId: string) {
	return db().transaction(async (transaction) => {
		const job = await jobOf(actor.shopId, jobId, transaction);
		const quote = await Quote.findOne({ where: { shopId: actor.shopId, jobId }, lock: transaction.LOCK.UPDATE, transaction });
		if (!quote) throw new UserError('Build the estimate before sending it.');
		if (await Approval.findOne({ where: { quoteId: quote.id }, transaction })) throw new UserError('The customer has already answered this estimate.');
		if (!SENDABLE.includes(job.status as JobStatus)) throw new UserError('This job is past quoting.');
		const shopSettings = await settings.get(actor.shopId, transaction);
		// The version carries the settings in force, so it can be priced again exactly as sent.
		const request = { ...(await requestFor(actor.shopId, job, quote.draft as unknown as QuoteDraft, transaction)), settings: settingsToJson(shopSettings.pricing) };
		const priced = evaluateRequest(request);
		if (!priced.ok) throw new DraftInvalid(priced.message, priced.issues);
		const empty = emptyOption(request.options as { label: string; kind: string }[]);
		if (empty) throw new UserError(emptyOptionMessage(empty.label));

		let version: QuoteVersion;
		if (!quote.editedSinceSend && quote.sentVersions > 0) {
			version = (await QuoteVersion.findOne({ where: { quoteId: quote.id, number: quote.sentVersions }, transaction }))!;
		} else {
			const content = JSON.parse(JSON.stringify(request));
			const validUntil = new Date(Date.now() + shopSettings.quoteValidityDays * 86_400_000).toISOString().slice(0, 10);
			version = await QuoteVersion.create(
				{
					shopId: actor.shopId,
					quoteId: quote.id,
					number: quote.sentVersions + 1,
					content,
					result: JSON.parse(JSON.stringify(priced.result)),
					contentHash: sha256(canonicalJson(content)),
					currency: request.currency,
					validUntil,
					sentBy: actor.id
				},
				{ transaction }
			);
			await quote.update({ sentVersions: version.number, editedSinceSend: false }, { transaction });
		}
		const token = randomBytes(32).toString('base64url');
		const link = await QuoteLink.create(
			{
				shopId: actor.shopId,
				quoteId: quote.id,
				versionId: version.id,
				tokenHash: sha256(token),
				expiresAt: new Date(`${version.validUntil}T23:59:59Z`)
			},
			{ transaction }
		);
		// Forward only: a checked-in job goes through diagnosing to quoted; a quoted one stays put
		// (sending again must not walk it back to diagnosing and forward again).
		const forward: Partial<Record<JobStatus, JobStatus[]>> = { checked_in: ['diagnosing', 'quoted'], diagnosing: ['quoted'] };
		for (const step of forward[job.status as JobStatus] ?? []) await jobs.transition(actor, job.id, step, transaction);
		await audit.record(
			{ shopId: actor.shopId, userId: actor.id, action: 'quote.sent', entity: 'job', entityId: job.id, detail: { version: version.number, hash: version.contentHash } },
			transaction
		);
		return { version, link, token, result: priced.result as PricingResult };
	});
}

/** Ends every customer link of the job's quote at once. */
export async function revokeLinks(actor: Actor, jobId: string) {
	const quote = await Quote.findOne({ where: { shopId: actor.shopId, jobId: isUuid(jobId) ? jobId : '00000000-0000-0000-0000-000000000000' } });
	if (!quote) throw new UserError('This job has no quote yet.');
	const [count] = await QuoteLink.update({ revokedAt: new Date() }, { where: { shopId: actor.shopId, quoteId: quote.id, revokedAt: null } });
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'quote.links_revoked', entity: 'job', entityId: jobId, detail: { count } });
	return count;
}

export type LinkState = 'open' | 'expired' | 'revoked' | 'replaced';

/** What a customer token opens: its version, the newest version, and whether it still works. */
export async function byToken(token: string) {
	if (typeof token !== 'string' || token.length < 40 || token.length > 60) return null;
	const link = await QuoteLink.findOne({ where: { tokenHash: sha256(token) } });
	if (!link) return null;
	const quote = (await Quote.findByPk(link.quoteId))!;
	const [version, latest, approval] = await Promise.all([
		QuoteVersion.findByPk(link.versionId),
		QuoteVersion.findOne({ where: { quoteId: quote.id, number: quote.sentVersions } }),
		Approval.findOne({ where: { quoteId: quote.id } })
	]);
	const state: LinkState = link.revokedAt
		? 'revoked'
		: link.expiresAt.getTime() < Date.now() && !approval
			? 'expired'
			: latest && latest.id !== link.versionId
				? 'replaced'
				: 'open';
	return { link, quote, version: version!, latest: latest!, approval, state };
}

export interface Decision {
	decision: 'approved' | 'declined';
	optionIndex: number | null;
	signerName: string | null;
	reason: string;
	clientAddress: string;
	userAgent: string;
}

/**
 * Records the customer's answer once. A second tap (or a second tab) gets the first answer back
 * instead of a second record. Only the newest version of an open link can be answered.
 */
export async function decide(token: string, decision: Decision) {
	const found = await byToken(token);
	if (!found) throw new UserError('This link is not valid.');
	return db().transaction(async (transaction) => {
		const quote = await Quote.findByPk(found.quote.id, { lock: transaction.LOCK.UPDATE, transaction });
		const existing = await Approval.findOne({ where: { quoteId: quote!.id }, transaction });
		if (existing) return { approval: existing, created: false };
		if (found.state !== 'open') throw new UserError(found.state === 'replaced' ? 'This estimate was replaced by a newer one.' : `This link has ${found.state === 'expired' ? 'expired' : 'been withdrawn by the shop'}.`);
		const version = found.version;
		const options = (version.content.options as { label: string; kind: string }[]) ?? [];
		if (decision.decision === 'approved') {
			const option = decision.optionIndex === null ? undefined : options[decision.optionIndex];
			if (!option || option.kind === 'decline') throw new UserError('Choose the option you approve.');
		}
		const approval = await Approval.create(
			{
				shopId: quote!.shopId,
				quoteId: quote!.id,
				versionId: version.id,
				decision: decision.decision,
				optionIndex: decision.optionIndex,
				optionLabel: decision.optionIndex === null ? null : (options[decision.optionIndex]?.label ?? null),
				signerName: decision.signerName,
				reason: decision.reason,
				clientAddress: decision.clientAddress.slice(0, 100),
				userAgent: decision.userAgent.slice(0, 400),
				versionHash: version.contentHash
			},
			{ transaction }
		);
		const customer = { id: null, shopId: quote!.shopId, role: 'writer' } as const;
		const job = await Job.findByPk(quote!.jobId, { transaction });
		if (job!.status === 'quoted') await jobs.transition(customer, job!.id, decision.decision, transaction);
		await audit.record(
			{ shopId: quote!.shopId, userId: null, action: `quote.${decision.decision}`, entity: 'job', entityId: quote!.jobId, detail: { version: version.number, option: approval.optionLabel } },
			transaction
		);
		return { approval, created: true };
	});
}

export function versionByNumber(shopId: string, quoteId: string, number: number) {
	return QuoteVersion.findOne({ where: { shopId, quoteId, number } });
}

export function openLinks(shopId: string, quoteId: string) {
	return QuoteLink.findAll({ where: { shopId, quoteId, revokedAt: null, expiresAt: { [Op.gt]: new Date() } } });
}
