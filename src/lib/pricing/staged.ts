import { ONE, PricingError, ZERO, toDecimal, type Decimal, type DecimalValue } from './money';

export interface StageCost {
	/** The stage's priced total, tax included. */
	total: DecimalValue;
	/** Chance, as a fraction, that this stage ends the fault. */
	likelihood: DecimalValue;
}

export interface StagedCost {
	/** Chance of reaching each stage: 1 − the likelihoods of the stages before it. */
	reachChances: Decimal[];
	expected: Decimal;
	worstCase: Decimal;
	/** Chance that no stage ends the fault: 1 − Σ likelihoods. */
	unresolvedChance: Decimal;
}

/** Expected cost = Σ cost_k × P(reaching k); worst case = Σ cost_k. Stages are in the order they are tried. */
export function stagedCost(stages: readonly StageCost[]): StagedCost {
	if (stages.length === 0) throw new PricingError('A staged option needs at least one stage.', 'stages');
	const reachChances: Decimal[] = [];
	let reach = ONE;
	let expected = ZERO;
	let worstCase = ZERO;
	for (const stage of stages) {
		const likelihood = toDecimal(stage.likelihood);
		const total = toDecimal(stage.total);
		if (likelihood.lt(0) || likelihood.gt(1)) throw new PricingError('Each stage likelihood must be between 0 and 1.', 'stages');
		reachChances.push(reach);
		expected = expected.plus(total.times(reach));
		worstCase = worstCase.plus(total);
		reach = reach.minus(likelihood);
	}
	if (reach.lt(0)) {
		throw new PricingError('The stage likelihoods add up to more than 1; they may add up to at most 1.', 'stages');
	}
	return { reachChances, expected, worstCase, unresolvedChance: reach };
}

export interface NotToExceed {
	amount: Decimal;
	/** True when the shop's figure was above the worst case and was brought down to it. */
	lowered: boolean;
	/** How many stages, in order, the amount pays for in full. */
	stagesCovered: number;
}

/**
 * The amount the customer authorises: the worst case unless the shop sets it lower. A figure above
 * the worst case is brought down to it: no customer is asked to authorise more than the work can cost.
 */
export function notToExceed(worstCase: Decimal, stageTotals: readonly Decimal[], override?: Decimal | null): NotToExceed {
	let amount = worstCase;
	let lowered = false;
	if (override !== undefined && override !== null) {
		if (override.gt(worstCase)) lowered = true;
		else amount = override;
	}
	let stagesCovered = 0;
	let running = ZERO;
	for (const total of stageTotals) {
		running = running.plus(total);
		if (running.gt(amount)) break;
		stagesCovered++;
	}
	return { amount, lowered, stagesCovered };
}
