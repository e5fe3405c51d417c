// The shop's vocabulary, shared by server and pages: kinds, statuses and their plain-word labels.
import { today } from './dates';

export const UNIT_KINDS = ['portable', 'inverter', 'standby', 'pressure_washer', 'other'] as const;
export type UnitKind = (typeof UNIT_KINDS)[number];
export const UNIT_KIND_LABELS: Record<UnitKind, string> = {
	portable: 'Portable generator',
	inverter: 'Inverter generator',
	standby: 'Home standby generator',
	pressure_washer: 'Pressure washer',
	other: 'Other small engine'
};

export const VOLTAGES = ['120', '120/240'] as const;
export const VOLTAGE_LABELS: Record<(typeof VOLTAGES)[number], string> = { '120': '120 V', '120/240': '120/240 V' };

export const FUELS = ['gasoline', 'propane', 'natural_gas', 'diesel', 'dual_fuel', 'tri_fuel'] as const;
export const FUEL_LABELS: Record<(typeof FUELS)[number], string> = {
	gasoline: 'Gasoline',
	propane: 'Propane',
	natural_gas: 'Natural gas',
	diesel: 'Diesel',
	dual_fuel: 'Dual fuel',
	tri_fuel: 'Tri-fuel'
};

export const CONDITIONS = ['excellent', 'good', 'fair', 'poor'] as const;
export const CONDITION_LABELS: Record<(typeof CONDITIONS)[number], string> = {
	excellent: 'Excellent',
	good: 'Good',
	fair: 'Fair',
	poor: 'Poor'
};

export const JOB_STATUSES = ['checked_in', 'diagnosing', 'quoted', 'approved', 'declined', 'in_repair', 'ready', 'picked_up'] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];
export const STATUS_LABELS: Record<JobStatus, string> = {
	checked_in: 'Checked in',
	diagnosing: 'Diagnosing',
	quoted: 'Quoted',
	approved: 'Approved',
	declined: 'Declined',
	in_repair: 'In repair',
	ready: 'Ready for pick-up',
	picked_up: 'Picked up'
};

/** The only moves a job may make. A declined unit still goes home with its owner. */
export const NEXT_STATUSES: Record<JobStatus, readonly JobStatus[]> = {
	checked_in: ['diagnosing'],
	diagnosing: ['quoted'],
	quoted: ['approved', 'declined', 'diagnosing'],
	approved: ['in_repair'],
	declined: ['picked_up'],
	in_repair: ['ready'],
	ready: ['picked_up'],
	picked_up: []
};

/** The button that makes each move, in the shop's words. */
export const MOVE_LABELS: Record<JobStatus, string> = {
	checked_in: 'Check in',
	diagnosing: 'Start diagnosis',
	quoted: 'Mark as quoted',
	approved: 'Record approval',
	declined: 'Record decline',
	in_repair: 'Start the repair',
	ready: 'Repair finished',
	picked_up: 'Handed back'
};

/** Past its promised day and not yet ready: the board and the job page flag it. */
export function isOverdue(promisedOn: string | null, status: JobStatus, now: Date = new Date()): boolean {
	return promisedOn !== null && !['ready', 'picked_up', 'declined'].includes(status) && promisedOn.slice(0, 10) < today(now);
}

/** A status's place along a job's path, from 1 (the `status_rank` the board sorts by, migration 0014). */
export function statusRank(status: JobStatus): number {
	return JOB_STATUSES.indexOf(status) + 1;
}

/** A move back (a quoted unit taken down again for a second look) is named and shown as one. */
export function isStepBack(from: JobStatus, to: JobStatus): boolean {
	return statusRank(to) < statusRank(from);
}

export function moveLabel(from: JobStatus, to: JobStatus): string {
	return from === 'quoted' && to === 'diagnosing' ? 'Back to diagnosis' : MOVE_LABELS[to];
}

export const READING_RESULTS = ['pass', 'low', 'high', 'open', 'short', 'noted'] as const;
export type ReadingResult = (typeof READING_RESULTS)[number];
export const RESULT_LABELS: Record<ReadingResult, string> = {
	pass: 'In spec',
	low: 'Low',
	high: 'High',
	open: 'Open circuit',
	short: 'Short',
	noted: 'Noted'
};

export const MEASURE_UNITS = ['Ω', 'kΩ', 'MΩ', 'V', 'A', 'Hz', 'mm', 'µF', 'rpm', 'psi'] as const;

export function describeUnit(unit: { maker?: string | null; model?: string | null; kind: UnitKind }): string {
	const name = [unit.maker, unit.model].filter(Boolean).join(' ');
	return name ? `${name} · ${UNIT_KIND_LABELS[unit.kind].toLowerCase()}` : UNIT_KIND_LABELS[unit.kind];
}

/** Expected life of a unit by kind, used until the replacement catalog says otherwise.
 * Common practice for residential-duty equipment, no published source. */
export const EXPECTED_LIFE: Record<UnitKind, { years: number; hours: number }> = {
	portable: { years: 10, hours: 1500 },
	inverter: { years: 10, hours: 2000 },
	standby: { years: 20, hours: 30000 },
	pressure_washer: { years: 8, hours: 500 },
	other: { years: 10, hours: 1000 }
};

/** The first repair or replacement option with no lines (in itself or its stages): sent, it would reach the customer priced at nothing. */
export function emptyOption<T extends { kind: string; lines?: unknown[]; stages?: { lines?: unknown[] }[] | null }>(options: T[]): T | undefined {
	return options.find((o) => o.kind !== 'decline' && !o.lines?.length && !(o.stages ?? []).some((stage) => stage.lines?.length));
}

/** Why such an option cannot be sent, in the builder and from the server alike. */
export const emptyOptionMessage = (label: string) => `"${label || 'An option'}" has nothing in it yet: add its parts and labour, or remove it, before sending.`;

/** The estimate reference printed for a sent version: the start of its content hash, the same on every screen, e-mail and PDF. */
export function estimateReference(contentHash: string): string {
	return contentHash.slice(0, 12);
}
