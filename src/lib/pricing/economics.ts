import { ONE, PricingError, ZERO, toDecimal, type Decimal, type DecimalValue } from './money';

export type Verdict = 'repair' | 'replace' | 'close-call';

const factorMemo = new Map<string, { recovery: Decimal; presentWorth: Decimal }>();
const FACTOR_MEMO_LIMIT = 512;

/**
 * (A/P, i, n) and its reciprocal (P/A, i, n), memoised: powers are slow in decimal arithmetic
 * (fractional ones very slow) and a shop asks for the same few (i, n) pairs again and again.
 */
function factors(rate: DecimalValue, years: DecimalValue): { recovery: Decimal; presentWorth: Decimal } {
	const i = toDecimal(rate);
	const n = toDecimal(years);
	if (!i.isFinite() || !n.isFinite()) throw new PricingError('The rate and the life must be finite numbers.', 'discountRate');
	if (!n.gt(0)) throw new PricingError('A life of zero years or less has no annual cost; give a life of more than zero.', 'lifeYears');
	if (i.lt(0)) throw new PricingError('The discount rate cannot be negative.', 'discountRate');
	const key = i.toString() + '|' + n.toString();
	const known = factorMemo.get(key);
	if (known) return known;
	let recovery: Decimal;
	let presentWorth: Decimal;
	if (i.isZero()) {
		recovery = ONE.div(n);
		presentWorth = n;
	} else {
		const growth = ONE.plus(i).pow(n);
		recovery = i.times(growth).div(growth.minus(ONE));
		presentWorth = growth.minus(ONE).div(i.times(growth));
	}
	if (factorMemo.size >= FACTOR_MEMO_LIMIT) factorMemo.clear();
	const entry = { recovery, presentWorth };
	factorMemo.set(key, entry);
	return entry;
}

/** Capital recovery factor (A/P, i, n) = i(1+i)^n / ((1+i)^n − 1); 1/n when i = 0. n need not be whole. */
export function capitalRecoveryFactor(rate: DecimalValue, years: DecimalValue): Decimal {
	return factors(rate, years).recovery;
}

/** Present worth of an annuity (P/A, i, n) = ((1+i)^n − 1) / (i(1+i)^n): the reciprocal of the CRF. */
export function presentWorthFactor(rate: DecimalValue, years: DecimalValue): Decimal {
	return factors(rate, years).presentWorth;
}

export interface RepairLifeInput {
	/** Life the shop states for this repair, in years; wins over the estimate. */
	stated?: DecimalValue | null;
	lifeYears: DecimalValue;
	ageYears: DecimalValue;
	lifeHours?: DecimalValue | null;
	engineHours?: DecimalValue;
	annualHours: DecimalValue;
	minimumLife: DecimalValue;
}

/** Years left after repair (n_r): stated, else min(years left, hours left / hours a year), never below the minimum. */
export function remainingLifeAfterRepair(input: RepairLifeInput): Decimal {
	const minimum = toDecimal(input.minimumLife);
	if (!minimum.gt(0)) throw new PricingError('The minimum life after repair must be more than zero.', 'minimumLifeAfterRepair');
	let life: Decimal;
	if (input.stated !== undefined && input.stated !== null) {
		life = toDecimal(input.stated);
	} else {
		life = toDecimal(input.lifeYears).minus(toDecimal(input.ageYears));
		if (input.lifeHours !== undefined && input.lifeHours !== null) {
			const annualHours = toDecimal(input.annualHours);
			if (!annualHours.gt(0)) throw new PricingError('Engine hours per year must be more than zero.', 'annualHours');
			const byHours = toDecimal(input.lifeHours).minus(toDecimal(input.engineHours ?? ZERO)).div(annualHours);
			if (byHours.lt(life)) life = byHours;
		}
	}
	return life.lt(minimum) ? minimum : life;
}

/** Life of the new unit (n_n): min(life in years, engine life in hours / hours a year). */
export function newUnitLife(lifeYears: DecimalValue, lifeHours: DecimalValue | null | undefined, annualHours: DecimalValue): Decimal {
	let life = toDecimal(lifeYears);
	if (lifeHours !== undefined && lifeHours !== null) {
		const perYear = toDecimal(annualHours);
		if (!perYear.gt(0)) throw new PricingError('Engine hours per year must be more than zero.', 'annualHours');
		const byHours = toDecimal(lifeHours).div(perYear);
		if (byHours.lt(life)) life = byHours;
	}
	if (!life.gt(0)) throw new PricingError('The new unit needs a life of more than zero years.', 'lifeYears');
	return life;
}

export interface RepairCostInput {
	/** S: what the failed unit fetches as-is today, given up by keeping it. */
	asIsValue: DecimalValue;
	/** R: the repair price. */
	repairCost: DecimalValue;
	rate: DecimalValue;
	life: DecimalValue;
	annualUpkeep?: DecimalValue;
	/** CRF(rate, life) when the caller already has it. */
	factor?: Decimal;
}

/** EAC_repair = (S + R) × CRF(i, n_r) + upkeep of the old unit. */
export function repairEquivalentAnnualCost(input: RepairCostInput): Decimal {
	const crf = input.factor ?? capitalRecoveryFactor(input.rate, input.life);
	return toDecimal(input.asIsValue).plus(toDecimal(input.repairCost)).times(crf).plus(toDecimal(input.annualUpkeep ?? ZERO));
}

export interface ReplacementCostInput {
	/** N: the replacement option's total. */
	price: DecimalValue;
	/** E: resale at the end of its life. */
	resaleAtEnd?: DecimalValue;
	rate: DecimalValue;
	life: DecimalValue;
	annualUpkeep?: DecimalValue;
	/** CRF(rate, life) when the caller already has it. */
	factor?: Decimal;
}

/** EAC_replace = (N − E) × CRF(i, n_n) + E × i + upkeep of the new unit. */
export function replacementEquivalentAnnualCost(input: ReplacementCostInput): Decimal {
	const crf = input.factor ?? capitalRecoveryFactor(input.rate, input.life);
	const resale = toDecimal(input.resaleAtEnd ?? ZERO);
	return toDecimal(input.price)
		.minus(resale)
		.times(crf)
		.plus(resale.times(toDecimal(input.rate)))
		.plus(toDecimal(input.annualUpkeep ?? ZERO));
}

export interface BreakEvenInput {
	replacementAnnualCost: DecimalValue;
	oldAnnualUpkeep?: DecimalValue;
	asIsValue: DecimalValue;
	rate: DecimalValue;
	/** n_r: years the repair buys. */
	life: DecimalValue;
}

/**
 * R* = (EAC_replace − upkeep_old) / CRF(i, n_r) − S: the repair price at which both paths cost the
 * same each year, so the most the repair is worth. Negative when keeping the old unit costs more than
 * a new one whatever the repair costs.
 */
export function breakEvenRepair(input: BreakEvenInput): Decimal {
	// Dividing by the CRF is multiplying by its memoised reciprocal, which is much cheaper.
	return toDecimal(input.replacementAnnualCost)
		.minus(toDecimal(input.oldAnnualUpkeep ?? ZERO))
		.times(presentWorthFactor(input.rate, input.life))
		.minus(toDecimal(input.asIsValue));
}

/** Repair below R* × (1 − band), replace above R* × (1 + band), else a close call. */
export function repairVerdict(repairCost: DecimalValue, breakEven: DecimalValue, band: DecimalValue): Verdict {
	const r = toDecimal(repairCost);
	const rStar = toDecimal(breakEven);
	const b = toDecimal(band);
	const low = rStar.times(ONE.minus(b));
	const high = rStar.times(ONE.plus(b));
	const lower = low.lt(high) ? low : high;
	const upper = low.lt(high) ? high : low;
	if (r.lt(lower)) return 'repair';
	if (r.gt(upper)) return 'replace';
	return 'close-call';
}

/**
 * repairVerdict on whole minor units, for the engine's hot path: the band is a fraction scaled by
 * 10^8 (0.10 → 10_000_000n). Same rule, exact integers.
 */
export function repairVerdictMinor(repairCost: bigint, breakEven: bigint, bandScaled: bigint): Verdict {
	const one = 100_000_000n;
	const r = repairCost * one;
	const low = breakEven * (one - bandScaled);
	const high = breakEven * (one + bandScaled);
	const lower = low < high ? low : high;
	const upper = low < high ? high : low;
	if (r < lower) return 'repair';
	if (r > upper) return 'replace';
	return 'close-call';
}

export interface ChartPoint {
	year: number;
	repair: Decimal;
	replace: Decimal;
}

/** Years for the chart: 0..⌈max(n_r, n_n)⌉. */
export function chartYears(repairLife: Decimal, newLife: Decimal): number[] {
	const horizon = (repairLife.gt(newLife) ? repairLife : newLife).ceil().toNumber();
	const years: number[] = [];
	for (let year = 0; year <= horizon; year++) years.push(year);
	return years;
}

/**
 * Cumulative cost of each path by year, counted as k equal annual amounts (the EAC); the textbook
 * comparison assumes each path is renewed on like terms when it wears out.
 */
export function cumulativeCostChart(repairAnnualCost: Decimal, replaceAnnualCost: Decimal, repairLife: Decimal, newLife: Decimal): ChartPoint[] {
	return chartYears(repairLife, newLife).map((year) => ({
		year,
		repair: repairAnnualCost.times(year),
		replace: replaceAnnualCost.times(year)
	}));
}
