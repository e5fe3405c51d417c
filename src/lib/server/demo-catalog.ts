import type { Transaction } from 'sequelize';
import { LabourOperation, Part, ReplacementUnit, type UnitKind } from './db/models';

// The demo shop's catalog. Part numbers, suppliers, makers and prices are invented for the scenario.

const SUPPLIER = 'Millbrook Parts Co.';
const SECOND_SUPPLIER = 'Kettle Bend Engine Supply';

const DEMO_PARTS: { number: string; description: string; cost: string; supplier: string; stock: number; specialOrder: boolean }[] = [
	{ number: 'MPC-AH5500', description: 'Alternator head assembly, complete, 5.5 kW 120/240 V portable', cost: '312.00', supplier: SUPPLIER, stock: 0, specialOrder: true },
	{ number: 'MPC-RT5500', description: 'Rotor (field) assembly with slip rings, 5.5 kW portable', cost: '148.50', supplier: SUPPLIER, stock: 1, specialOrder: false },
	{ number: 'MPC-ST5500', description: 'Stator, 120/240 V windings, 5.5 kW portable', cost: '176.00', supplier: SUPPLIER, stock: 0, specialOrder: true },
	{ number: 'MPC-BH220', description: 'Brush holder assembly with brushes', cost: '18.75', supplier: SUPPLIER, stock: 6, specialOrder: false },
	{ number: 'MPC-AVR57', description: 'Automatic voltage regulator (AVR), 5–7 kW portable', cost: '39.90', supplier: SUPPLIER, stock: 3, specialOrder: false },
	{ number: 'MPC-CAP30', description: 'Capacitor 30 µF 450 V, brushless alternators', cost: '11.40', supplier: SUPPLIER, stock: 5, specialOrder: false },
	{ number: 'KBE-CK389', description: 'Carburettor rebuild kit (gaskets, needle, float), 389 cc engines', cost: '14.20', supplier: SECOND_SUPPLIER, stock: 8, specialOrder: false },
	{ number: 'KBE-CB389', description: 'Carburettor, complete, 389 cc engines', cost: '36.80', supplier: SECOND_SUPPLIER, stock: 2, specialOrder: false },
	{ number: 'KBE-RS389', description: 'Recoil starter assembly, 389–420 cc engines', cost: '27.60', supplier: SECOND_SUPPLIER, stock: 2, specialOrder: false },
	{ number: 'KBE-SP7', description: 'Spark plug, resistor type', cost: '3.15', supplier: SECOND_SUPPLIER, stock: 24, specialOrder: false },
	{ number: 'KBE-OIL1030', description: 'Engine oil 10W-30, 0.6 L (one fill)', cost: '4.80', supplier: SECOND_SUPPLIER, stock: 30, specialOrder: false },
	{ number: 'MPC-OUT-L1430', description: 'Locking outlet 30 A 125/250 V (NEMA L14-30), panel mount', cost: '16.95', supplier: SUPPLIER, stock: 4, specialOrder: false },
	{ number: 'MPC-CB30', description: 'Main circuit breaker 30 A, 2-pole, portable panel', cost: '21.30', supplier: SUPPLIER, stock: 2, specialOrder: false },
	{ number: 'KBE-FF01', description: 'Inline fuel filter with hose clamps', cost: '2.40', supplier: SECOND_SUPPLIER, stock: 15, specialOrder: false }
];

const DEMO_LABOUR: { name: string; hours: string }[] = [
	{ name: 'Diagnose no output', hours: '1.00' },
	{ name: 'Replace alternator head (portable)', hours: '2.50' },
	{ name: 'Replace rotor (portable)', hours: '2.00' },
	{ name: 'Replace stator (portable)', hours: '2.20' },
	{ name: 'Replace brushes and clean slip rings', hours: '0.80' },
	{ name: 'Replace AVR', hours: '0.70' },
	{ name: 'Replace capacitor', hours: '0.50' },
	{ name: 'Rebuild carburettor', hours: '1.20' },
	{ name: 'Replace recoil starter', hours: '0.60' },
	{ name: 'Flash the field (restore residual magnetism)', hours: '0.40' },
	{ name: 'Tune-up: plug, oil, air filter, fuel filter', hours: '1.00' },
	{ name: 'Load test after repair', hours: '0.50' }
];

const DEMO_REPLACEMENTS: { kind: UnitKind; name: string; ratedWatts: number; priceNew: string; lifeYears: string; lifeHours: string }[] = [
	{ kind: 'portable', name: 'Harrowgate PG-5500 5.5 kW portable', ratedWatts: 5500, priceNew: '899.00', lifeYears: '10.0', lifeHours: '1500' },
	{ kind: 'portable', name: 'Ostrander FieldPro 5000 5 kW portable', ratedWatts: 5000, priceNew: '749.00', lifeYears: '10.0', lifeHours: '1500' },
	{ kind: 'portable', name: 'Brevik Power BP-7500E 7.5 kW portable, electric start', ratedWatts: 7500, priceNew: '1149.00', lifeYears: '10.0', lifeHours: '1500' },
	{ kind: 'inverter', name: 'Harrowgate Quietline 2200i inverter', ratedWatts: 1800, priceNew: '629.00', lifeYears: '10.0', lifeHours: '2000' },
	{ kind: 'inverter', name: 'Brevik Power BP-3600i inverter', ratedWatts: 3000, priceNew: '1049.00', lifeYears: '10.0', lifeHours: '2000' },
	{ kind: 'standby', name: 'Ostrander HomeGuard 14 kW standby', ratedWatts: 14000, priceNew: '4290.00', lifeYears: '20.0', lifeHours: '30000' },
	{ kind: 'standby', name: 'Brevik Power 22 kW standby', ratedWatts: 22000, priceNew: '5790.00', lifeYears: '20.0', lifeHours: '30000' },
	{ kind: 'pressure_washer', name: 'Harrowgate JetLine 3100 PSI pressure washer', ratedWatts: 0, priceNew: '429.00', lifeYears: '8.0', lifeHours: '500' }
];

/** Adds the demo catalog to a shop; rows whose part number or name the shop already has are left alone. */
export async function seedDemoCatalog(shopId: string, transaction?: Transaction): Promise<void> {
	const options = { transaction, ignoreDuplicates: true };
	await Part.bulkCreate(DEMO_PARTS.map((p) => ({ ...p, shopId })), options);
	await LabourOperation.bulkCreate(DEMO_LABOUR.map((l) => ({ ...l, shopId })), options);
	await ReplacementUnit.bulkCreate(DEMO_REPLACEMENTS.map((r) => ({ ...r, shopId })), options);
}
