import { Op, QueryTypes, type Transaction } from 'sequelize';
import { z } from 'zod';
import { addDays, today } from '../dates';
import { JOB_STATUSES, NEXT_STATUSES, STATUS_LABELS, type JobStatus } from '../domain';
import { ROLE_NAMES, type RoleName } from '../roles';
import * as audit from './audit';
import { db } from './db';
import { Customer, Job, Quote, Shop, Unit, User } from './db/models';
import { UserError } from './errors';
import { decimalString, isUuid, optionalText, plainNumber, requiredText } from './validators';

interface Actor {
	id: string;
	shopId: string;
	role: RoleName;
}

/** A move made by the customer through their link: no staff member, the desk's rights. */
export interface CustomerActor {
	id: null;
	shopId: string;
	role: 'writer';
}

export const checkInSchema = z.object({
	complaint: requiredText(2000, "Write down the customer's complaint."),
	diagnosticFee: decimalString('The diagnostic fee', { max: '100000' }),
	promisedOn: z.preprocess(
		(v) => (v === '' ? undefined : v),
		z.iso
			.date({ error: 'Enter the promised date as a date.' })
			// A day's grace either side of UTC midnight, so "today" is accepted in every time zone.
			.refine((d) => d >= addDays(today(), -1), 'The promised date has already passed: pick today or a later day.')
			.optional()
	).transform((v) => v ?? null),
	technicianId: z.preprocess((v) => (v === '' ? undefined : v), z.uuid({ error: 'Pick a technician from the list.' }).optional()).transform((v) => v ?? null)
});
export type CheckInInput = z.infer<typeof checkInSchema>;

export const findingsSchema = z.object({
	failedComponent: optionalText(120, 'The failed component'),
	findings: optionalText(4000, 'The findings'),
	lockVersion: z.preprocess(plainNumber, z.coerce.number().int().min(0).max(2_147_483_647))
});

/** Who may move a job into each status: the desk talks to customers, the bench does the work. */
const MOVERS: Record<JobStatus, readonly RoleName[]> = {
	checked_in: [],
	diagnosing: ROLE_NAMES,
	quoted: ROLE_NAMES,
	approved: ['owner', 'manager', 'writer'],
	declined: ['owner', 'manager', 'writer'],
	in_repair: ROLE_NAMES,
	ready: ROLE_NAMES,
	picked_up: ['owner', 'manager', 'writer']
};

export function movesFor(status: JobStatus, role: RoleName): JobStatus[] {
	return NEXT_STATUSES[status].filter((to) => MOVERS[to].includes(role));
}

async function technicianOf(shopId: string, technicianId: string | null, transaction?: Transaction) {
	if (!technicianId) return null;
	const tech = await User.findOne({ where: { id: technicianId, shopId, active: true }, transaction });
	if (!tech) throw new UserError('Pick a technician from your own team.', 'technicianId');
	return tech;
}

/** The board's search text and sort keys live on the job row so the board never joins to sort. */
const BOARD_COLUMNS_SQL = `
	search_text = lower(concat_ws(' ', '#' || j.number, c.name, c.phone, u.maker, u.model, u.serial, j.complaint)),
	customer_name = c.name,
	unit_label = concat_ws(' ', nullif(u.maker, ''), nullif(u.model, '')),
	technician_name = (SELECT name FROM users WHERE id = j.technician_id)`;

/**
 * Rewrites those columns from the customer, unit and technician they copy: for the given jobs, or
 * for the jobs of one shop — all of them, or those of one customer or one unit after it was edited.
 */
export async function refreshBoardColumns(
	which: { jobIds: string[] } | { shopId: string; customerId?: string; unitId?: string },
	transaction?: Transaction
): Promise<void> {
	if ('jobIds' in which && which.jobIds.length === 0) return;
	const condition =
		'jobIds' in which
			? 'j.id IN (:jobIds)'
			: ['j.shop_id = :shopId', which.customerId && 'c.id = :customerId', which.unitId && 'u.id = :unitId'].filter(Boolean).join(' AND ');
	await db().query(
		`UPDATE jobs j SET ${BOARD_COLUMNS_SQL}
		   FROM customers c, units u WHERE c.id = j.customer_id AND u.id = j.unit_id AND ${condition}`,
		{ replacements: which, transaction }
	);
}

/** Opens a job for a unit; the shop's next ticket number is taken under a row lock. */
export async function checkIn(actor: Actor, unitId: string, input: CheckInInput) {
	return db().transaction(async (transaction) => {
		const unit = isUuid(unitId) ? await Unit.findOne({ where: { id: unitId, shopId: actor.shopId }, transaction }) : null;
		if (!unit) throw new UserError('No such unit in your shop.');
		await technicianOf(actor.shopId, input.technicianId, transaction);
		const shop = await Shop.findByPk(actor.shopId, { lock: transaction.LOCK.UPDATE, transaction });
		const number = shop!.nextJobNumber;
		await shop!.update({ nextJobNumber: number + 1 }, { transaction });
		const job = await Job.create(
			{
				shopId: actor.shopId,
				number,
				unitId: unit.id,
				customerId: unit.customerId,
				complaint: input.complaint,
				diagnosticFee: input.diagnosticFee,
				promisedOn: input.promisedOn,
				technicianId: input.technicianId,
				createdBy: actor.id
			},
			{ transaction }
		);
		await refreshBoardColumns({ jobIds: [job.id] }, transaction);
		await audit.record(
			{ shopId: actor.shopId, userId: actor.id, action: 'job.status', entity: 'job', entityId: job.id, detail: { from: null, to: 'checked_in' } },
			transaction
		);
		return job;
	});
}

export function get(shopId: string, id: string) {
	if (!isUuid(id)) return Promise.resolve(null);
	return Job.findOne({ where: { id, shopId } });
}

/** A job with what every job page shows: unit, customer, technician. */
export async function detail(shopId: string, id: string) {
	const job = await get(shopId, id);
	if (!job) return null;
	const [unit, customer, technician] = await Promise.all([
		Unit.findOne({ where: { id: job.unitId, shopId } }),
		Customer.findOne({ where: { id: job.customerId, shopId } }),
		job.technicianId ? User.findOne({ where: { id: job.technicianId, shopId }, attributes: ['id', 'name'] }) : null
	]);
	return { job, unit: unit!, customer: customer!, technician };
}

/** Moves a job along its allowed path; anything else is refused with a reason. */
export async function transition(actor: Actor | CustomerActor, jobId: string, to: string, transaction?: Transaction) {
	const run = async (t: Transaction) => {
		const job = isUuid(jobId) ? await Job.findOne({ where: { id: jobId, shopId: actor.shopId }, lock: t.LOCK.UPDATE, transaction: t }) : null;
		if (!job) throw new UserError('No such job in your shop.');
		if (!(JOB_STATUSES as readonly string[]).includes(to)) throw new UserError('That is not a job status.');
		const target = to as JobStatus;
		const from = job.status as JobStatus;
		if (!NEXT_STATUSES[from].includes(target)) {
			const allowed = NEXT_STATUSES[from].map((s) => `"${STATUS_LABELS[s]}"`).join(' or ');
			throw new UserError(
				`A job that is "${STATUS_LABELS[from]}" cannot become "${STATUS_LABELS[target]}".` +
					(allowed ? ` Next it can be ${allowed}.` : ' It is finished.')
			);
		}
		if (!MOVERS[target].includes(actor.role)) {
			throw new UserError(`Your role cannot mark a job "${STATUS_LABELS[target]}"; the service desk does that.`);
		}
		// "Quoted" means the customer has an estimate: sending one marks it, a button alone may not.
		if (target === 'quoted' && !(await Quote.count({ where: { shopId: actor.shopId, jobId: job.id, sentVersions: { [Op.gt]: 0 } }, transaction: t }))) {
			throw new UserError('Send the estimate to the customer first; sending it marks the job quoted.');
		}
		await job.update({ status: target, statusChangedAt: new Date(), lockVersion: job.lockVersion + 1 }, { transaction: t });
		await audit.record(
			{ shopId: actor.shopId, userId: actor.id, action: 'job.status', entity: 'job', entityId: job.id, detail: { from, to: target } },
			t
		);
		return job;
	};
	return transaction ? run(transaction) : db().transaction(run);
}

/** Saves the technician's findings unless someone else saved since the page was loaded. */
export async function saveFindings(actor: Actor, jobId: string, input: z.infer<typeof findingsSchema>) {
	if (!isUuid(jobId)) throw new UserError('No such job in your shop.');
	const [count] = await Job.update(
		{ failedComponent: input.failedComponent, findings: input.findings, lockVersion: input.lockVersion + 1 },
		{ where: { id: jobId, shopId: actor.shopId, lockVersion: input.lockVersion } }
	);
	if (count === 0) {
		if (!(await get(actor.shopId, jobId))) throw new UserError('No such job in your shop.');
		throw new UserError('Someone else saved this job after you opened it. Your text is still in the form: copy it, reload, and save again.');
	}
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'job.findings', entity: 'job', entityId: jobId });
}

export async function assign(actor: Actor, jobId: string, technicianId: string | null) {
	const job = await get(actor.shopId, jobId);
	if (!job) throw new UserError('No such job in your shop.');
	await technicianOf(actor.shopId, technicianId);
	await job.update({ technicianId });
	await refreshBoardColumns({ jobIds: [jobId] });
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'job.assigned', entity: 'job', entityId: jobId, detail: { technicianId } });
}

export async function setSpecSheet(actor: Actor, jobId: string, sheetId: string | null) {
	const job = await get(actor.shopId, jobId);
	if (!job) throw new UserError('No such job in your shop.');
	await job.update({ specSheetId: sheetId });
}

/** Status changes with who made them, oldest first. */
export async function history(shopId: string, jobId: string) {
	const rows = await db().query<{ from: JobStatus | null; to: JobStatus; at: Date; who: string | null }>(
		`SELECT e.detail->>'from' AS "from", e.detail->>'to' AS "to", e.created_at AS at, u.name AS who
		   FROM audit_events e LEFT JOIN users u ON u.id = e.user_id
		  WHERE e.shop_id = :shopId AND e.entity = 'job' AND e.entity_id = :jobId AND e.action = 'job.status'
		  ORDER BY e.created_at, e.id`,
		{ replacements: { shopId, jobId }, type: QueryTypes.SELECT }
	);
	return rows;
}

export function technicians(shopId: string) {
	return User.findAll({ where: { shopId, active: true, role: ['technician', 'owner', 'manager'] }, attributes: ['id', 'name', 'role'], order: [['name', 'ASC']] });
}

