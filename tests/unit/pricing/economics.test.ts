import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as formulajs from '@formulajs/formulajs';
import { Dec, PricingError } from '../../../src/lib/pricing/money';
import {
	breakEvenRepair,
	capitalRecoveryFactor,
	chartYears,
	cumulativeCostChart,
	newUnitLife,
	presentWorthFactor,
	remainingLifeAfterRepair,
	repairEquivalentAnnualCost,
	repairVerdict,
	repairVerdictMinor,
	replacementEquivalentAnnualCost
} from '../../../src/lib/pricing/economics';

const crf5 = (i: string, n: string | number) => capitalRecoveryFactor(i, n).toFixed(5);

describe('capital recovery factor (A/P, i, n)', () => {
	it('matches engineering-economy interest tables', () => {
		// Compound-interest factor tables printed in engineering-economy texts, column A/P.
		expect(crf5('0.10', 5)).toBe('0.26380');
		expect(crf5('0.08', 10)).toBe('0.14903');
		expect(crf5('0.06', 7)).toBe('0.17914');
		expect(crf5('0.12', 10)).toBe('0.17698');
	});

	it('is 1/n at a zero rate: (A/P, 0, 5) = 0.2', () => {
		// With no interest the capital is recovered in n equal parts.
		expect(capitalRecoveryFactor(0, 5).toString()).toBe('0.2');
		expect(presentWorthFactor(0, 5).toString()).toBe('5');
	});

	it('agrees with the spreadsheet PMT function (formulajs) for any rate and whole or fractional life', () => {
		// PMT(i, n, -1) is the payment that repays 1 over n periods: the CRF.
		fc.assert(
			fc.property(
				fc.integer({ min: 1, max: 3000 }).map((bp) => bp / 10000),
				fc.integer({ min: 1, max: 4000 }).map((hundredths) => hundredths / 100),
				(rate, years) => {
					const oracle = formulajs.PMT(rate, years, -1) as number;
					const ours = capitalRecoveryFactor(rate, years).toNumber();
					// Doubles lose digits in (1 + i)^n − 1 for a tiny rate and life, so the check is relative, 1e-8.
					expect(Math.abs(ours - oracle)).toBeLessThanOrEqual(1e-8 * oracle);
					expect(capitalRecoveryFactor(rate, years).times(presentWorthFactor(rate, years)).minus(1).abs().lt('1e-30')).toBe(true);
				}
			),
			{ numRuns: 1000 }
		);
	});

	it('refuses a life of zero or less and a negative rate, with a clear message', () => {
		expect(() => capitalRecoveryFactor('0.08', 0)).toThrow(PricingError);
		expect(() => capitalRecoveryFactor('0.08', -2)).toThrow(/more than zero/);
		expect(() => capitalRecoveryFactor('-0.01', 5)).toThrow(PricingError);
		expect(() => capitalRecoveryFactor('0.08', 'NaN')).toThrow(PricingError);
	});
});

describe('equivalent annual cost and the break-even repair', () => {
	it('prices a new unit at 213.19 a year (1500 new, 150 resale, 10 years, 8%)', () => {
		// Textbook EAC: (P − S)(A/P, 8%, 10) + S·i = 1350 × 0.14903 + 150 × 0.08 = 201.19 + 12.00 = 213.19.
		const eac = replacementEquivalentAnnualCost({ price: 1500, resaleAtEnd: 150, rate: '0.08', life: 10 });
		expect(eac.toFixed(2)).toBe('213.19');
	});

	it('puts the most a repair buying 3 more years is worth at 549.41 (S = 0, no upkeep)', () => {
		// R* = EAC_new / (A/P, 8%, 3) = 213.19 / 0.38803 = 549.41.
		const eacNew = replacementEquivalentAnnualCost({ price: 1500, resaleAtEnd: 150, rate: '0.08', life: 10 });
		const rStar = breakEvenRepair({ replacementAnnualCost: eacNew, asIsValue: 0, rate: '0.08', life: 3 });
		expect(rStar.toFixed(2)).toBe('549.41');
	});

	it('counts what the old unit fetches as-is and the upkeep on each side', () => {
		// EAC_repair = (S + R)(A/P, 10%, 5) + upkeep = (100 + 400) × 0.26380 + 50 = 181.90.
		const eac = repairEquivalentAnnualCost({ asIsValue: 100, repairCost: 400, rate: '0.10', life: 5, annualUpkeep: 50 });
		expect(eac.toFixed(2)).toBe('181.90');
		// R* = (EAC_replace − upkeep_old)/(A/P) − S; with EAC_replace = 181.90 it gives back R = 400.
		const rStar = breakEvenRepair({ replacementAnnualCost: eac, oldAnnualUpkeep: 50, asIsValue: 100, rate: '0.10', life: 5 });
		expect(rStar.toFixed(2)).toBe('400.00');
	});

	it('makes both paths cost the same each year when the repair costs exactly R* (within a cent)', () => {
		const money = fc.integer({ min: 0, max: 10 ** 8 }).map((cents) => new Dec(cents).div(100));
		fc.assert(
			fc.property(
				fc.integer({ min: 0, max: 3000 }).map((bp) => new Dec(bp).div(10000)),
				fc.integer({ min: 10, max: 3000 }).map((h) => new Dec(h).div(100)),
				fc.integer({ min: 10, max: 3000 }).map((h) => new Dec(h).div(100)),
				money,
				money,
				money,
				money,
				money,
				(rate, repairLife, newLife, price, resale, asIs, upkeepOld, upkeepNew) => {
					const eacReplace = replacementEquivalentAnnualCost({ price, resaleAtEnd: resale, rate, life: newLife, annualUpkeep: upkeepNew });
					const rStar = breakEvenRepair({ replacementAnnualCost: eacReplace, oldAnnualUpkeep: upkeepOld, asIsValue: asIs, rate, life: repairLife });
					const eacRepair = repairEquivalentAnnualCost({ asIsValue: asIs, repairCost: rStar, rate, life: repairLife, annualUpkeep: upkeepOld });
					expect(eacRepair.minus(eacReplace).abs().lt('0.01')).toBe(true);
					expect(eacRepair.isFinite() && rStar.isFinite()).toBe(true);
				}
			),
			{ numRuns: 1000 }
		);
	});
});

describe('lives', () => {
	it('takes the life after repair from years or hours, whichever runs out first, never below the minimum', () => {
		// 10 − 4 = 6 years by age; (1500 − 1100) / 100 = 4 years by hours → 4.
		expect(remainingLifeAfterRepair({ lifeYears: 10, ageYears: 4, lifeHours: 1500, engineHours: 1100, annualHours: 100, minimumLife: 1 }).toString()).toBe('4');
		// Worn out: 10 − 12 < 0 → the minimum of 1 year.
		expect(remainingLifeAfterRepair({ lifeYears: 10, ageYears: 12, annualHours: 100, minimumLife: 1 }).toString()).toBe('1');
		// A stated life wins.
		expect(remainingLifeAfterRepair({ stated: 3, lifeYears: 10, ageYears: 4, annualHours: 100, minimumLife: 1 }).toString()).toBe('3');
		// Fractional lives are allowed: (1500 − 1150) / 100 = 3.5.
		expect(remainingLifeAfterRepair({ lifeYears: 10, ageYears: 4, lifeHours: 1500, engineHours: 1150, annualHours: 100, minimumLife: 1 }).toString()).toBe('3.5');
	});

	it('gives a new unit min(years, engine hours / hours a year)', () => {
		expect(newUnitLife(10, 1500, 100).toString()).toBe('10');
		expect(newUnitLife(10, 800, 100).toString()).toBe('8');
		expect(newUnitLife(10, null, 100).toString()).toBe('10');
		expect(() => newUnitLife(0, null, 100)).toThrow(PricingError);
		expect(() => newUnitLife(10, 800, 0)).toThrow(PricingError);
	});

	it('handles a fractional life with Decimal powers', () => {
		// (A/P, 10%, 2.5): 1.1^2.5 = 1.269059 → 0.1 × 1.269059 / 0.269059 = 0.471666.
		expect(capitalRecoveryFactor('0.10', '2.5').toFixed(6)).toBe('0.471666');
	});
});

describe('the verdict', () => {
	it('repairs below R*(1 − band), replaces above R*(1 + band), else calls it close', () => {
		// R* = 500, band 10% → repair below 450, replace above 550.
		expect(repairVerdict(449, 500, '0.10')).toBe('repair');
		expect(repairVerdict(450, 500, '0.10')).toBe('close-call');
		expect(repairVerdict(550, 500, '0.10')).toBe('close-call');
		expect(repairVerdict(551, 500, '0.10')).toBe('replace');
		// No repair pays when R* is negative.
		expect(repairVerdict(0, -20, '0.10')).toBe('replace');
	});

	it('gives the same verdict on minor units as on Decimals', () => {
		fc.assert(
			fc.property(fc.integer({ min: 0, max: 10 ** 9 }), fc.integer({ min: -(10 ** 9), max: 10 ** 9 }), fc.integer({ min: 0, max: 5000 }), (r, rStar, bandBp) => {
				const band = new Dec(bandBp).div(10000);
				const decimal = repairVerdict(new Dec(r).div(100), new Dec(rStar).div(100), band);
				expect(repairVerdictMinor(BigInt(r), BigInt(rStar), BigInt(bandBp) * 10000n)).toBe(decimal);
			}),
			{ numRuns: 1000 }
		);
	});
});

describe('the cumulative cost chart', () => {
	it('runs from year 0 to the longer life rounded up', () => {
		// max(3.5, 10) = 10 → years 0..10; max(6.2, 5) rounded up = 7.
		expect(chartYears(new Dec('3.5'), new Dec(10))).toHaveLength(11);
		expect(chartYears(new Dec('6.2'), new Dec(5)).at(-1)).toBe(7);
		const chart = cumulativeCostChart(new Dec('100.50'), new Dec('80'), new Dec(2), new Dec(3));
		// Year k is k annual amounts: year 3 = 3 × 100.50 = 301.50 and 3 × 80 = 240.
		expect(chart[0].repair.toString()).toBe('0');
		expect(chart[3].repair.toString()).toBe('301.5');
		expect(chart[3].replace.toString()).toBe('240');
	});
});
