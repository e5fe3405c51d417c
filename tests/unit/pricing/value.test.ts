import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as formulajs from '@formulajs/formulajs';
import { Dec, PricingError } from '../../../src/lib/pricing/money';
import { unitValue } from '../../../src/lib/pricing/value';

const base = { replacementCostNew: 1200, salvageFloorPercent: 10, lifeYears: 10, conditionFactor: 1 };

describe('value of the unit', () => {
	it('agrees with straight-line depreciation: SLN(30000, 7500, 10) = 2250 a year', () => {
		// formulajs SLN is the spreadsheet straight-line depreciation per period.
		expect(formulajs.SLN(30000, 7500, 10)).toBe(2250);
		// RCN 30000 with a 25% salvage floor is worth 30000 − 3 × 2250 = 23250 after 3 of 10 years.
		const worth = unitValue({ replacementCostNew: 30000, salvageFloorPercent: 25, lifeYears: 10, ageYears: 3, conditionFactor: 1 });
		expect(worth.value.toString()).toBe('23250');
	});

	it('matches SLN for any cost, floor and age within the life', () => {
		fc.assert(
			fc.property(
				fc.integer({ min: 1, max: 10 ** 7 }),
				fc.integer({ min: 0, max: 100 }),
				fc.integer({ min: 1, max: 40 }),
				fc.integer({ min: 0, max: 40 }),
				(rcn, floorPercent, life, age) => {
					fc.pre(age <= life);
					const salvage = (rcn * floorPercent) / 100;
					const perYear = formulajs.SLN(rcn, salvage, life) as number;
					const ours = unitValue({ replacementCostNew: rcn, salvageFloorPercent: floorPercent, lifeYears: life, ageYears: age, conditionFactor: 1 });
					expect(Math.abs(ours.value.toNumber() - (rcn - age * perYear))).toBeLessThan(1e-6);
				}
			),
			{ numRuns: 1000 }
		);
	});

	it('is 768.00 for RCN 1200, 10% salvage, 10-year life, 4 years old', () => {
		// salvage 120; 120 + 1080 × (1 − 4/10) = 120 + 648 = 768.
		expect(unitValue({ ...base, ageYears: 4 }).value.toFixed(2)).toBe('768.00');
	});

	it('is 876.00 by hours at 300 of 1000 when hours are further along than age', () => {
		// fraction = max(1/10, 300/1000) = 0.3; 120 + 1080 × 0.7 = 876.
		const worth = unitValue({ ...base, ageYears: 1, lifeHours: 1000, engineHours: 300 });
		expect(worth.used.toString()).toBe('0.3');
		expect(worth.value.toFixed(2)).toBe('876.00');
	});

	it('applies the condition factor and never goes below the salvage floor', () => {
		// good = 0.9: 768 × 0.9 = 691.20. Past its life: 120 × 0.9 = 108.
		expect(unitValue({ ...base, ageYears: 4, conditionFactor: '0.9' }).value.toFixed(2)).toBe('691.20');
		const old = unitValue({ ...base, ageYears: 25, conditionFactor: '0.9' });
		expect(old.used.toString()).toBe('1');
		expect(old.value.toFixed(2)).toBe('108.00');
	});

	it('refuses a zero life', () => {
		expect(() => unitValue({ ...base, lifeYears: 0, ageYears: 1 })).toThrow(PricingError);
		expect(() => unitValue({ ...base, ageYears: 1, lifeHours: 0, engineHours: 5 })).toThrow(PricingError);
		expect(new Dec(unitValue({ ...base, ageYears: 0 }).value).toString()).toBe('1200');
	});
});
