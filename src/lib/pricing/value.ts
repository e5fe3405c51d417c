import { Dec, ONE, PricingError, ZERO, toDecimal, type Decimal, type DecimalValue } from './money';

/** Multiplying by 0.01 is exact and cheaper than dividing by 100. */
const ONE_HUNDREDTH = new Dec('0.01');

export interface UnitValueInput {
	/** Replacement cost new (RCN): what a comparable new unit costs. */
	replacementCostNew: DecimalValue;
	salvageFloorPercent: DecimalValue;
	lifeYears: DecimalValue;
	/** Expected engine life in hours; omitted when only age counts. */
	lifeHours?: DecimalValue | null;
	ageYears: DecimalValue;
	engineHours?: DecimalValue;
	conditionFactor: DecimalValue;
}

export interface UnitValue {
	salvage: Decimal;
	usedByAge: Decimal;
	usedByHours: Decimal | null;
	/** Share of the life used up: the further along of age and hours, at most 1. */
	used: Decimal;
	/** Unrounded; round to the currency at the boundary. */
	value: Decimal;
}

/**
 * Replacement cost new less straight-line depreciation by age or by hours (whichever is further
 * along) down to a salvage floor, times a condition factor.
 */
export function unitValue(input: UnitValueInput): UnitValue {
	const rcn = toDecimal(input.replacementCostNew);
	const lifeYears = toDecimal(input.lifeYears);
	if (!lifeYears.gt(0)) throw new PricingError('The expected life in years must be more than zero.', 'unit.lifeYears');
	if (rcn.lt(0)) throw new PricingError('The replacement cost new cannot be negative.', 'unit.replacementCostNew');
	const age = toDecimal(input.ageYears);
	if (age.lt(0)) throw new PricingError('The age cannot be negative.', 'unit.ageYears');
	const salvage = rcn.times(toDecimal(input.salvageFloorPercent)).times(ONE_HUNDREDTH);
	const usedByAge = age.div(lifeYears);
	let usedByHours: Decimal | null = null;
	if (input.lifeHours !== undefined && input.lifeHours !== null) {
		const lifeHours = toDecimal(input.lifeHours);
		if (!lifeHours.gt(0)) throw new PricingError('The expected engine life in hours must be more than zero.', 'unit.lifeHours');
		usedByHours = toDecimal(input.engineHours ?? ZERO).div(lifeHours);
	}
	let used = usedByHours !== null && usedByHours.gt(usedByAge) ? usedByHours : usedByAge;
	if (used.gt(ONE)) used = ONE;
	if (used.lt(ZERO)) used = ZERO;
	const value = salvage.plus(rcn.minus(salvage).times(ONE.minus(used))).times(toDecimal(input.conditionFactor));
	return { salvage, usedByAge, usedByHours, used, value };
}
