import { z } from 'zod';
import * as audit from './audit';
import { CONDITIONS, FUELS, UNIT_KINDS, VOLTAGES } from '../domain';
import { db } from './db';
import { Job, Unit } from './db/models';
import { refreshBoardColumns } from './jobs';
import { isUuid, optionalDecimalString, optionalInt, optionalText } from './validators';

export const unitSchema = z
	.object({
		kind: z.enum(UNIT_KINDS, { error: 'Choose what kind of unit it is.' }),
		maker: optionalText(80, 'The maker'),
		model: optionalText(80, 'The model'),
		serial: optionalText(80, 'The serial number'),
		runningWatts: optionalInt(0, 200_000, 'Running watts'),
		startingWatts: optionalInt(0, 300_000, 'Starting watts'),
		voltage: z.enum(VOLTAGES, { error: 'Choose 120 V or 120/240 V.' }),
		fuel: z.enum(FUELS, { error: 'Choose the fuel.' }),
		engineHours: optionalDecimalString('Engine hours', { max: '200000', places: 1 }),
		yearBought: optionalInt(1950, new Date().getFullYear(), 'Year bought'),
		pricePaid: optionalDecimalString('Price paid'),
		condition: z.enum(CONDITIONS, { error: 'Choose the condition.' }),
		notes: optionalText(2000, 'The notes')
	})
	.refine((u) => u.runningWatts === null || u.startingWatts === null || u.startingWatts >= u.runningWatts, {
		path: ['startingWatts'],
		message: 'Starting watts are at least the running watts.'
	});
export type UnitInput = z.infer<typeof unitSchema>;

interface Actor {
	id: string;
	shopId: string;
}

export async function create(actor: Actor, customerId: string, input: UnitInput) {
	const unit = await Unit.create({ ...input, shopId: actor.shopId, customerId });
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'unit.created', entity: 'unit', entityId: unit.id });
	return unit;
}

export function get(shopId: string, id: string) {
	if (!isUuid(id)) return Promise.resolve(null);
	return Unit.findOne({ where: { id, shopId } });
}

export async function update(actor: Actor, id: string, input: UnitInput) {
	const unit = await get(actor.shopId, id);
	if (!unit) return null;
	await unit.update(input);
	await refreshBoardColumns({ shopId: actor.shopId, unitId: id });
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'unit.updated', entity: 'unit', entityId: id });
	return unit;
}

export function history(shopId: string, unitId: string) {
	return Job.findAll({
		where: { shopId, unitId },
		attributes: ['id', 'number', 'status', 'complaint', 'failedComponent', 'createdAt'],
		order: [['createdAt', 'DESC']]
	});
}
