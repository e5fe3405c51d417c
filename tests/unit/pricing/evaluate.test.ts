import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	defaultPricingSettings,
	evaluate,
	evaluateRequest,
	pricingSettingsSchema,
	resolveSettings,
	type EvaluateResponse,
	type PricingResult
} from '../../../src/lib/pricing/evaluate';
import { Dec } from '../../../src/lib/pricing/money';
import { pricingRequestSchema } from '../../../src/lib/pricing/schema';
import { settingsToJson } from '../../../src/lib/pricing/settings';

/** The example in docs/api.md: an invented Harrowgate PG-5500 with a failed alternator head. */
function harrowgateBody() {
	return {
		currency: 'USD',
		settings: { taxRate: '0.07' },
		diagnosticFee: '89.00',
		unit: {
			description: 'Harrowgate PG-5500 portable generator, 5,500 W running',
			ageYears: '4',
			engineHours: '380',
			lifeYears: '10',
			lifeHours: '1500',
			condition: 'good',
			asIsValue: '60.00'
		},
		options: [
			{
				id: 'repair-head',
				label: 'Rebuild the alternator head',
				kind: 'repair',
				creditDiagnosticFee: true,
				lines: [
					{ kind: 'part', description: 'Stator, 5.5 kW', quantity: '1', unitCost: '148.00', specialOrder: true },
					{ kind: 'part', description: 'Brush set', quantity: '1', unitCost: '16.40' },
					{ kind: 'part', description: 'Voltage regulator', quantity: '1', unitCost: '38.00' },
					{ kind: 'labour', description: 'Strip the alternator head, fit stator, brushes and regulator, test under load', hours: '2.8' }
				]
			},
			{
				id: 'replace',
				label: 'New Harrowgate PG-5500',
				kind: 'replacement',
				lines: [
					{ kind: 'unit', description: 'Harrowgate PG-5500, new', cost: '715.00', price: '949.00' },
					{ kind: 'fee', description: 'Disposal of the old unit', amount: '20.00', feeType: 'disposal' },
					{ kind: 'fee', description: 'Set-up and first start', amount: '30.00', feeType: 'setup' }
				]
			},
			{
				id: 'decline',
				label: 'Return unrepaired',
				kind: 'decline',
				lines: [{ kind: 'fee', description: 'Diagnosis', amount: '89.00', feeType: 'diagnostic' }]
			}
		]
	};
}

function ok(response: EvaluateResponse): PricingResult {
	if (!response.ok) throw new Error(`expected ok, got: ${response.message} ${JSON.stringify(response.issues)}`);
	return response.result;
}

const NUMBER_TEXT = /^-?\d+(\.\d+)?$/;

/** Text the caller typed (labels, descriptions) is echoed as given; every other string is checked. */
const CALLER_TEXT = new Set(['description', 'label', 'id', 'reasons']);

/** No figure anywhere in a result is NaN or Infinity, and every number is finite. */
function expectClean(value: unknown, key = ''): void {
	if (CALLER_TEXT.has(key)) return;
	if (typeof value === 'string') expect(value).not.toMatch(/NaN|Infinity/);
	else if (typeof value === 'number') expect(Number.isFinite(value)).toBe(true);
	else if (Array.isArray(value)) value.forEach((item) => expectClean(item));
	else if (value && typeof value === 'object') for (const [k, v] of Object.entries(value)) expectClean(v, k);
}

describe('evaluateRequest on the documented example', () => {
	// Worked by hand (default settings, tax 7%, i = 8%):
	// Repair: stator 148.00 × 1.75 = 259.00; brushes 16.40 × 2 = 32.80; regulator 38.00 × 2 = 76.00;
	//   labour 2.8 × 95 = 266.00; supplies 5% = 13.30; credit −89.00 → subtotal 558.10;
	//   taxable 367.80 + 13.30 = 381.10 → tax 26.677 → 26.68; total 584.78.
	//   Deposit: 25% = 146.20 < special order 259.00 → 259.00; balance 325.78.
	// Replacement: 949.00 + 20.00 + 30.00 = 999.00; tax 7% of 949.00 = 66.43; total 1065.43.
	// Lives: n_r = min(10 − 4, (1500 − 380)/100) = 6; n_n = min(10, 1500/100) = 10.
	// (A/P, 8%, 10) = 0.149029 → EAC_replace = 1065.43 × 0.149029 = 158.78.
	// (A/P, 8%, 6) = 0.216315 → EAC_repair = (60 + 584.78) × 0.216315 = 139.48.
	// R* = 158.7805 / 0.216315 − 60 = 674.02; 584.78 < 674.02 × 0.9 = 606.62 → repair.
	// R / N = 584.78 / 1065.43 = 54.89% (not below 50%).
	// Value: RCN 949.00 (the new unit line); used max(0.4, 0.2533) = 0.4; salvage 94.90;
	//   (94.90 + 854.10 × 0.6) × 0.9 = 546.62; the repair costs more than that.
	const result = ok(evaluateRequest(harrowgateBody()));
	const [repair, replacement, decline] = result.options;

	it('prices the options as worked by hand', () => {
		expect(repair.lines.map((line) => line.sell)).toEqual(['259.00', '32.80', '76.00', '266.00', '13.30', '-89.00']);
		expect(repair.subtotal).toBe('558.10');
		expect(repair.taxableBase).toBe('381.10');
		expect(repair.tax).toBe('26.68');
		expect(repair.total).toBe('584.78');
		expect(repair.deposit).toBe('259.00');
		expect(repair.balance).toBe('325.78');
		expect(replacement.total).toBe('1065.43');
		expect(decline.total).toBe('89.00');
	});

	it('gives per-line cost, gross profit, margin and markup', () => {
		// Stator: sell 259.00, cost 148.00, profit 111.00; margin 111/259 = 42.86%; markup 111/148 = 75.00%.
		const stator = repair.lines[0];
		expect([stator.cost, stator.grossProfit, stator.marginPercent, stator.markupPercent]).toEqual(['148.00', '111.00', '42.86', '75.00']);
		expect(stator.specialOrder).toBe(true);
		// Labour has no cost by default, so no markup.
		expect(repair.lines[3].markupPercent).toBeNull();
	});

	it('compares the repair with the replacement as worked by hand', () => {
		const assessment = result.repairs[0];
		const comparison = assessment.comparison!;
		expect(comparison.lifeAfterRepairYears).toBe('6.00');
		expect(comparison.newUnitLifeYears).toBe('10.00');
		expect(comparison.equivalentAnnualCostReplace).toBe('158.78');
		expect(comparison.equivalentAnnualCostRepair).toBe('139.48');
		expect(comparison.breakEvenRepair).toBe('674.02');
		expect(assessment.verdict).toBe('repair');
		expect(assessment.repairToNewPercent).toBe('54.89');
		expect(assessment.belowThreshold).toBe(false);
		expect(assessment.unitValue).toBe('546.62');
		expect(assessment.exceedsUnitValue).toBe(true);
		expect(result.recommendation).toMatchObject({ verdict: 'repair', optionIndex: 0 });
	});

	it('charts the cumulative cost year by year', () => {
		const chart = result.repairs[0].comparison!.chart;
		// Years 0..10; year 10 = 10 × 139.48 and 10 × 158.78.
		expect(chart).toHaveLength(11);
		expect(chart[0]).toEqual({ year: 0, repair: '0.00', replace: '0.00' });
		expect(chart[10]).toEqual({ year: 10, repair: '1394.80', replace: '1587.80' });
	});

	it('explains itself in sentences with money in the currency', () => {
		const reasons = result.repairs[0].reasons.join(' ');
		expect(reasons).toContain('$584.78');
		expect(reasons).toContain('$674.02');
		expect(reasons).toContain('repairing is the better buy');
		expect(reasons).toContain('54.9%');
		expect(result.unit.reasons[0]).toContain('$546.62');
		expectClean(result);
	});

	it('echoes the settings it used, and they validate with the settings schema', () => {
		expect(result.settings.taxRate).toBe('0.07');
		expect(pricingSettingsSchema.safeParse(result.settings).success).toBe(true);
	});
});

describe('evaluateRequest: variations', () => {
	it('takes defaults ← shop settings ← request settings', () => {
		const body = harrowgateBody();
		const withShop = ok(evaluateRequest(body, { labourRate: '110', taxRate: '0.05' }));
		// Request taxRate 0.07 beats the shop's 0.05; the shop's labour rate beats the default: 2.8 × 110 = 308.00.
		expect(withShop.settings.taxRate).toBe('0.07');
		expect(withShop.options[0].lines[3].sell).toBe('308.00');
		const bodyRate = { ...body, settings: { ...body.settings, labourRate: '120' } };
		expect(ok(evaluateRequest(bodyRate, { labourRate: '110' })).options[0].lines[3].sell).toBe('336.00');
	});

	it('rejects invalid shop settings and a currency that differs from them', () => {
		const bad = evaluateRequest(harrowgateBody(), { taxRate: 'lots' });
		expect(bad.ok).toBe(false);
		if (!bad.ok) expect(bad.issues[0].path).toBe('shopSettings.taxRate');
		const mismatch = evaluateRequest(harrowgateBody(), { currency: 'EUR' });
		expect(mismatch.ok).toBe(false);
		if (!mismatch.ok) expect(mismatch.issues[0].path).toBe('currency');
	});

	it('judges by rules of thumb only when there is no replacement option', () => {
		const body = harrowgateBody();
		body.options = [body.options[0], body.options[2]];
		const result = ok(evaluateRequest({ ...body, unit: { ...body.unit, replacementCostNew: '949.00' } }));
		const assessment = result.repairs[0];
		expect(assessment.comparison).toBeNull();
		expect(assessment.verdict).toBe('no-comparison');
		// 584.78 / 949.00 = 61.62% of the replacement cost new.
		expect(assessment.repairToNewPercent).toBe('61.62');
		expect(result.recommendation.verdict).toBe('no-comparison');
	});

	it('reports each of several repairs and recommends the cheapest worth doing', () => {
		const body = harrowgateBody();
		const brushesOnly = {
			label: 'Brushes only',
			kind: 'repair',
			lifeYears: '2',
			lines: [{ kind: 'part', description: 'Brush set', quantity: '1', unitCost: '16.40' }, { kind: 'labour', description: 'Fit brushes', hours: '0.5' }]
		};
		const result = ok(evaluateRequest({ ...body, options: [...body.options, brushesOnly] }));
		expect(result.repairs.map((r) => r.optionIndex)).toEqual([0, 3]);
		// Brushes: 32.80 + 47.50 + 2.38 supplies = 82.68 + tax 7% of 35.18 = 2.46 → 85.14.
		// EAC over 2 years: (60 + 85.14) × (A/P, 8%, 2) 0.560769 = 81.39 < 139.48 → recommended.
		expect(result.repairs[1].repairCost).toBe('85.14');
		expect(result.repairs[1].comparison!.equivalentAnnualCostRepair).toBe('81.39');
		expect(result.recommendation.optionIndex).toBe(3);
	});

	it('uses the expected cost of a staged repair as R and reports the worst case', () => {
		const body = harrowgateBody();
		const staged = {
			label: 'Find and fix the no-output fault',
			kind: 'repair',
			lines: [],
			notToExceed: '300.00',
			stages: [
				{ label: 'Replace brushes', likelihood: '0.5', lines: [{ kind: 'part', description: 'Brush set', quantity: '1', unitCost: '16.40' }, { kind: 'labour', description: 'Fit brushes', hours: '0.5' }] },
				{ label: 'Replace regulator', likelihood: '0.3', lines: [{ kind: 'part', description: 'Voltage regulator', quantity: '1', unitCost: '38.00' }, { kind: 'labour', description: 'Fit regulator', hours: '0.5' }] },
				{ label: 'Replace stator', likelihood: '0.2', lines: [{ kind: 'part', description: 'Stator', quantity: '1', unitCost: '148.00' }, { kind: 'labour', description: 'Fit stator', hours: '2' }] }
			]
		};
		const result = ok(evaluateRequest({ ...body, options: [staged, body.options[1]] }));
		const option = result.options[0];
		// Stage totals (tax 7% on parts and supplies):
		//   1: 32.80 + 47.50 + 2.38 = 82.68; tax on 35.18 = 2.46 → 85.14
		//   2: 76.00 + 47.50 + 2.38 = 125.88; tax on 78.38 = 5.49 → 131.37
		//   3: 259.00 + 190.00 + 9.50 = 458.50; tax on 268.50 = 18.80 → 477.30
		// Expected = 85.14 + 0.5 × 131.37 + 0.2 × 477.30 = 85.14 + 65.685 + 95.46 = 246.285 → 246.29.
		// Worst = 693.81; not-to-exceed 300.00 covers stages 1 and 2 (216.51).
		expect(option.staged!.stages.map((s) => s.total)).toEqual(['85.14', '131.37', '477.30']);
		expect(option.staged!.expectedCost).toBe('246.29');
		expect(option.staged!.worstCase).toBe('693.81');
		expect(option.staged!.notToExceed).toBe('300.00');
		expect(option.staged!.stagesCovered).toBe(2);
		expect(option.authorised).toBe('300.00');
		expect(result.repairs[0].repairCost).toBe('246.29');
		expect(result.repairs[0].worstCase).toBe('693.81');
		// R* is 674.02 as above (n_r = 6): the expected cost is well under, the worst case a little over.
		expect(result.repairs[0].verdict).toBe('repair');
		expect(result.repairs[0].comparison!.worstCaseVerdict).toBe('close-call');
	});

	it('prints money with the currency minor unit: none for JPY, three for KWD', () => {
		const body = harrowgateBody();
		const yen = ok(
			evaluateRequest({
				currency: 'JPY',
				unit: body.unit,
				options: [{ label: 'Repair', kind: 'repair', lines: [{ kind: 'part', description: 'Coil', quantity: 1, unitCost: '3333' }] }]
			})
		);
		// 3333 × 1.35 (above 500) = 4499.55 → 4500 yen.
		expect(yen.options[0].total).toBe('4500');
		const dinar = ok(
			evaluateRequest({
				currency: 'KWD',
				unit: body.unit,
				options: [{ label: 'Repair', kind: 'repair', lines: [{ kind: 'fee', description: 'Call-out', amount: '12.5' }] }]
			})
		);
		expect(dinar.options[0].total).toBe('12.500');
	});
});

describe('evaluateRequest refuses malformed input with issues', () => {
	const valid = harrowgateBody;
	const cases: [string, unknown][] = [
		['null', null],
		['an array', [1, 2, 3]],
		['a string', 'price this'],
		['a number', 42],
		['wrong types', { ...valid(), options: 'all of them' }],
		['a negative quantity', { ...valid(), options: [{ ...valid().options[0], lines: [{ kind: 'part', description: 'x', quantity: -1, unitCost: '5' }] }] }],
		['an unknown currency', { ...valid(), currency: 'XYZ' }],
		['1e308', { ...valid(), diagnosticFee: 1e308 }],
		['"NaN"', { ...valid(), diagnosticFee: 'NaN' }],
		['"Infinity"', { ...valid(), diagnosticFee: 'Infinity' }],
		['an exponent string', { ...valid(), diagnosticFee: '1e3' }],
		['too many decimals', { ...valid(), diagnosticFee: 0.1 + 0.2 }],
		['deep nesting', { ...valid(), unit: { ...valid().unit, extra: JSON.parse('['.repeat(2000) + ']'.repeat(2000)) } }],
		['10,000 lines', { ...valid(), options: [{ label: 'Big', kind: 'repair', lines: Array.from({ length: 10_000 }, () => ({ kind: 'fee', description: 'f', amount: 1 })) }] }],
		['likelihoods over 1', { ...valid(), options: [{ label: 'S', kind: 'repair', stages: [{ label: 'a', likelihood: 0.8, lines: [] }, { label: 'b', likelihood: 0.3, lines: [] }] }] }],
		['a replacement without a unit line', { ...valid(), options: [{ label: 'New', kind: 'replacement', lines: [] }] }],
		['an unknown field', { ...valid(), discount: 'please' }]
	];

	for (const [name, body] of cases) {
		it(`refuses ${name}`, () => {
			const response = evaluateRequest(body);
			expect(response.ok).toBe(false);
			if (response.ok) return;
			expect(response.message.length).toBeGreaterThan(10);
			expect(response.issues.length).toBeGreaterThan(0);
			for (const issue of response.issues) {
				expect(typeof issue.path).toBe('string');
				expect(issue.message).not.toMatch(/\[object Object\]/);
			}
		});
	}

	it('names the field at fault', () => {
		const response = evaluateRequest({ ...valid(), currency: 'XYZ' });
		expect(response.ok).toBe(false);
		if (!response.ok) {
			expect(response.issues[0]).toEqual({ path: 'currency', message: expect.stringMatching(/Unknown currency "XYZ"/) });
		}
	});
});

describe('fuzzing evaluateRequest', () => {
	// A refusal may quote the caller's own field names back (even one named "NaN"), so the figures
	// are checked on results and the shape is checked on refusals.
	const check = (body: unknown, shop?: unknown) => {
		let response: EvaluateResponse | undefined;
		expect(() => {
			response = evaluateRequest(body, shop);
		}).not.toThrow();
		if (!response) throw new Error('no response');
		if (response.ok) {
			expectClean(response.result);
		} else {
			expect(typeof response.message).toBe('string');
			expect(response.issues.length).toBeGreaterThan(0);
			for (const issue of response.issues) {
				expect(typeof issue.path).toBe('string');
				expect(issue.message).not.toMatch(/\[object Object\]|received (NaN|-?Infinity)/);
			}
		}
	};

	it('never throws and never yields NaN or Infinity for anything at all', () => {
		fc.assert(
			fc.property(fc.anything({ withBigInt: true, withDate: true, withMap: true, withSet: true, withTypedArray: true }), fc.anything(), (body, shop) => check(body, shop)),
			{ numRuns: 1000 }
		);
	});

	it('never throws and never yields NaN or Infinity for any JSON value', () => {
		fc.assert(fc.property(fc.jsonValue(), (body) => check(body)), { numRuns: 1000 });
	});

	it('never throws on requests that are nearly right', () => {
		const number = fc.oneof(
			fc.double(),
			fc.integer(),
			fc.constantFrom('0', '-1', '1e9', '999999999.999999', '0.000001', '12.50', 'NaN', '', ' 7 ', '1000000000.01')
		);
		const line = fc.record({
			kind: fc.constantFrom('part', 'labour', 'fee', 'sublet', 'unit', 'discount', 'gizmo'),
			description: fc.string(),
			quantity: number,
			unitCost: number,
			hours: number,
			amount: number,
			percent: number,
			cost: number,
			price: number
		}, { requiredKeys: ['kind', 'description'] });
		const option = fc.record({
			label: fc.string(),
			kind: fc.constantFrom('repair', 'replacement', 'decline'),
			lines: fc.array(line, { maxLength: 6 }),
			lifeYears: number
		}, { requiredKeys: ['label', 'kind', 'lines'] });
		const body = fc.record({
			currency: fc.constantFrom('USD', 'JPY', 'KWD', 'usd', 'XYZ'),
			unit: fc.record({ ageYears: number, lifeYears: number, lifeHours: number, engineHours: number }, { requiredKeys: ['ageYears', 'lifeYears'] }),
			options: fc.array(option, { minLength: 1, maxLength: 4 }),
			settings: fc.record({ taxRate: number, discountRate: number, annualHours: number }, { requiredKeys: [] })
		});
		fc.assert(fc.property(body, (b) => check(b)), { numRuns: 1000 });
	});

	it('never yields NaN or Infinity for valid requests across the allowed ranges', () => {
		const money = fc.integer({ min: 0, max: 10 ** 11 }).map((c) => (c / 100).toFixed(2));
		const years = fc.integer({ min: 1, max: 10000 }).map((h) => (h / 100).toString());
		const body = fc.record({
			currency: fc.constantFrom('USD', 'JPY', 'KWD'),
			settings: fc.record({
				discountRate: fc.integer({ min: 0, max: 100 }).map((p) => (p / 100).toString()),
				taxRate: fc.integer({ min: 0, max: 30 }).map((p) => (p / 100).toString())
			}),
			unit: fc.record({
				ageYears: fc.integer({ min: 0, max: 20000 }).map((h) => (h / 100).toString()),
				lifeYears: years,
				lifeHours: fc.integer({ min: 1, max: 10 ** 6 }),
				engineHours: fc.integer({ min: 0, max: 10 ** 6 }),
				asIsValue: money,
				annualUpkeep: money
			}),
			options: fc.tuple(
				fc.record({ label: fc.constant('Repair'), kind: fc.constant('repair'), lines: fc.array(fc.record({ kind: fc.constant('fee'), description: fc.constant('Work'), amount: money }), { maxLength: 5 }) }),
				fc.record({ label: fc.constant('New'), kind: fc.constant('replacement'), resaleAtEnd: money, lines: fc.tuple(fc.record({ kind: fc.constant('unit'), description: fc.constant('New unit'), cost: money, price: money })) })
			)
		});
		fc.assert(
			fc.property(body, (b) => {
				const response = evaluateRequest(b);
				if (response.ok) {
					expectClean(response.result);
					for (const option of response.result.options) expect(option.total).toMatch(NUMBER_TEXT);
					for (const repair of response.result.repairs) {
						if (repair.comparison) expect(repair.comparison.breakEvenRepair).toMatch(NUMBER_TEXT);
					}
				}
			}),
			{ numRuns: 1000 }
		);
	});
});

describe('the pure engine', () => {
	it('takes parsed input and resolved settings, without zod in the way', () => {
		const request = pricingRequestSchema.parse(harrowgateBody());
		const settings = resolveSettings(undefined, { ...request.settings, currency: request.currency });
		const result = evaluate(request, settings);
		expect(result.options[0].total).toBe('584.78');
		expect(settingsToJson(defaultPricingSettings).labourRate).toBe('95');
		expect(new Dec(result.repairs[0].comparison!.breakEvenRepair).gt(result.repairs[0].repairCost)).toBe(true);
	});
});
