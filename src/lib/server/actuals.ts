import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import type { JobStatus } from '../domain';
import { Dec, type Decimal } from '../pricing/money';
import type { RoleName } from '../roles';
import * as audit from './audit';
import { db } from './db';
import { Job, User } from './db/models';
import { JobExtraPart, JobLabour, JobOutcome } from './db/report-models';
import { UserError } from './errors';
import { decimalString, isUuid, optionalText, requiredText } from './validators';

/*
 * What a finished repair really took: hours per technician and parts used beyond the quote. The
 * database's triggers fold every change into job_outcomes, where the reports read it.
 */

interface Actor {
	id: string;
	shopId: string;
	role: RoleName;
}

/** Work happens once the customer has approved; hours can be added until the unit goes home and after. */
export const RECORDABLE: readonly JobStatus[] = ['approved', 'in_repair', 'ready', 'picked_up'];

/** Owners and managers record for anyone; a technician only for themself. */
export const recordsForOthers = (role: RoleName) => role === 'owner' || role === 'manager';

const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);

export const hoursSchema = z.object({
	technicianId: z.preprocess(blankToUndefined, z.uuid({ error: 'Pick who did the work.' }).optional()),
	hours: decimalString('The hours', { max: '200', places: 2 }).refine((v) => new Dec(v).gt(0), 'Enter hours above zero, such as 1.25.'),
	workedOn: z.preprocess(blankToUndefined, z.iso.date({ error: 'Enter the day the work was done.' }).optional()),
	note: optionalText(300, 'The note')
});
export type HoursInput = z.infer<typeof hoursSchema>;

export const partSchema = z.object({
	description: requiredText(200, 'Describe the part.'),
	quantity: decimalString('The quantity', { max: '10000', places: 2 }).refine((v) => new Dec(v).gt(0), 'Enter a quantity above zero.'),
	unitCost: decimalString('The unit cost', { max: '1000000', places: 2 })
});
export type PartInput = z.infer<typeof partSchema>;

export const entrySchema = z.object({ entryId: z.uuid({ error: 'Pick an entry from the list.' }) });

async function jobOf(shopId: string, jobId: string) {
	const job = isUuid(jobId) ? await Job.findOne({ where: { id: jobId, shopId } }) : null;
	if (!job) throw new UserError('No such job in your shop.');
	return job;
}

function assertRecordable(job: Job) {
	if (!RECORDABLE.includes(job.status as JobStatus)) {
		throw new UserError('Record actuals once the customer has approved the work.');
	}
}

function today(): string {
	return new Date().toISOString().slice(0, 10);
}

/** Records hours on a job; a technician's own hours only, unless the actor runs the shop. */
export async function recordHours(actor: Actor, jobId: string, input: HoursInput) {
	const job = await jobOf(actor.shopId, jobId);
	assertRecordable(job);
	const technicianId = input.technicianId ?? actor.id;
	if (technicianId !== actor.id && !recordsForOthers(actor.role)) {
		throw new UserError('Record your own hours; a manager records hours for others.', 'technicianId');
	}
	const person = await User.findOne({ where: { id: technicianId, shopId: actor.shopId, active: true } });
	if (!person || person.role === 'writer') throw new UserError('Pick someone from your bench team.', 'technicianId');
	const workedOn = input.workedOn ?? today();
	if (workedOn > today()) throw new UserError('The day worked cannot be in the future.', 'workedOn');
	const entry = await JobLabour.create({
		shopId: actor.shopId,
		jobId: job.id,
		technicianId,
		hours: input.hours,
		workedOn,
		note: input.note,
		recordedBy: actor.id
	});
	await audit.record({
		shopId: actor.shopId, userId: actor.id, action: 'job.hours_recorded', entity: 'job', entityId: job.id,
		detail: { technicianId, hours: input.hours }
	});
	return entry;
}

export async function removeHours(actor: Actor, jobId: string, entryId: string) {
	const job = await jobOf(actor.shopId, jobId);
	const entry = await JobLabour.findOne({ where: { id: entryId, jobId: job.id, shopId: actor.shopId } });
	if (!entry) throw new UserError('That entry is not on this job.');
	if (entry.technicianId !== actor.id && !recordsForOthers(actor.role)) throw new UserError('You can remove only your own hours.');
	await entry.destroy();
	await audit.record({
		shopId: actor.shopId, userId: actor.id, action: 'job.hours_removed', entity: 'job', entityId: job.id,
		detail: { technicianId: entry.technicianId, hours: entry.hours }
	});
}

export async function recordPart(actor: Actor, jobId: string, input: PartInput) {
	const job = await jobOf(actor.shopId, jobId);
	assertRecordable(job);
	const part = await JobExtraPart.create({
		shopId: actor.shopId, jobId: job.id, description: input.description, quantity: input.quantity, unitCost: input.unitCost, recordedBy: actor.id
	});
	await audit.record({
		shopId: actor.shopId, userId: actor.id, action: 'job.extra_part', entity: 'job', entityId: job.id,
		detail: { description: input.description, quantity: input.quantity, unitCost: input.unitCost }
	});
	return part;
}

export async function removePart(actor: Actor, jobId: string, entryId: string) {
	const job = await jobOf(actor.shopId, jobId);
	const part = await JobExtraPart.findOne({ where: { id: entryId, jobId: job.id, shopId: actor.shopId } });
	if (!part) throw new UserError('That part is not on this job.');
	if (part.recordedBy !== actor.id && !recordsForOthers(actor.role)) throw new UserError('You can remove only parts you recorded.');
	await part.destroy();
	await audit.record({
		shopId: actor.shopId, userId: actor.id, action: 'job.extra_part_removed', entity: 'job', entityId: job.id,
		detail: { description: part.description }
	});
}

export interface ComparisonLine {
	label: string;
	quoted: string;
	actual: string;
	difference: string;
	/** How the figure reads: money, or hours. */
	format: 'money' | 'hours';
}

/** Quoted against actual for the approved option, from the job's report row. */
export function comparison(outcome: JobOutcome): ComparisonLine[] {
	const d = (v: string | null) => new Dec(v ?? 0);
	const line = (label: string, quoted: Decimal, actual: Decimal, format: ComparisonLine['format'] = 'money'): ComparisonLine => {
		const places = format === 'hours' ? 2 : outcome.minorDigits;
		return { label, quoted: quoted.toFixed(places), actual: actual.toFixed(places), difference: actual.minus(quoted).toFixed(places), format };
	};
	const hoursSpent = outcome.actualHours === null ? d(outcome.billedHours) : d(outcome.actualHours);
	const partsCost = d(outcome.partsCost);
	const otherCost = d(outcome.cost).minus(partsCost).minus(d(outcome.labourCost));
	return [
		line('Labour hours', d(outcome.billedHours), hoursSpent, 'hours'),
		line('Revenue (before tax)', d(outcome.revenue), d(outcome.revenue)),
		line('Labour cost', d(outcome.labourCost), d(outcome.actualLabourCost)),
		line('Parts cost', partsCost, partsCost.plus(d(outcome.extraPartsCost))),
		line('Other cost', otherCost, otherCost),
		line('Total cost', d(outcome.cost), d(outcome.revenue).minus(d(outcome.actualGrossProfit))),
		line('Gross profit', d(outcome.grossProfit), d(outcome.actualGrossProfit))
	];
}

/** Everything the actuals page shows for one job. */
export async function view(shopId: string, jobId: string) {
	const job = await jobOf(shopId, jobId);
	const [labour, parts, outcome, people] = await Promise.all([
		db().query<{ id: string; technicianId: string; technician: string; hours: string; workedOn: string; note: string; recordedBy: string | null }>(
			`SELECT l.id, l.technician_id AS "technicianId", u.name AS technician, l.hours, to_char(l.worked_on, 'YYYY-MM-DD') AS "workedOn",
			        l.note, l.recorded_by AS "recordedBy"
			   FROM job_labour l JOIN users u ON u.id = l.technician_id
			  WHERE l.shop_id = :shopId AND l.job_id = :jobId ORDER BY l.worked_on, l.created_at`,
			{ replacements: { shopId, jobId: job.id }, type: QueryTypes.SELECT }
		),
		JobExtraPart.findAll({ where: { shopId, jobId: job.id }, order: [['createdAt', 'ASC']] }),
		JobOutcome.findOne({ where: { shopId, jobId: job.id } }),
		User.findAll({ where: { shopId, active: true, role: ['technician', 'manager', 'owner'] }, attributes: ['id', 'name'], order: [['name', 'ASC']] })
	]);
	const approved = outcome && outcome.decision === 'approved' ? outcome : null;
	const hoursByPerson = new Map<string, { name: string; hours: Decimal }>();
	for (const entry of labour) {
		const current = hoursByPerson.get(entry.technicianId) ?? { name: entry.technician, hours: new Dec(0) };
		hoursByPerson.set(entry.technicianId, { name: current.name, hours: current.hours.plus(entry.hours) });
	}
	return {
		job,
		recordable: RECORDABLE.includes(job.status as JobStatus),
		labour,
		hoursByPerson: [...hoursByPerson.values()].map((p) => ({ name: p.name, hours: p.hours.toFixed(2) })),
		parts: parts.map((p) => ({ id: p.id, description: p.description, quantity: p.quantity, unitCost: p.unitCost, lineCost: p.lineCost, recordedBy: p.recordedBy })),
		approved: approved
			? { optionLabel: approved.optionLabel, currency: approved.currency ?? 'USD', labourCostRate: approved.labourCostRate, lines: comparison(approved), hoursRecorded: approved.actualHours !== null }
			: null,
		people: people.map((p) => ({ id: p.id, name: p.name }))
	};
}
