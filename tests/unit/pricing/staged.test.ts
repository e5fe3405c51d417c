import { describe, expect, it } from 'vitest';
import { Dec, PricingError } from '../../../src/lib/pricing/money';
import { notToExceed, stagedCost } from '../../../src/lib/pricing/staged';

describe('staged diagnosis', () => {
	// Three stages, cheapest likely fix first: 99.75 (60%), 129.88 (30%), 339.75 (10%).
	// P(reach) = 1, 0.4, 0.1 → expected = 99.75 + 0.4 × 129.88 + 0.1 × 339.75 = 185.677; worst = 569.38.
	const stages = [
		{ total: '99.75', likelihood: '0.6' },
		{ total: '129.88', likelihood: '0.3' },
		{ total: '339.75', likelihood: '0.1' }
	];

	it('weighs each stage by the chance of reaching it', () => {
		const cost = stagedCost(stages);
		expect(cost.reachChances.map((p) => p.toString())).toEqual(['1', '0.4', '0.1']);
		expect(cost.expected.toString()).toBe('185.677');
		expect(cost.worstCase.toString()).toBe('569.38');
		expect(cost.unresolvedChance.toString()).toBe('0');
	});

	it('reports the chance that no stage ends the fault when the likelihoods add up to less than 1', () => {
		const cost = stagedCost([{ total: 50, likelihood: '0.5' }, { total: 100, likelihood: '0.2' }]);
		// 50 + 0.5 × 100 = 100; 1 − 0.7 = 0.3 unresolved.
		expect(cost.expected.toString()).toBe('100');
		expect(cost.unresolvedChance.toString()).toBe('0.3');
	});

	it('refuses likelihoods that add up to more than 1', () => {
		expect(() => stagedCost([{ total: 10, likelihood: '0.7' }, { total: 20, likelihood: '0.4' }])).toThrow(PricingError);
		expect(() => stagedCost([])).toThrow(PricingError);
	});

	it('authorises the worst case unless the shop sets a lower not-to-exceed', () => {
		const totals = stages.map((s) => new Dec(s.total));
		const worst = new Dec('569.38');
		expect(notToExceed(worst, totals).amount.toString()).toBe('569.38');
		expect(notToExceed(worst, totals).stagesCovered).toBe(3);
		// 300 pays for stages 1 and 2 (99.75 + 129.88 = 229.63) but not the third.
		const lower = notToExceed(worst, totals, new Dec(300));
		expect(lower.amount.toString()).toBe('300');
		expect(lower.stagesCovered).toBe(2);
		// Above the worst case it is brought down to it.
		const higher = notToExceed(worst, totals, new Dec(600));
		expect(higher.amount.toString()).toBe('569.38');
		expect(higher.lowered).toBe(true);
	});
});
