// Measures the pricing engine: evaluations per second for 5-, 20- and 100-line quotes (a repair
// against a replacement, with the full repair-or-replace economics), beside a plain-number baseline
// doing the same arithmetic and building the same strings. Bounded: about ten seconds in all.
import { cpus, loadavg } from 'node:os';
import { evaluate, evaluateRequest, resolveSettings } from '../src/lib/pricing/evaluate';
import { pricingRequestSchema, type PricingRequest, type PricingRequestInput } from '../src/lib/pricing/schema';
import type { PricingSettings } from '../src/lib/pricing/settings';

const ROUND_MS = 50;
const ROUNDS = 7;

type LineBody = Record<string, unknown>;

/** A quote of `total` lines: the repair holds total − 2, the replacement a new unit and a disposal fee. */
function quoteBody(total: number, engineHours = '420', statedLife: string | undefined = '4'): PricingRequestInput {
	const lines: LineBody[] = [];
	for (let k = 0; k < total - 2; k++) {
		switch (k % 4) {
			case 0:
				lines.push({ kind: 'part', description: `Part ${k}`, quantity: String(1 + (k % 3)), unitCost: (7.35 + k * 3.17).toFixed(2), specialOrder: k % 7 === 0 });
				break;
			case 1:
				lines.push({ kind: 'labour', description: `Labour step ${k}`, hours: '0.75' });
				break;
			case 2:
				lines.push({ kind: 'part', description: `Part ${k}`, quantity: '2', unitCost: (42.1 + k).toFixed(2) });
				break;
			default:
				lines.push({ kind: 'fee', description: `Fee ${k}`, amount: '12.50' });
		}
	}
	return {
		currency: 'USD',
		settings: { taxRate: '0.0725' },
		unit: { description: 'Harrowgate PG-5500', ageYears: '4', engineHours, lifeYears: '10', lifeHours: '1500', condition: 'good', asIsValue: '40' },
		options: [
			{ label: 'Rebuild the alternator head', kind: 'repair', ...(statedLife ? { lifeYears: statedLife } : {}), lines: lines as never },
			{
				label: 'New 5,500 W unit',
				kind: 'replacement',
				lines: [
					{ kind: 'unit', description: 'New 5,500 W portable', cost: '720.00', price: '899.00' },
					{ kind: 'fee', description: 'Disposal of the old unit', amount: '25.00' }
				]
			}
		]
	};
}

/**
 * Median CPU microseconds per call over several short rounds. CPU time of this process, not wall
 * time, so a busy neighbour on the machine does not count against the engine.
 */
function measure(run: (k: number) => unknown): number {
	const perCall: number[] = [];
	let k = 0;
	for (let round = 0; round < ROUNDS; round++) {
		const start = performance.now();
		const cpu = process.cpuUsage();
		let calls = 0;
		while (performance.now() - start < ROUND_MS) {
			for (let j = 0; j < 20; j++) run(k++);
			calls += 20;
		}
		const used = process.cpuUsage(cpu);
		perCall.push((used.user + used.system) / calls);
	}
	perCall.sort((a, b) => a - b);
	return perCall[Math.floor(perCall.length / 2)];
}

// ---------------------------------------------------------------------------------------------
// Plain-number baseline: the same steps as the engine on doubles, with the same output strings.
// It is here only to measure against; doubles are not fit for money (see docs/pricing.md).

const tiers = [
	{ upTo: 10, multiplier: 2.5 },
	{ upTo: 50, multiplier: 2 },
	{ upTo: 200, multiplier: 1.75 },
	{ upTo: 500, multiplier: 1.5 },
	{ upTo: Infinity, multiplier: 1.35 }
];
const cents = (x: number) => Math.round(x * 100) / 100;
const percent = (n: number, d: number) => (d > 0 ? ((100 * n) / d).toFixed(2) : null);
/** "$1,234.50", built the way the engine builds it (a cached symbol and hand-made grouping). */
const say = (x: number) => {
	const fixed = x.toFixed(2);
	const dot = fixed.indexOf('.');
	return '$' + fixed.slice(0, dot).replace(/\B(?=(\d{3})+(?!\d))/g, ',') + fixed.slice(dot);
};

interface FloatLine { kind: string; quantity?: number; unitCost?: number; hours?: number; amount?: number; cost?: number; price?: number; specialOrder?: boolean; description: string }

function floatOption(lines: FloatLine[]) {
	const out: Record<string, unknown>[] = [];
	let subtotal = 0, taxable = 0, cost = 0, labour = 0, special = 0;
	for (const line of lines) {
		let sell = 0, lineCost = 0, unitPrice: number | null = null, isTaxable = false;
		if (line.kind === 'part') {
			let k = 0;
			while (line.unitCost! > tiers[k].upTo) k++;
			const floor = k > 0 ? tiers[k - 1].upTo * tiers[k - 1].multiplier : 0;
			unitPrice = cents(Math.max(line.unitCost! * tiers[k].multiplier, floor));
			sell = cents(line.quantity! * unitPrice);
			lineCost = cents(line.quantity! * line.unitCost!);
			isTaxable = true;
			if (line.specialOrder) special += sell;
		} else if (line.kind === 'labour') {
			unitPrice = 95;
			sell = cents(line.hours! * 95);
			labour += sell;
		} else if (line.kind === 'fee') {
			sell = cents(line.amount!);
		} else {
			sell = cents(line.price!);
			lineCost = cents(line.cost!);
			isTaxable = true;
		}
		subtotal += sell;
		cost += lineCost;
		if (isTaxable) taxable += sell;
		const gp = sell - lineCost;
		out.push({
			kind: line.kind,
			description: line.description,
			unitPrice: unitPrice === null ? null : unitPrice.toFixed(2),
			sell: sell.toFixed(2),
			cost: lineCost.toFixed(2),
			grossProfit: gp.toFixed(2),
			marginPercent: percent(gp, sell),
			markupPercent: lineCost > 0 ? percent(gp, lineCost) : null
		});
	}
	const supplies = Math.min(cents(labour * 0.05), 35);
	if (supplies > 0) {
		subtotal += supplies;
		taxable += supplies;
		out.push({ kind: 'supplies', sell: supplies.toFixed(2), cost: '0.00', grossProfit: supplies.toFixed(2), marginPercent: '100.00', markupPercent: null });
	}
	const tax = cents(taxable * 0.0725);
	const total = subtotal + tax;
	const deposit = Math.min(Math.max(cents(total * 0.25), special), total);
	const gp = subtotal - cost;
	return {
		total,
		result: {
			lines: out,
			subtotal: subtotal.toFixed(2),
			taxableBase: taxable.toFixed(2),
			tax: tax.toFixed(2),
			total: total.toFixed(2),
			cost: cost.toFixed(2),
			grossProfit: gp.toFixed(2),
			marginPercent: percent(gp, subtotal),
			markupPercent: cost > 0 ? percent(gp, cost) : null,
			deposit: deposit.toFixed(2),
			balance: (total - deposit).toFixed(2),
			reasons: special > 0 ? [`Special-order parts come to ${say(special)} before tax.`] : []
		}
	};
}

const crf = (i: number, n: number) => (i === 0 ? 1 / n : (i * (1 + i) ** n) / ((1 + i) ** n - 1));

function floatEvaluate(repairLines: FloatLine[], replacementLines: FloatLine[], statedLife: number | null, engineHours: number) {
	const repair = floatOption(repairLines);
	const replacement = floatOption(replacementLines);
	const i = 0.08, S = 40, rcn = 899, age = 4, lifeYears = 10, lifeHours = 1500, annualHours = 100;
	const used = Math.min(1, Math.max(age / lifeYears, engineHours / lifeHours));
	const value = cents((0.1 * rcn + 0.9 * rcn * (1 - used)) * 0.9);
	const nr = Math.max(1, statedLife ?? Math.min(lifeYears - age, (lifeHours - engineHours) / annualHours));
	const nn = Math.min(lifeYears, lifeHours / annualHours);
	const R = repair.total, N = replacement.total;
	const eacNew = N * crf(i, nn);
	const eacRepair = (S + R) * crf(i, nr);
	const rStar = eacNew / crf(i, nr) - S;
	const verdict = R < rStar * 0.9 ? 'repair' : R > rStar * 1.1 ? 'replace' : 'close-call';
	const chart = [];
	for (let year = 0; year <= Math.ceil(Math.max(nr, nn)); year++) {
		chart.push({ year, repair: (cents(eacRepair) * year).toFixed(2), replace: (cents(eacNew) * year).toFixed(2) });
	}
	return {
		options: [repair.result, replacement.result],
		value: value.toFixed(2),
		comparison: {
			crfRepair: crf(i, nr).toFixed(6),
			crfReplace: crf(i, nn).toFixed(6),
			eacRepair: eacRepair.toFixed(2),
			eacReplace: eacNew.toFixed(2),
			breakEven: rStar.toFixed(2),
			verdict,
			chart
		},
		reasons: [
			`A comparable new unit costs ${say(rcn)}; it is ${(used * 100).toFixed(1)}% through its life and worth about ${say(value)} today.`,
			`The repair costs ${say(R)}.`,
			`The most this repair is worth is ${say(rStar)}.`,
			`Spread over the ${nr.toFixed(1)} years the repaired unit should last, repairing costs ${say(eacRepair)} a year; a new unit costs ${say(eacNew)} a year.`,
			`The repair is ${((100 * R) / N).toFixed(1)}% of the price of a new unit; the shop's guide is to repair below 50%.`,
			`The repair costs ${R > value ? 'more' : 'less'} than the unit is worth today (${say(value)}).`
		]
	};
}

function floatLines(request: PricingRequest, index: number): FloatLine[] {
	return request.options[index].lines.map((line) => {
		switch (line.kind) {
			case 'part':
				return { kind: 'part', description: line.description, quantity: line.quantity.toNumber(), unitCost: line.unitCost.toNumber(), specialOrder: line.specialOrder };
			case 'labour':
				return { kind: 'labour', description: line.description, hours: line.hours.toNumber() };
			case 'fee':
				return { kind: 'fee', description: line.description, amount: line.amount.toNumber() };
			case 'unit':
				return { kind: 'unit', description: line.description, cost: line.cost.toNumber(), price: line.price.toNumber() };
			default:
				throw new Error('The baseline prices parts, labour, fees and units only.');
		}
	});
}

// ---------------------------------------------------------------------------------------------

function settingsFor(request: PricingRequest): PricingSettings {
	return resolveSettings(undefined, { ...request.settings, currency: request.currency });
}

interface Case {
	name: string;
	engine: (k: number) => unknown;
	float: (k: number) => unknown;
	full: ((k: number) => unknown) | null;
}

function quoteCase(size: number): Case {
	const body = quoteBody(size);
	const request = pricingRequestSchema.parse(body);
	const settings = settingsFor(request);
	const check = evaluateRequest(body);
	if (!check.ok) throw new Error(`The benchmark quote is not valid: ${check.message}`);
	const repairLines = floatLines(request, 0);
	const replacementLines = floatLines(request, 1);
	return {
		name: `${size} lines`,
		engine: () => evaluate(request, settings),
		float: () => floatEvaluate(repairLines, replacementLines, 4, 420),
		full: () => evaluateRequest(body)
	};
}

// Life from engine hours gives a fractional n_r: every request here has a different one, so the
// CRF memo misses each time and the fractional power is worked out in full.
function fractionalLifeCase(): Case {
	const hours = (k: number) => 905 + (k % 2048) * 0.24;
	const variants = Array.from({ length: 2048 }, (_, k) => pricingRequestSchema.parse(quoteBody(20, hours(k).toFixed(2), undefined)));
	const settings = settingsFor(variants[0]);
	const repairLines = floatLines(variants[0], 0);
	const replacementLines = floatLines(variants[0], 1);
	return {
		name: '20 lines, life from hours (no memo)',
		engine: (k) => evaluate(variants[k % variants.length], settings),
		float: (k) => floatEvaluate(repairLines, replacementLines, null, hours(k)),
		full: null
	};
}

const cases = [quoteCase(5), quoteCase(20), quoteCase(100), fractionalLifeCase()];

// Warm every path up first, so no figure pays for the compiler's first passes.
for (let pass = 0; pass < 3; pass++) {
	for (const c of cases) {
		for (let k = 0; k < 1000; k++) c.engine(k);
		for (let k = 0; k < 3000; k++) c.float(k);
		for (let k = 0; c.full && k < 200; k++) c.full(k);
	}
}

const pad = (cells: string[]) => cells.map((cell, k) => (k === 0 ? cell.padEnd(36) : cell.padStart(11))).join('');
const load = loadavg().map((x) => x.toFixed(2)).join(' ');
console.log(`Node ${process.version}, one process; CPU time per evaluation, median of ${ROUNDS} rounds of ${ROUND_MS} ms.`);
console.log(`${cpus().length} CPUs (${cpus()[0]?.model ?? 'unknown'}), load average ${load} after warm-up.\n`);
console.log(pad(['quote (repair vs replacement)', 'engine µs', 'engine /s', 'float µs', 'ratio', 'full µs', 'full /s']));

for (const c of cases) {
	const engine = measure(c.engine);
	const float = measure(c.float);
	const full = c.full ? measure(c.full) : null;
	console.log(
		pad([
			c.name,
			engine.toFixed(1),
			Math.round(1e6 / engine).toString(),
			float.toFixed(1),
			(engine / float).toFixed(1) + '×',
			full === null ? '' : full.toFixed(1),
			full === null ? '' : Math.round(1e6 / full).toString()
		])
	);
}
