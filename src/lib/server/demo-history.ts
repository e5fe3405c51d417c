import { createHash } from 'node:crypto';
import { Decimal } from 'decimal.js';
import type { InferCreationAttributes } from 'sequelize';
import { EXPECTED_LIFE, type JobStatus, type UnitKind } from '../domain';
import { evaluateRequest, type PricingResult } from '../pricing/evaluate';
import { settingsToJson } from '../pricing/settings';
import { db } from './db';
import { Approval, AuditEvent, Customer, Job, Quote, QuoteVersion, Unit } from './db/models';
import { Payment } from './db/payment-models';
import { JobExtraPart, JobLabour } from './db/report-models';
import { refreshBoardColumns } from './jobs';
import { canonicalJson } from './quotes';
import * as settings from './settings';

/*
 * Eighteen months of finished jobs for the demo shop, so every report means something on first
 * start: quotes priced by the engine, the customers' answers, the money taken at the counter and
 * the hours really spent. Every
 * person, maker and part here is invented. A fixed seed makes the history the same on every load.
 */

export interface HistoryStaff {
	/** People who work at the bench; the first does most of the work. */
	technicians: string[];
	/** Who sends the quotes. */
	writer: string;
}

const MONTHS = 18;
/** The demo shop's bench labour cost per hour when its settings give none (wages and overhead). Invented. */
export const DEMO_LABOUR_COST_RATE = '38.00';

/** mulberry32: a small seeded generator, so the invented history is repeatable. */
function generator(seed: number) {
	let a = seed >>> 0;
	const next = () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
	return {
		next,
		pick: <T>(list: readonly T[]): T => list[Math.floor(next() * list.length)],
		between: (low: number, high: number) => low + next() * (high - low),
		chance: (p: number) => next() < p
	};
}

const FIRST = ['Orla', 'Benedikt', 'Saoirse', 'Thaddeus', 'Yelena', 'Corwin', 'Marisol', 'Anselm', 'Ffion', 'Lazlo', 'Perpetua', 'Rufus', 'Delphine', 'Osric', 'Tamsin', 'Valko'];
const LAST = ['Brackenridge', 'Thistlewood', 'Morrow', 'Quennell', 'Ashdown', 'Penberthy', 'Kilbride', 'Stroud', 'Velasko', 'Hathersage', 'Dunmore', 'Leverett'];
const STREETS = ['Mill Race', 'Copperbeech Lane', 'Old Turnpike', 'Heron Row', 'Slate Quarry Road', 'Lantern Street'];
const MAKERS = ['Harrowgate', 'Ostrander', 'Brevik Power', 'Kestrel', 'Tamworth Engines'];

export interface Template {
	complaint: string;
	repair: string;
	lines: Record<string, unknown>[];
}

const load = { kind: 'labour', description: 'Load test after repair', hours: '0.5' };
const part = (description: string, unitCost: string, extra: Record<string, unknown> = {}) => ({ kind: 'part', description, quantity: '1', unitCost, ...extra });
const labour = (description: string, hours: string) => ({ kind: 'labour', description, hours });

export const TEMPLATES: Record<UnitKind, Template[]> = {
	portable: [
		{ complaint: 'Runs but no power at the outlets.', repair: 'Replace brushes and clean slip rings', lines: [part('Brush holder assembly with brushes', '18.75'), labour('Replace brushes and clean slip rings', '0.8'), load] },
		{ complaint: 'Voltage swings and lights flicker under load.', repair: 'Replace the voltage regulator', lines: [part('Automatic voltage regulator, 5–7 kW', '39.90'), labour('Replace AVR', '0.7'), load] },
		{ complaint: 'No output; rotor reads open.', repair: 'Replace the rotor', lines: [part('Rotor (field) assembly with slip rings', '148.50'), labour('Replace rotor', '2.0'), load] },
		{ complaint: 'Burnt smell, then no output at all.', repair: 'Replace the alternator head', lines: [part('Alternator head assembly, 5.5 kW', '312.00', { specialOrder: true }), labour('Replace alternator head', '2.5'), load] },
		{ complaint: 'Will not start after sitting all winter.', repair: 'Rebuild the carburettor', lines: [part('Carburettor rebuild kit', '14.20'), part('Spark plug, resistor type', '3.15'), labour('Rebuild carburettor', '1.2')] }
	],
	inverter: [
		{ complaint: 'Overload light comes on with a small load.', repair: 'Replace the inverter module', lines: [part('Inverter module, 2.2 kW', '214.00', { specialOrder: true }), labour('Replace inverter module', '1.5'), load] },
		{ complaint: 'Surges at idle, stalls in eco mode.', repair: 'Rebuild the carburettor', lines: [part('Carburettor rebuild kit, 79 cc', '12.60'), labour('Rebuild carburettor', '1.1')] },
		{ complaint: 'Pull cord snapped.', repair: 'Replace the recoil starter', lines: [part('Recoil starter assembly', '24.30'), labour('Replace recoil starter', '0.6')] }
	],
	standby: [
		{ complaint: 'Did not take over during the last outage.', repair: 'Replace the controller board', lines: [part('Controller board, 20 kW standby', '386.00', { specialOrder: true }), labour('Replace controller and set up', '2.5'), labour('Transfer test under load', '1.0')] },
		{ complaint: 'Weekly exercise fails with a low battery warning.', repair: 'Replace the starting battery', lines: [part('Starting battery, group 26R', '68.00'), labour('Replace battery and test', '0.5')] },
		{ complaint: 'Runs rough, high-temperature shutdown.', repair: 'Service the cooling and ignition', lines: [part('Spark plugs, set of two', '9.80'), part('Air filter element', '16.40'), labour('Service cooling and ignition', '1.8')] }
	],
	pressure_washer: [
		{ complaint: 'Pressure drops and pulses.', repair: 'Replace the unloader valve', lines: [part('Unloader valve', '28.40'), labour('Replace unloader valve', '0.8')] },
		{ complaint: 'Pump leaks water from the crankcase.', repair: 'Replace the pump', lines: [part('Axial pump, 3100 psi', '122.00'), labour('Replace pump', '1.5')] }
	],
	other: [
		{ complaint: 'Hard to start, smokes on start-up.', repair: 'Tune-up', lines: [part('Spark plug, resistor type', '3.15'), part('Engine oil 10W-30, one fill', '4.80'), labour('Tune-up', '1.0')] },
		{ complaint: 'Pull cord will not retract.', repair: 'Replace the recoil starter', lines: [part('Recoil starter assembly, 160–200 cc', '21.90'), labour('Replace recoil starter', '0.6')] }
	]
};

const REPLACEMENT: Record<UnitKind, { description: string; cost: string; price: string }> = {
	portable: { description: 'New 5.5 kW portable generator', cost: '640.00', price: '899.00' },
	inverter: { description: 'New 2.2 kW inverter generator', cost: '520.00', price: '749.00' },
	standby: { description: 'New 20 kW home standby generator, installed', cost: '4200.00', price: '5600.00' },
	pressure_washer: { description: 'New 3100 psi pressure washer', cost: '260.00', price: '379.00' },
	other: { description: 'New equivalent machine', cost: '300.00', price: '429.00' }
};

/** A quote draft as the demo's shop would write it: one repair, a new unit, or decline. */
export function historyDraft(
	kind: UnitKind,
	template: Template,
	lines: Record<string, unknown>[],
	unit: { description: string; ageYears: string; engineHours: string; condition: string },
	fee: string,
	creditDiagnosticFee: boolean
) {
	const replacement = REPLACEMENT[kind];
	const life = EXPECTED_LIFE[kind];
	return {
		unit: { ...unit, lifeYears: String(life.years), lifeHours: String(life.hours), asIsValue: '0', annualUpkeep: '0' },
		options: [
			{ label: template.repair, kind: 'repair', creditDiagnosticFee, lines },
			{ label: replacement.description, kind: 'replacement', lines: [{ kind: 'unit', ...replacement }], lifeYears: String(life.years), lifeHours: String(life.hours) },
			{ label: 'Decline the repair', kind: 'decline', lines: [{ kind: 'fee', description: 'Diagnostic fee', amount: fee, feeType: 'diagnostic' }] }
		]
	};
}

const KIND_WEIGHTS: [UnitKind, number][] = [['portable', 0.5], ['inverter', 0.2], ['standby', 0.12], ['pressure_washer', 0.12], ['other', 0.06]];

const DAY = 86_400_000;
const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');
const money = (value: number) => value.toFixed(2);

/** Loads the history once per shop; returns how many jobs it added (0 when it was already there). */
export async function seedDemoHistory(shopId: string, staff: HistoryStaff, now = new Date()): Promise<number> {
	if (staff.technicians.length === 0) throw new Error('the demo history needs at least one technician');
	if (await Job.count({ where: { shopId, number: 1000 } })) return 0;
	const random = generator(20261202);
	const shopSettings = await settings.get(shopId);
	const pricing = settingsToJson(shopSettings.pricing);
	const requestSettings = { ...pricing, labourCostRate: shopSettings.pricing.labourCostRate.gt(0) ? pricing.labourCostRate : DEMO_LABOUR_COST_RATE };
	const kindOf = () => {
		let roll = random.next();
		for (const [kind, weight] of KIND_WEIGHTS) if ((roll -= weight) < 0) return kind;
		return 'portable' as UnitKind;
	};

	// Plan every job first, then write them in a few bulk inserts.
	const start = now.getTime() - MONTHS * 30.4 * DAY;
	const plans: { openedAt: Date; kind: UnitKind }[] = [];
	for (let day = 0; day < MONTHS * 30.4 - 1; day++) {
		const at = new Date(start + day * DAY);
		// Busier after summer storms and in the winter cold; quiet in spring. Invented.
		const month = at.getUTCMonth();
		const perDay = [1.2, 1.1, 0.7, 0.6, 0.7, 0.9, 1.3, 1.4, 1.1, 0.8, 0.9, 1.3][month];
		const count = Math.floor(perDay + random.next());
		for (let i = 0; i < count; i++) plans.push({ openedAt: new Date(at.getTime() + random.between(8, 17) * 3_600_000), kind: kindOf() });
	}

	const customers = await Customer.bulkCreate(
		Array.from({ length: Math.ceil(plans.length / 3) }, (_, i) => {
			const name = `${FIRST[i % FIRST.length]} ${LAST[(i * 7 + Math.floor(i / FIRST.length)) % LAST.length]}`;
			const phone = `555-${String(2000 + i).padStart(4, '0')}`;
			const email = `${name.toLowerCase().replace(/\s+/g, '.')}.${i}@example.net`;
			const address = `${10 + (i % 80)} ${STREETS[i % STREETS.length]}, Millbrook`;
			return { shopId, name, phone, email, address, searchText: [name, phone, email, address].join(' ').toLowerCase() };
		}),
		{ returning: true }
	);

	const units = await Unit.bulkCreate(
		plans.map((plan, i) => {
			const year = now.getUTCFullYear() - Math.floor(random.between(1, plan.kind === 'standby' ? 14 : 9));
			return {
				shopId,
				customerId: customers[i % customers.length].id,
				kind: plan.kind,
				maker: random.pick(MAKERS),
				model: `${plan.kind === 'standby' ? 'HS' : plan.kind === 'inverter' ? 'Q' : 'PG'}-${1000 + Math.floor(random.next() * 8000)}`,
				serial: `DH${String(i + 1).padStart(5, '0')}`,
				engineHours: (Math.floor(random.between(20, 900)) + 0.5).toFixed(1),
				yearBought: year,
				condition: random.pick(['excellent', 'good', 'good', 'fair', 'poor'] as const)
			};
		}),
		{ returning: true }
	);

	const firstNumber = 1001 - plans.length;
	const jobRows: Partial<InferCreationAttributes<Job>>[] = [];
	const quoteRows: Partial<InferCreationAttributes<Quote>>[] = [];
	const versionPlans: { jobIndex: number; number: number; content: Record<string, unknown>; result: PricingResult; sentAt: Date }[] = [];
	const decisions: { jobIndex: number; decision: 'approved' | 'declined'; optionIndex: number | null; label: string | null; at: Date }[] = [];
	const labourRows: { jobIndex: number; technicianId: string; hours: string; workedOn: string; at: Date }[] = [];
	const partRows: { jobIndex: number; description: string; unitCost: string; at: Date }[] = [];
	// Money taken at the counter: the deposit soon after approval, the rest (or, after a decline, the
	// diagnostic fee) when the unit goes home.
	const paymentPlans: { jobIndex: number; due: 'deposit' | 'rest'; at: Date }[] = [];
	const statusPaths: { jobIndex: number; steps: { to: JobStatus; at: Date; by: string | null }[] }[] = [];

	plans.forEach((plan, i) => {
		const unit = units[i];
		const template = random.pick(TEMPLATES[plan.kind]);
		const technician = random.chance(0.7) ? staff.technicians[0] : random.pick(staff.technicians);
		const fee = plan.kind === 'standby' ? '149.00' : '89.00';
		const jitter = (value: string) => money(Number(value) * random.between(0.9, 1.12));
		const lines = template.lines.map((line) => (line.kind === 'part' ? { ...line, unitCost: jitter(line.unitCost as string) } : line));
		const draft = historyDraft(plan.kind, template, lines, {
			description: [unit.maker, unit.model].join(' '),
			ageYears: String(Math.max(0, now.getUTCFullYear() - (unit.yearBought ?? now.getUTCFullYear()))),
			engineHours: unit.engineHours ?? '0',
			condition: unit.condition
		}, fee, random.chance(0.5));
		const content = { currency: shopSettings.currency, diagnosticFee: fee, unit: draft.unit, options: draft.options, settings: requestSettings };
		const priced = evaluateRequest(content);
		if (!priced.ok) throw new Error(`demo history quote did not price: ${priced.message}`);

		const opened = plan.openedAt;
		// Nothing in the story happens after now: each later step is cut off at the present.
		const firstSent = new Date(Math.min(opened.getTime() + random.between(0.3, 3) * DAY, now.getTime() - 3_600_000));
		const age = now.getTime() - opened.getTime();
		jobRows.push({
			shopId, number: firstNumber + i, unitId: unit.id, customerId: unit.customerId, complaint: template.complaint, status: 'picked_up',
			technicianId: technician, diagnosticFee: fee, createdBy: staff.writer, createdAt: opened, updatedAt: opened, statusChangedAt: opened
		});
		quoteRows.push({ shopId, jobId: '', draft: draft as unknown as Record<string, unknown>, sentVersions: 1, editedSinceSend: false, updatedBy: technician, createdAt: opened, updatedAt: firstSent });
		versionPlans.push({ jobIndex: i, number: 1, content, result: priced.result, sentAt: firstSent });

		const steps: { to: JobStatus; at: Date; by: string | null }[] = [
			{ to: 'checked_in', at: opened, by: staff.writer },
			{ to: 'diagnosing', at: new Date(opened.getTime() + 0.2 * DAY), by: technician },
			{ to: 'quoted', at: firstSent, by: staff.writer }
		];
		// The newest jobs are still waiting for an answer.
		const waiting = () => {
			statusPaths.push({ jobIndex: i, steps });
			jobRows[i].status = 'quoted';
			jobRows[i].statusChangedAt = firstSent;
		};
		if (age < 4 * DAY && random.chance(0.6)) return waiting();
		let sentAt = firstSent;
		// Some customers ask for a second look before answering: a second version, same options.
		const secondSent = random.chance(0.12) ? new Date(firstSent.getTime() + random.between(1, 4) * DAY) : null;
		if (secondSent && secondSent.getTime() < now.getTime()) {
			sentAt = secondSent;
			const second = { ...content, unit: { ...draft.unit, asIsValue: '25' } };
			const repriced = evaluateRequest(second);
			if (!repriced.ok) throw new Error(`demo history quote did not price: ${repriced.message}`);
			versionPlans.push({ jobIndex: i, number: 2, content: second, result: repriced.result, sentAt });
			quoteRows[i].sentVersions = 2;
		}
		const decidedAt = new Date(sentAt.getTime() + Math.min(20, -Math.log(1 - random.next()) * 2.2 + 0.1) * DAY);
		if (decidedAt.getTime() >= now.getTime()) return waiting();
		const oldUnit = (unit.condition === 'poor' || unit.condition === 'fair') && random.chance(0.45);
		const roll = random.next();
		const outcome = roll < 0.16 ? 'declined' : oldUnit || roll > 0.9 ? 'replaced' : 'repaired';
		const optionIndex = outcome === 'repaired' ? 0 : outcome === 'replaced' ? 1 : null;
		decisions.push({
			jobIndex: i,
			decision: outcome === 'declined' ? 'declined' : 'approved',
			optionIndex,
			label: optionIndex === null ? null : draft.options[optionIndex].label,
			at: decidedAt
		});
		steps.push({ to: outcome === 'declined' ? 'declined' : 'approved', at: decidedAt, by: null });
		if (outcome === 'declined') {
			const collected = new Date(decidedAt.getTime() + random.between(1, 5) * DAY);
			if (collected.getTime() < now.getTime()) {
				steps.push({ to: 'picked_up', at: collected, by: staff.writer });
				paymentPlans.push({ jobIndex: i, due: 'rest', at: collected });
			}
		} else {
			const depositAt = new Date(decidedAt.getTime() + random.between(0.05, 0.5) * DAY);
			if (depositAt.getTime() < now.getTime()) paymentPlans.push({ jobIndex: i, due: 'deposit', at: depositAt });
			const started = new Date(decidedAt.getTime() + random.between(0.5, outcome === 'repaired' && template.lines.some((l) => l.specialOrder) ? 7 : 2) * DAY);
			const finished = new Date(started.getTime() + random.between(0.2, 2) * DAY);
			if (started.getTime() < now.getTime()) steps.push({ to: 'in_repair', at: started, by: technician });
			if (finished.getTime() < now.getTime()) steps.push({ to: 'ready', at: finished, by: technician });
			const handedBack = new Date(finished.getTime() + random.between(0.5, 4) * DAY);
			if (handedBack.getTime() < now.getTime()) {
				steps.push({ to: 'picked_up', at: handedBack, by: staff.writer });
				paymentPlans.push({ jobIndex: i, due: 'rest', at: handedBack });
			}
			if (outcome === 'repaired' && finished.getTime() < now.getTime()) {
				// Hours really spent: most jobs near the book time, some well over it.
				const billed = lines.filter((l) => l.kind === 'labour').reduce((sum, l) => sum + Number(l.hours), 0);
				const factor = random.chance(0.15) ? random.between(1.3, 2.2) : random.between(0.75, 1.2);
				const spent = Math.max(0.25, Math.round(billed * factor * 4) / 4);
				const helper = staff.technicians.find((t) => t !== technician);
				if (helper && random.chance(0.2)) {
					const share = Math.max(0.25, Math.round(spent * 0.3 * 4) / 4);
					labourRows.push({ jobIndex: i, technicianId: helper, hours: share.toFixed(2), workedOn: finished.toISOString().slice(0, 10), at: finished });
					if (spent - share > 0) labourRows.push({ jobIndex: i, technicianId: technician, hours: (spent - share).toFixed(2), workedOn: finished.toISOString().slice(0, 10), at: finished });
				} else {
					labourRows.push({ jobIndex: i, technicianId: technician, hours: spent.toFixed(2), workedOn: finished.toISOString().slice(0, 10), at: finished });
				}
				if (random.chance(0.12)) {
					partRows.push({ jobIndex: i, description: random.pick(['Gasket set', 'Fuel line and clamps', 'Replacement fasteners', 'Second brush holder (first one cracked)', 'Outlet, 20 A duplex']), unitCost: money(random.between(4, 48)), at: finished });
				}
			}
		}
		statusPaths.push({ jobIndex: i, steps });
		const last = steps[steps.length - 1];
		jobRows[i].status = last.to;
		jobRows[i].statusChangedAt = last.at;
		jobRows[i].updatedAt = last.at;
	});

	await db().transaction(async (transaction) => {
		const jobs = await Job.bulkCreate(jobRows as InferCreationAttributes<Job>[], { transaction, returning: true });
		await refreshBoardColumns({ jobIds: jobs.map((j) => j.id) }, transaction);
		quoteRows.forEach((row, i) => (row.jobId = jobs[i].id));
		const quotes = await Quote.bulkCreate(quoteRows as InferCreationAttributes<Quote>[], { transaction, returning: true });
		const versions = await QuoteVersion.bulkCreate(
			versionPlans.map((v) => {
				const content = JSON.parse(JSON.stringify(v.content));
				return {
					shopId,
					quoteId: quotes[v.jobIndex].id,
					number: v.number,
					content,
					result: JSON.parse(JSON.stringify(v.result)),
					contentHash: sha256(canonicalJson(content)),
					currency: shopSettings.currency,
					validUntil: new Date(v.sentAt.getTime() + shopSettings.quoteValidityDays * DAY).toISOString().slice(0, 10),
					sentBy: staff.writer,
					sentAt: v.sentAt
				};
			}),
			{ transaction, returning: true }
		);
		const newest = new Map<number, QuoteVersion>();
		versionPlans.forEach((v, k) => {
			if ((newest.get(v.jobIndex)?.number ?? 0) < v.number) newest.set(v.jobIndex, versions[k]);
		});
		await Approval.bulkCreate(
			decisions.map((d) => {
				const version = newest.get(d.jobIndex)!;
				return {
					shopId,
					quoteId: quotes[d.jobIndex].id,
					versionId: version.id,
					decision: d.decision,
					optionIndex: d.optionIndex,
					optionLabel: d.label,
					signerName: d.decision === 'approved' ? customers[d.jobIndex % customers.length].name : null,
					reason: d.decision === 'declined' ? 'Not worth it for us right now.' : '',
					clientAddress: 'demo history',
					versionHash: version.contentHash,
					createdAt: d.at
				};
			}),
			{ transaction }
		);
		// Amounts come from the answered version's own figures, as the payments page works them out.
		const answered = new Map(decisions.map((d) => [d.jobIndex, d]));
		await Payment.bulkCreate(
			paymentPlans.flatMap((plan) => {
				const result = newest.get(plan.jobIndex)!.result as unknown as PricingResult;
				const decision = answered.get(plan.jobIndex)!;
				const option = decision.optionIndex === null ? result.options.find((o) => o.kind === 'decline') : result.options[decision.optionIndex];
				if (!option) return [];
				const deposit = decision.decision === 'approved' ? new Decimal(option.deposit) : new Decimal(0);
				const amount = plan.due === 'deposit' ? deposit : new Decimal(option.authorised).minus(deposit);
				if (amount.lte(0)) return [];
				return [{
					shopId, jobId: jobs[plan.jobIndex].id, quoteId: quotes[plan.jobIndex].id,
					kind: plan.due === 'deposit' ? ('deposit' as const) : ('balance' as const),
					method: random.chance(0.6) ? ('terminal' as const) : ('cash' as const),
					amount: amount.toFixed(2), currency: shopSettings.currency, status: 'paid' as const,
					reference: `Receipt ${jobRows[plan.jobIndex].number}${plan.due === 'deposit' ? '-D' : '-B'}`, createdBy: staff.writer, paidAt: plan.at, createdAt: plan.at, updatedAt: plan.at
				}];
			}),
			{ transaction }
		);
		await JobLabour.bulkCreate(
			labourRows.map((l) => ({ shopId, jobId: jobs[l.jobIndex].id, technicianId: l.technicianId, hours: l.hours, workedOn: l.workedOn, recordedBy: l.technicianId, createdAt: l.at })),
			{ transaction }
		);
		await JobExtraPart.bulkCreate(
			partRows.map((p) => ({ shopId, jobId: jobs[p.jobIndex].id, description: p.description, quantity: '1', unitCost: p.unitCost, recordedBy: jobRows[p.jobIndex].technicianId ?? null, createdAt: p.at })),
			{ transaction }
		);
		await AuditEvent.bulkCreate(
			statusPaths.flatMap(({ jobIndex, steps }) =>
				steps.map((step, k) => ({
					shopId,
					userId: step.by,
					action: 'job.status',
					entity: 'job',
					entityId: jobs[jobIndex].id,
					detail: { from: k === 0 ? null : steps[k - 1].to, to: step.to },
					createdAt: step.at
				}))
			),
			{ transaction }
		);
	});
	return plans.length;
}
