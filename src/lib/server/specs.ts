import type { Transaction } from 'sequelize';
import { z } from 'zod';
import { MEASURE_UNITS } from '../domain';
import * as audit from './audit';
import { db } from './db';
import { SpecItem, SpecSheet } from './db/models';
import { UserError } from './errors';
import { isUuid, optionalText, plainNumber, requiredText } from './validators';

const measurement = z.preprocess(
	(v) => (typeof v === 'string' && v.trim() === '' ? undefined : plainNumber(v)),
	z.coerce
		.number({ error: 'Enter a number.' })
		.refine((n) => Number.isFinite(n) && Math.abs(n) < 1e9, 'Enter a sensible number.')
		.optional()
).transform((v) => (v === undefined ? null : String(v)));

export const specItemSchema = z
	.object({
		label: requiredText(120, 'Name what is measured.'),
		unit: z.enum(MEASURE_UNITS, { error: 'Choose the unit of measure.' }),
		min: measurement,
		max: measurement,
		openAbove: measurement,
		shortBelow: measurement,
		running: z.enum(['off', 'running']).transform((v) => v === 'running'),
		source: optionalText(200, 'The source')
	})
	.refine((i) => i.min !== null || i.max !== null, { path: ['min'], message: 'Give a lowest or a highest acceptable value.' })
	.refine((i) => i.min === null || i.max === null || Number(i.min) <= Number(i.max), { path: ['max'], message: 'The highest value is below the lowest.' });

export const specSheetSchema = z.object({
	name: requiredText(120, 'Name the spec sheet.'),
	appliesTo: optionalText(200, 'Applies to'),
	notes: optionalText(2000, 'The notes'),
	items: z.array(specItemSchema).min(1, 'Add at least one measurement.').max(60, 'At most 60 measurements per sheet.')
});
export type SpecSheetInput = z.infer<typeof specSheetSchema>;

/** Turns the repeated fields of the sheet form (label, unit, min… once per row) into rows. */
export function rowsFromForm(form: FormData): Record<string, unknown> {
	const columns = ['label', 'unit', 'min', 'max', 'openAbove', 'shortBelow', 'running', 'source'] as const;
	const values = Object.fromEntries(columns.map((c) => [c, form.getAll(c).map((v) => (typeof v === 'string' ? v : ''))]));
	const items = values.label
		.map((_, i) => Object.fromEntries(columns.map((c) => [c, values[c][i] ?? ''])))
		.filter((row) => Object.entries(row).some(([k, v]) => k !== 'unit' && k !== 'running' && v.trim() !== ''));
	// A file where text belongs is read as nothing typed (and must not be echoed back to the page).
	const text = (key: string) => {
		const value = form.get(key);
		return typeof value === 'string' ? value : '';
	};
	return { name: text('name'), appliesTo: text('appliesTo'), notes: text('notes'), items };
}

interface Actor {
	id: string;
	shopId: string;
}

function itemRows(shopId: string, sheetId: string, input: SpecSheetInput) {
	return input.items.map((item, position) => ({
		shopId,
		sheetId,
		position,
		label: item.label,
		unit: item.unit,
		minValue: item.min,
		maxValue: item.max,
		openAbove: item.openAbove,
		shortBelow: item.shortBelow,
		running: item.running,
		source: item.source
	}));
}

export function list(shopId: string) {
	return SpecSheet.findAll({ where: { shopId }, order: [['name', 'ASC']], attributes: ['id', 'name', 'appliesTo'] });
}

export async function get(shopId: string, id: string) {
	if (!isUuid(id)) return null;
	const sheet = await SpecSheet.findOne({ where: { id, shopId } });
	if (!sheet) return null;
	const items = await SpecItem.findAll({ where: { sheetId: id, shopId }, order: [['position', 'ASC']] });
	return { sheet, items };
}

export async function save(actor: Actor, id: string | null, input: SpecSheetInput) {
	return db().transaction(async (transaction) => {
		let sheet: SpecSheet | null;
		if (id) {
			sheet = isUuid(id) ? await SpecSheet.findOne({ where: { id, shopId: actor.shopId }, transaction }) : null;
			if (!sheet) throw new UserError('No such spec sheet in your shop.');
			await sheet.update({ name: input.name, appliesTo: input.appliesTo, notes: input.notes }, { transaction });
			// Past readings keep their own copy of the range, so replacing the items loses nothing.
			await SpecItem.destroy({ where: { sheetId: sheet.id, shopId: actor.shopId }, transaction });
		} else {
			sheet = await SpecSheet.create({ shopId: actor.shopId, name: input.name, appliesTo: input.appliesTo, notes: input.notes }, { transaction });
		}
		await SpecItem.bulkCreate(itemRows(actor.shopId, sheet.id, input), { transaction });
		await audit.record({ shopId: actor.shopId, userId: actor.id, action: id ? 'spec.updated' : 'spec.created', entity: 'spec_sheet', entityId: sheet.id }, transaction);
		return sheet;
	});
}

export async function remove(actor: Actor, id: string) {
	const count = isUuid(id) ? await SpecSheet.destroy({ where: { id, shopId: actor.shopId } }) : 0;
	if (!count) throw new UserError('No such spec sheet in your shop.');
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'spec.deleted', entity: 'spec_sheet', entityId: id });
}

const COMMON = 'Common practice for this class of unit, no published source; the unit\'s service manual governs.';

/** Starting sheets for a new shop or the demo: typical values, each marked as such. */
export const STARTER_SHEETS: SpecSheetInput[] = [
	{
		name: '5 kW-class portable, brush-type alternator',
		appliesTo: 'Portable generators 4–7 kW, 120/240 V, brushes and slip rings with an AVR',
		notes: COMMON,
		items: [
			{ label: 'Stator main winding 1 resistance', unit: 'Ω', min: '0.3', max: '0.5', openAbove: '1000', shortBelow: '0.05', running: false, source: COMMON },
			{ label: 'Stator main winding 2 resistance', unit: 'Ω', min: '0.3', max: '0.5', openAbove: '1000', shortBelow: '0.05', running: false, source: COMMON },
			{ label: 'Exciter winding resistance', unit: 'Ω', min: '0.8', max: '1.8', openAbove: '1000', shortBelow: '0.1', running: false, source: COMMON },
			{ label: 'Rotor field resistance through brushes and slip rings', unit: 'Ω', min: '20', max: '90', openAbove: '10000', shortBelow: '1', running: false, source: COMMON },
			{ label: 'Brush length', unit: 'mm', min: '5', max: '20', openAbove: null, shortBelow: null, running: false, source: COMMON },
			{ label: 'Insulation resistance, windings to frame (500 V test)', unit: 'MΩ', min: '1', max: null, openAbove: null, shortBelow: null, running: false, source: COMMON },
			{ label: 'Output voltage, line to neutral, no load', unit: 'V', min: '118', max: '128', openAbove: null, shortBelow: null, running: true, source: COMMON },
			{ label: 'Output voltage, line to line, no load', unit: 'V', min: '236', max: '256', openAbove: null, shortBelow: null, running: true, source: COMMON },
			{ label: 'No-load frequency', unit: 'Hz', min: '60', max: '63', openAbove: null, shortBelow: null, running: true, source: COMMON }
		]
	},
	{
		name: '2 kW-class inverter generator',
		appliesTo: 'Inverter generators 1.8–3.5 kW, 120 V',
		notes: COMMON,
		items: [
			{ label: 'Stator main winding resistance', unit: 'Ω', min: '0.4', max: '1.2', openAbove: '1000', shortBelow: '0.05', running: false, source: COMMON },
			{ label: 'Charge coil resistance', unit: 'Ω', min: '0.1', max: '1', openAbove: '1000', shortBelow: '0.02', running: false, source: COMMON },
			{ label: 'Output voltage, no load', unit: 'V', min: '114', max: '126', openAbove: null, shortBelow: null, running: true, source: COMMON },
			{ label: 'Output frequency', unit: 'Hz', min: '59.5', max: '60.5', openAbove: null, shortBelow: null, running: true, source: COMMON }
		]
	},
	{
		name: 'Home standby, 20 kW-class',
		appliesTo: 'Air-cooled standby units 14–26 kW, 120/240 V',
		notes: COMMON + ' Work on standby units follows local electrical code; the transfer switch is a licensed electrician\'s job.',
		items: [
			{ label: 'Stator power winding resistance', unit: 'Ω', min: '0.05', max: '0.2', openAbove: '1000', shortBelow: '0.01', running: false, source: COMMON },
			{ label: 'Rotor field resistance', unit: 'Ω', min: '10', max: '25', openAbove: '10000', shortBelow: '1', running: false, source: COMMON },
			{ label: 'Output voltage, line to line, no load', unit: 'V', min: '236', max: '252', openAbove: null, shortBelow: null, running: true, source: COMMON },
			{ label: 'Output frequency, no load', unit: 'Hz', min: '59.5', max: '60.5', openAbove: null, shortBelow: null, running: true, source: COMMON }
		]
	}
];

/** Gives a new shop the starter sheets so readings can be judged from the first job. */
export async function seedStarterSheets(shopId: string, transaction?: Transaction) {
	for (const input of STARTER_SHEETS) {
		const sheet = await SpecSheet.create({ shopId, name: input.name, appliesTo: input.appliesTo, notes: input.notes }, { transaction });
		await SpecItem.bulkCreate(itemRows(shopId, sheet.id, input), { transaction });
	}
}
