import { Decimal } from 'decimal.js';
import { z } from 'zod';
import { MEASURE_UNITS, type ReadingResult } from '../domain';
import { judgeReading, OVER_LIMIT } from '../pricing/bench';
import * as audit from './audit';
import { Reading, SpecItem } from './db/models';
import { get as getJob } from './jobs';
import { UserError } from './errors';
import { isUuid, optionalText } from './validators';

export const readingSchema = z.object({
	specItemId: z.preprocess((v) => (v === '' ? undefined : v), z.uuid({ error: 'Pick the measurement from the spec sheet.' }).optional()),
	label: optionalText(120, 'What was measured'),
	unit: z.preprocess((v) => (v === '' ? undefined : v), z.enum(MEASURE_UNITS, { error: 'Choose the unit of measure.' }).optional()),
	value: z
		.string({ error: 'Enter the reading.' })
		.trim()
		.transform((v) => v.replace(',', '.'))
		.refine((v) => v.toUpperCase() === OVER_LIMIT || /^-?\d{1,9}(\.\d{1,4})?$/.test(v), 'Enter the reading as a number (up to 4 decimals), or OL when the meter shows over-limit.'),
	note: optionalText(300, 'The note')
});
export type ReadingInput = z.infer<typeof readingSchema>;

interface Actor {
	id: string;
	shopId: string;
}

const num = (v: string | null) => (v === null ? undefined : Number(v));

/** Judges a value against a spec item with the engine's bench helper. */
export function judge(item: Pick<SpecItem, 'minValue' | 'maxValue' | 'openAbove' | 'shortBelow'>, value: string): ReadingResult {
	return judgeReading(value.toUpperCase() === OVER_LIMIT ? OVER_LIMIT : Number(value), {
		min: num(item.minValue) ?? -Number.MAX_VALUE,
		max: num(item.maxValue) ?? Number.MAX_VALUE,
		openAbove: num(item.openAbove),
		shortBelow: num(item.shortBelow)
	});
}

export async function add(actor: Actor, jobId: string, input: ReadingInput) {
	const job = await getJob(actor.shopId, jobId);
	if (!job) throw new UserError('No such job in your shop.');
	const overRange = input.value.toUpperCase() === OVER_LIMIT;
	let reading: Reading;
	if (input.specItemId) {
		const item = await SpecItem.findOne({ where: { id: input.specItemId, shopId: actor.shopId } });
		if (!item) throw new UserError('That measurement is not on one of your spec sheets.', 'specItemId');
		reading = await Reading.create({
			shopId: actor.shopId,
			jobId,
			specItemId: item.id,
			label: item.label,
			unit: item.unit,
			value: overRange ? null : new Decimal(input.value).toString(),
			overRange,
			minValue: item.minValue,
			maxValue: item.maxValue,
			result: judge(item, input.value),
			note: input.note,
			takenBy: actor.id
		});
	} else {
		if (!input.label) throw new UserError('Say what was measured.', 'label');
		if (!input.unit) throw new UserError('Choose the unit of measure.', 'unit');
		reading = await Reading.create({
			shopId: actor.shopId,
			jobId,
			specItemId: null,
			label: input.label,
			unit: input.unit,
			value: overRange ? null : new Decimal(input.value).toString(),
			overRange,
			minValue: null,
			maxValue: null,
			result: 'noted',
			note: input.note,
			takenBy: actor.id
		});
	}
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'reading.added', entity: 'job', entityId: jobId, detail: { readingId: reading.id, result: reading.result } });
	return reading;
}

/** A job's readings, oldest first. */
export function list(shopId: string, jobId: string) {
	return Reading.findAll({ where: { shopId, jobId }, order: [['createdAt', 'ASC'], ['id', 'ASC']] });
}

export async function remove(actor: Actor, jobId: string, readingId: string) {
	const count = isUuid(readingId) && isUuid(jobId) ? await Reading.destroy({ where: { id: readingId, jobId, shopId: actor.shopId } }) : 0;
	if (!count) throw new UserError('No such reading on this job.');
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'reading.removed', entity: 'job', entityId: jobId, detail: { readingId } });
}

/** "0.42 Ω", "OL" — a reading as a technician writes it. */
export function show(reading: Pick<Reading, 'value' | 'overRange' | 'unit'>): string {
	return reading.overRange ? `OL (over range)` : `${new Decimal(reading.value ?? 0).toString()} ${reading.unit}`;
}

/**
 * The readings a customer is shown, oldest first: those taken without a sheet and those judged
 * against the job's spec sheet now. A reading judged against a sheet the technician has since
 * set aside stays on the job page for the shop, but would set two ranges for one measurement side
 * by side on the estimate.
 */
export async function forCustomer(shopId: string, job: { id: string; specSheetId: string | null }): Promise<Reading[]> {
	const [taken, current] = await Promise.all([
		list(shopId, job.id),
		job.specSheetId ? SpecItem.findAll({ where: { shopId, sheetId: job.specSheetId }, attributes: ['id'] }) : []
	]);
	const onSheet = new Set(current.map((i) => i.id));
	return taken.filter((r) => r.specItemId === null || onSheet.has(r.specItemId));
}
