import {
	breakEvenRepair,
	capitalRecoveryFactor,
	chartYears,
	newUnitLife,
	remainingLifeAfterRepair,
	repairEquivalentAnnualCost,
	replacementEquivalentAnnualCost,
	repairVerdictMinor,
	type Verdict
} from './economics';
import { issuesOf, pricingErrorMap, type FieldIssue } from './fields';
import {
	factorString,
	formatter,
	fractionAsPercent,
	percentString,
	sayNumber,
	sayPercent,
	sayRatio,
	sayYears,
	trimZeros,
	yearsString,
	type Formatter
} from './format';
import { percentOfScaled, scaledToDecimal, toScaled } from './fixed';
import {
	depositFor,
	priceLines,
	pricingContext,
	sumPriced,
	type LineCategory,
	type LineKind,
	type Minor,
	type PricedLine,
	type PricedLines,
	type PricingContext
} from './lines';
import { PricingError, ZERO, roundTo, type Decimal } from './money';
import { pricingRequestSchema, type OptionInput, type PricingRequest, type PricingRequestInput, type StageInput } from './schema';
import {
	defaultPricingSettings,
	mergeSettings,
	pricingSettingsOverridesSchema,
	pricingSettingsSchema,
	settingsToJson,
	type PricingSettings,
	type PricingSettingsInput,
	type PricingSettingsJson,
	type PricingSettingsOverrides
} from './settings';
import { notToExceed, stagedCost, type NotToExceed, type StagedCost } from './staged';
import { unitValue } from './value';

export { defaultPricingSettings, pricingSettingsSchema, pricingSettingsOverridesSchema, pricingRequestSchema };
export type { PricingRequest, PricingRequestInput, PricingSettings, PricingSettingsJson, PricingSettingsInput, PricingSettingsOverrides, FieldIssue };

// ---------------------------------------------------------------------------------------------
// Result shapes: every figure is a decimal string; money is fixed to the currency's minor unit.

export interface LineResult {
	kind: LineKind;
	category: LineCategory;
	description: string;
	/** Position in the input list; null for lines the engine adds (shop supplies, diagnostic credit). */
	inputIndex: number | null;
	/** Parts: quantity. Labour: hours. */
	quantity: string | null;
	/** Parts: sell price per unit. Labour: rate per hour. */
	unitPrice: string | null;
	sell: string;
	cost: string;
	grossProfit: string;
	/** Gross profit / sell, in percent; null when the sell price is not positive. */
	marginPercent: string | null;
	/** Gross profit / cost, in percent; null when the cost is zero. */
	markupPercent: string | null;
	taxable: boolean;
	specialOrder: boolean;
}

export interface TotalsResult {
	subtotal: string;
	taxableBase: string;
	tax: string;
	total: string;
	cost: string;
	grossProfit: string;
	marginPercent: string | null;
	markupPercent: string | null;
}

export interface StageResult extends TotalsResult {
	label: string;
	likelihood: string;
	/** Chance the work gets as far as this stage, in percent. */
	reachPercent: string;
	lines: LineResult[];
}

export interface StagedResult {
	stages: StageResult[];
	expectedCost: string;
	worstCase: string;
	notToExceed: string;
	/** True when the shop's not-to-exceed was above the worst case and was brought down to it. */
	notToExceedLowered: boolean;
	stagesCovered: number;
	/** Chance no stage ends the fault, in percent. */
	unresolvedPercent: string;
}

export interface OptionResult extends TotalsResult {
	index: number;
	id: string | null;
	label: string;
	kind: OptionInput['kind'];
	/** Empty for a staged option: its lines are inside its stages. */
	lines: LineResult[];
	specialOrderParts: string;
	/** What the customer authorises: the total, or the not-to-exceed of a staged option. */
	authorised: string;
	deposit: string;
	balance: string;
	meetsTargetMargin: boolean | null;
	staged: StagedResult | null;
	reasons: string[];
}

export interface UnitValueResult {
	replacementCostNew: string;
	/** Where RCN came from: the request, or the replacement option's new unit line. */
	replacementCostSource: 'unit' | 'replacement-option';
	salvageFloor: string;
	usedByAgePercent: string;
	usedByHoursPercent: string | null;
	usedPercent: string;
	condition: string;
	conditionFactor: string;
	value: string;
}

export interface ReplacementResult {
	optionIndex: number;
	label: string;
	price: string;
	resaleAtEnd: string;
	annualUpkeep: string;
	lifeYears: string;
	capitalRecoveryFactor: string;
	equivalentAnnualCost: string;
}

export interface ComparisonResult {
	replacementOptionIndex: number;
	lifeAfterRepairYears: string;
	newUnitLifeYears: string;
	capitalRecoveryFactorRepair: string;
	capitalRecoveryFactorReplace: string;
	asIsValue: string;
	equivalentAnnualCostRepair: string;
	equivalentAnnualCostReplace: string;
	/** R*: the most the repair is worth. Negative when no repair price pays. */
	breakEvenRepair: string;
	verdict: Verdict;
	/** Staged repairs: the verdict if every stage is needed. */
	worstCaseVerdict: Verdict | null;
	chart: { year: number; repair: string; replace: string }[];
}

export interface RepairAssessment {
	optionIndex: number;
	label: string;
	/** R: the repair total, or the expected cost of a staged repair. */
	repairCost: string;
	worstCase: string | null;
	comparison: ComparisonResult | null;
	/** R / N (or R / replacement cost new without a replacement option), in percent. */
	repairToNewPercent: string | null;
	thresholdPercent: string;
	belowThreshold: boolean | null;
	unitValue: string | null;
	exceedsUnitValue: boolean | null;
	verdict: Verdict | 'no-comparison';
	reasons: string[];
}

export interface Recommendation {
	verdict: Verdict | 'no-comparison';
	/** The option to offer first: the best repair, or the replacement. */
	optionIndex: number | null;
	reasons: string[];
}

export interface PricingResult {
	currency: string;
	minorDigits: number;
	roundingMode: PricingSettings['roundingMode'];
	options: OptionResult[];
	unit: { value: UnitValueResult | null; reasons: string[] };
	replacements: ReplacementResult[];
	repairs: RepairAssessment[];
	recommendation: Recommendation;
	settings: PricingSettingsJson;
}

export type EvaluateResponse =
	| { ok: true; result: PricingResult }
	| { ok: false; message: string; issues: FieldIssue[] };

// ---------------------------------------------------------------------------------------------
// The engine: validated input in, result out. No validation here; evaluateRequest does that.
// Line money is in whole minor units (bigint); the economics work in Decimal.

interface PricedOption {
	index: number;
	option: OptionInput;
	totals: PricedLines;
	stages: { stage: StageInput; priced: PricedLines }[] | null;
	staged: { cost: StagedCost; limit: NotToExceed; expected: Minor; worstCase: Minor } | null;
	/** R for repair-or-replace: total, or the rounded expected cost of a staged option. */
	repairCost: Minor;
	authorised: Minor;
}

interface Challenger {
	option: PricedOption;
	life: Decimal;
	crf: Decimal;
	eac: Decimal;
	resale: Decimal;
	upkeep: Decimal;
}

export function evaluate(request: PricingRequest, settings: PricingSettings): PricingResult {
	const ctx = pricingContext(settings, request.diagnosticFee ?? null);
	const fmt = formatter(settings.currency, ctx.digits, settings.roundingMode);
	const priced = request.options.map((option, index) => priceOption(option, index, ctx));
	const options = priced.map((option) => optionResult(option, ctx, fmt));

	const unit = request.unit;
	const annualHours = unit.annualHours ?? settings.annualHours;
	const rate = settings.discountRate;

	const replacements: Challenger[] = [];
	for (const option of priced) {
		if (option.option.kind !== 'replacement') continue;
		const life = newUnitLife(option.option.lifeYears ?? unit.lifeYears, option.option.lifeHours ?? unit.lifeHours ?? null, annualHours);
		const resale = option.option.resaleAtEnd ?? ZERO;
		const upkeep = option.option.annualUpkeep ?? ZERO;
		const price = scaledToDecimal(option.totals.total, ctx.digits);
		const crf = capitalRecoveryFactor(rate, life);
		const eac = replacementEquivalentAnnualCost({ price, resaleAtEnd: resale, rate, life, annualUpkeep: upkeep, factor: crf });
		replacements.push({ option, life, resale, upkeep, crf, eac });
	}
	// The challenger is the replacement with the lowest equivalent annual cost.
	let challenger: Challenger | null = replacements[0] ?? null;
	for (const candidate of replacements) if (challenger && candidate.eac.lt(challenger.eac)) challenger = candidate;

	const value = assessUnitValue(request, settings, challenger?.option ?? null, fmt);

	const assessed: AssessedRepair[] = [];
	for (const option of priced) {
		if (option.option.kind === 'repair') assessed.push(assessRepair(option, request, ctx, challenger, value.amount, fmt));
	}

	return {
		currency: settings.currency,
		minorDigits: ctx.digits,
		roundingMode: settings.roundingMode,
		options,
		unit: { value: value.result, reasons: value.reasons },
		replacements: replacements.map((r) => ({
			optionIndex: r.option.index,
			label: r.option.option.label,
			price: fmt.money(r.option.totals.total),
			resaleAtEnd: fmt.decimal(r.resale),
			annualUpkeep: fmt.decimal(r.upkeep),
			lifeYears: yearsString(r.life),
			capitalRecoveryFactor: factorString(r.crf),
			equivalentAnnualCost: fmt.decimal(r.eac)
		})),
		repairs: assessed.map((a) => a.assessment),
		recommendation: recommend(assessed, challenger?.option ?? null, fmt),
		settings: settingsJson(settings)
	};
}

const settingsJsonCache = new WeakMap<PricingSettings, PricingSettingsJson>();
function settingsJson(settings: PricingSettings): PricingSettingsJson {
	let json = settingsJsonCache.get(settings);
	if (!json) {
		json = settingsToJson(settings);
		settingsJsonCache.set(settings, json);
	}
	return json;
}

function priceOption(option: OptionInput, index: number, ctx: PricingContext): PricedOption {
	const credit = option.creditDiagnosticFee === true;
	if (!option.stages || option.stages.length === 0) {
		const totals = priceLines(option.lines, ctx, credit);
		return { index, option, totals, stages: null, staged: null, repairCost: totals.total, authorised: totals.total };
	}
	// The diagnostic credit goes on the first stage: it is earned when the repair is approved.
	const stages = option.stages.map((stage, k) => ({ stage, priced: priceLines(stage.lines, ctx, credit && k === 0) }));
	const totals = sumPriced(stages.map((s) => s.priced));
	const stageTotals = stages.map((s) => scaledToDecimal(s.priced.total, ctx.digits));
	const cost = stagedCost(stages.map((s, k) => ({ total: stageTotals[k], likelihood: s.stage.likelihood })));
	const expected = toScaled(cost.expected, ctx.digits, ctx.mode);
	const limit = notToExceed(cost.worstCase, stageTotals, option.notToExceed ?? null);
	const authorised = toScaled(limit.amount, ctx.digits, ctx.mode);
	const worstCase = toScaled(cost.worstCase, ctx.digits, ctx.mode);
	return { index, option, totals, stages, staged: { cost, limit, expected, worstCase }, repairCost: expected, authorised };
}

function lineResult(line: PricedLine, fmt: Formatter): LineResult {
	const grossProfit = line.sell - line.cost;
	return {
		kind: line.kind,
		category: line.category,
		description: line.description,
		inputIndex: line.inputIndex,
		quantity: line.quantity ? line.quantity.toString() : null,
		unitPrice: line.unitPrice === null ? null : fmt.money(line.unitPrice),
		sell: fmt.money(line.sell),
		cost: fmt.money(line.cost),
		grossProfit: fmt.money(grossProfit),
		marginPercent: percentOfScaled(grossProfit, line.sell),
		markupPercent: line.cost === 0n ? null : percentOfScaled(grossProfit, line.cost),
		taxable: line.taxable,
		specialOrder: line.specialOrder
	};
}

function totalsResult(totals: PricedLines, fmt: Formatter): TotalsResult {
	const grossProfit = totals.subtotal - totals.cost;
	return {
		subtotal: fmt.money(totals.subtotal),
		taxableBase: fmt.money(totals.taxableBase),
		tax: fmt.money(totals.tax),
		total: fmt.money(totals.total),
		cost: fmt.money(totals.cost),
		grossProfit: fmt.money(grossProfit),
		marginPercent: percentOfScaled(grossProfit, totals.subtotal),
		markupPercent: totals.cost === 0n ? null : percentOfScaled(grossProfit, totals.cost)
	};
}

function optionResult(priced: PricedOption, ctx: PricingContext, fmt: Formatter): OptionResult {
	const { option, totals } = priced;
	const deposit = depositFor(priced.authorised, totals.specialOrderParts, ctx);
	const grossProfit = totals.subtotal - totals.cost;
	// margin ≥ target  ⇔  gross profit × 100 ≥ target% × subtotal (target kept in hundredths of a percent)
	const meetsTargetMargin = totals.subtotal > 0n ? grossProfit * 10000n >= ctx.fixed.targetMarginPercent * totals.subtotal : null;
	const reasons: string[] = [];
	let staged: StagedResult | null = null;
	if (priced.stages && priced.staged) {
		const { cost, limit, expected } = priced.staged;
		staged = {
			stages: priced.stages.map((s, k) => ({
				label: s.stage.label,
				likelihood: s.stage.likelihood.toString(),
				reachPercent: fractionAsPercent(cost.reachChances[k]),
				lines: s.priced.lines.map((line) => lineResult(line, fmt)),
				...totalsResult(s.priced, fmt)
			})),
			expectedCost: fmt.money(expected),
			worstCase: fmt.money(priced.staged.worstCase),
			notToExceed: fmt.money(priced.authorised),
			notToExceedLowered: limit.lowered,
			stagesCovered: limit.stagesCovered,
			unresolvedPercent: fractionAsPercent(cost.unresolvedChance)
		};
		reasons.push(
			`The work goes in ${priced.stages.length} stages, cheapest likely fix first. Expected cost ${fmt.say(expected)}; ` +
				`${fmt.say(priced.staged.worstCase)} if every stage is needed.`,
			`The customer authorises up to ${fmt.say(priced.authorised)}; the shop asks again before spending more.`
		);
		if (limit.lowered) reasons.push('The not-to-exceed given was above the worst case, so the worst case is used.');
		if (limit.stagesCovered === 0) reasons.push('The first stage alone costs more than the not-to-exceed: call the customer before starting.');
		if (cost.unresolvedChance.gt(0)) {
			reasons.push(`There is a ${sayPercent(cost.unresolvedChance)} chance that none of the stages ends the fault.`);
		}
	}
	if (totals.specialOrderParts > 0n) {
		reasons.push(`Special-order parts come to ${fmt.say(totals.specialOrderParts)} before tax.`);
	}
	return {
		index: priced.index,
		id: option.id ?? null,
		label: option.label,
		kind: option.kind,
		lines: priced.stages ? [] : totals.lines.map((line) => lineResult(line, fmt)),
		...totalsResult(totals, fmt),
		specialOrderParts: fmt.money(totals.specialOrderParts),
		authorised: fmt.money(priced.authorised),
		deposit: fmt.money(deposit),
		balance: fmt.money(priced.authorised - deposit),
		meetsTargetMargin,
		staged,
		reasons
	};
}

interface ValueAssessment {
	amount: Decimal | null;
	result: UnitValueResult | null;
	reasons: string[];
}

function assessUnitValue(request: PricingRequest, settings: PricingSettings, replacement: PricedOption | null, fmt: Formatter): ValueAssessment {
	const unit = request.unit;
	let rcn = unit.replacementCostNew ?? null;
	let source: UnitValueResult['replacementCostSource'] = 'unit';
	if (rcn === null && replacement) {
		const unitLine = replacement.totals.lines.find((line) => line.kind === 'unit');
		if (unitLine) {
			rcn = scaledToDecimal(unitLine.sell, fmt.digits);
			source = 'replacement-option';
		}
	}
	if (rcn === null) {
		return { amount: null, result: null, reasons: ['No replacement cost new was given, so the unit was not valued.'] };
	}
	const factor = settings.conditionFactors[unit.condition];
	const worth = unitValue({
		replacementCostNew: rcn,
		salvageFloorPercent: settings.salvageFloorPercent,
		lifeYears: unit.lifeYears,
		lifeHours: unit.lifeHours ?? null,
		ageYears: unit.ageYears,
		engineHours: unit.engineHours,
		conditionFactor: factor
	});
	const amount = roundTo(worth.value, fmt.digits, fmt.mode);
	const hoursPart =
		worth.usedByHours !== null && unit.lifeHours ? ` and ${sayNumber(unit.engineHours)} of ${sayNumber(unit.lifeHours)} engine hours` : '';
	const reasons = [
		`A comparable new unit costs ${fmt.say(rcn)}. At ${sayYears(unit.ageYears)} of an expected ${sayYears(unit.lifeYears)}${hoursPart}, ` +
			`it is ${sayPercent(worth.used)} through its life; in ${unit.condition} condition it is worth about ${fmt.say(amount)} today.`
	];
	if (worth.used.gte(1)) reasons.push('It has reached the end of its expected life, so it is valued at its salvage floor.');
	return {
		amount,
		reasons,
		result: {
			replacementCostNew: fmt.decimal(rcn),
			replacementCostSource: source,
			salvageFloor: fmt.decimal(worth.salvage),
			usedByAgePercent: percentString(unit.ageYears, unit.lifeYears)!,
			usedByHoursPercent: worth.usedByHours === null || !unit.lifeHours ? null : percentString(unit.engineHours, unit.lifeHours),
			usedPercent: worth.used.eq(worth.usedByAge)
				? percentString(unit.ageYears, unit.lifeYears)!
				: worth.used.eq(1)
					? '100.00'
					: percentString(unit.engineHours, unit.lifeHours!)!,
			condition: unit.condition,
			conditionFactor: factor.toString(),
			value: fmt.decimal(amount)
		}
	};
}

interface AssessedRepair {
	assessment: RepairAssessment;
	/** EAC of the repair path, for ranking; null without a replacement to compare with. */
	annualCost: Decimal | null;
}

function assessRepair(
	priced: PricedOption,
	request: PricingRequest,
	ctx: PricingContext,
	challenger: Challenger | null,
	value: Decimal | null,
	fmt: Formatter
): AssessedRepair {
	const settings = ctx.settings;
	const unit = request.unit;
	const option = priced.option;
	const repairCost = scaledToDecimal(priced.repairCost, fmt.digits);
	const worstCase = priced.staged ? priced.staged.worstCase : null;
	const reasons: string[] = [
		worstCase !== null
			? `The repair's expected cost is ${fmt.say(priced.repairCost)} (${fmt.say(worstCase)} if every stage is needed).`
			: `The repair costs ${fmt.say(priced.repairCost)}.`
	];

	let comparison: ComparisonResult | null = null;
	let annualCost: Decimal | null = null;
	let verdict: Verdict | 'no-comparison' = 'no-comparison';
	if (challenger) {
		const rate = settings.discountRate;
		const repairLife = remainingLifeAfterRepair({
			stated: option.lifeYears ?? null,
			lifeYears: unit.lifeYears,
			ageYears: unit.ageYears,
			lifeHours: unit.lifeHours ?? null,
			engineHours: unit.engineHours,
			annualHours: unit.annualHours ?? settings.annualHours,
			minimumLife: settings.minimumLifeAfterRepair
		});
		const upkeepOld = option.annualUpkeep ?? unit.annualUpkeep;
		const crfRepair = capitalRecoveryFactor(rate, repairLife);
		const eacRepair = repairEquivalentAnnualCost({ asIsValue: unit.asIsValue, repairCost, rate, life: repairLife, annualUpkeep: upkeepOld, factor: crfRepair });
		const rStar = breakEvenRepair({
			replacementAnnualCost: challenger.eac,
			oldAnnualUpkeep: upkeepOld,
			asIsValue: unit.asIsValue,
			rate,
			life: repairLife
		});
		// The verdict compares the repair with R* as printed, in whole minor units.
		const rStarMinor = toScaled(rStar, fmt.digits, fmt.mode);
		const band = ctx.fixed.closeCallBand;
		verdict = repairVerdictMinor(priced.repairCost, rStarMinor, band);
		annualCost = eacRepair;
		const worstCaseVerdict = priced.staged ? repairVerdictMinor(priced.staged.worstCase, rStarMinor, band) : null;
		// The chart adds up the annual figures as shown, so year 10 is ten times the printed amount.
		const perYearRepair = toScaled(eacRepair, fmt.digits, fmt.mode);
		const perYearReplace = toScaled(challenger.eac, fmt.digits, fmt.mode);
		comparison = {
			replacementOptionIndex: challenger.option.index,
			lifeAfterRepairYears: yearsString(repairLife),
			newUnitLifeYears: yearsString(challenger.life),
			capitalRecoveryFactorRepair: factorString(crfRepair),
			capitalRecoveryFactorReplace: factorString(challenger.crf),
			asIsValue: fmt.decimal(unit.asIsValue),
			equivalentAnnualCostRepair: fmt.money(perYearRepair),
			equivalentAnnualCostReplace: fmt.money(perYearReplace),
			breakEvenRepair: fmt.money(rStarMinor),
			verdict,
			worstCaseVerdict,
			chart: chartYears(repairLife, challenger.life).map((year) => ({
				year,
				repair: fmt.money(perYearRepair * BigInt(year)),
				replace: fmt.money(perYearReplace * BigInt(year))
			}))
		};
		if (rStar.lte(0)) {
			reasons.push('Keeping the old unit costs more each year than a new one, whatever the repair costs, so no repair price pays.');
		} else {
			reasons.push(`The most this repair is worth is ${fmt.say(rStarMinor)}, against "${challenger.option.option.label}".`);
		}
		// Each reason reads on its own: the PDF and the customer's page may print them apart.
		if (verdict === 'repair') reasons.push('The repair costs less than it is worth, so repairing is the better buy.');
		else if (verdict === 'replace') reasons.push(rStar.gt(0) ? 'The repair costs more than it is worth, so replacing the unit is the better buy.' : 'Replacing the unit is the better buy.');
		else reasons.push(`The repair is within ${sayPercent(settings.closeCallBand)} of what it is worth: a close call, so the customer's preference decides.`);
		const asIs = unit.asIsValue.gt(0) ? `, counting the ${fmt.say(unit.asIsValue)} the old unit would fetch as it is,` : '';
		reasons.push(
			`Spread over the ${sayYears(repairLife)} the repaired unit should last${asIs} repairing costs ${fmt.say(perYearRepair)} a year; ` +
				`a new unit costs ${fmt.say(perYearReplace)} a year over its ${sayYears(challenger.life)}.`
		);
		if (worstCase !== null && worstCaseVerdict !== null && worstCaseVerdict !== verdict) {
			reasons.push(
				worstCaseVerdict === 'replace'
					? `If every stage is needed (${fmt.say(worstCase)}), the repair would cost more than it is worth.`
					: `If every stage is needed (${fmt.say(worstCase)}), it becomes a close call.`
			);
		}
	}

	// Rules of thumb, reported beside the analysis.
	const newPrice: Minor | null = challenger
		? challenger.option.totals.total
		: unit.replacementCostNew
			? toScaled(unit.replacementCostNew, fmt.digits, fmt.mode)
			: null;
	const threshold = settings.repairThresholdPercent;
	let repairToNewPercent: string | null = null;
	let belowThreshold: boolean | null = null;
	if (newPrice !== null && newPrice > 0n) {
		repairToNewPercent = percentOfScaled(priced.repairCost, newPrice);
		// R / N < threshold%  ⇔  R × 100 × 10^6 < threshold (scaled by 10^6) × N
		belowThreshold = priced.repairCost * 100_000_000n < ctx.fixed.repairThresholdPercent * newPrice;
		reasons.push(
			`The repair is ${sayRatio(priced.repairCost, newPrice)} of the price of a new unit; ` +
				`the shop's guide is to repair below ${trimZeros(threshold.toString())}%.`
		);
	}
	let exceedsUnitValue: boolean | null = null;
	if (value !== null) {
		exceedsUnitValue = repairCost.gt(value);
		reasons.push(
			exceedsUnitValue
				? `The repair costs more than the unit is worth today (${fmt.say(value)}).`
				: `The repair costs less than the unit is worth today (${fmt.say(value)}).`
		);
	}
	if (!challenger) reasons.push('There is no replacement option to compare with, so only these rules of thumb apply.');

	const assessment: RepairAssessment = {
		optionIndex: priced.index,
		label: option.label,
		repairCost: fmt.money(priced.repairCost),
		worstCase: worstCase === null ? null : fmt.money(worstCase),
		comparison,
		repairToNewPercent,
		thresholdPercent: threshold.toString(),
		belowThreshold,
		unitValue: value === null ? null : fmt.decimal(value),
		exceedsUnitValue,
		verdict,
		reasons
	};
	return { assessment, annualCost };
}

/** The best repair by annual cost among those worth doing, else the closest call, else the replacement. */
function recommend(assessed: AssessedRepair[], replacement: PricedOption | null, fmt: Formatter): Recommendation {
	if (assessed.length === 0 || !replacement) {
		return {
			verdict: 'no-comparison',
			optionIndex: null,
			reasons: [
				assessed.length === 0
					? 'There is no repair option, so there is nothing to weigh against a replacement.'
					: 'There is no replacement option, so the repair is judged by rules of thumb only.'
			]
		};
	}
	const cheapest = (verdict: Verdict): RepairAssessment | null => {
		let best: AssessedRepair | null = null;
		for (const a of assessed) {
			if (a.assessment.verdict !== verdict || a.annualCost === null) continue;
			if (!best || a.annualCost.lt(best.annualCost!)) best = a;
		}
		return best ? best.assessment : null;
	};
	const worth = cheapest('repair');
	if (worth) {
		return { verdict: 'repair', optionIndex: worth.optionIndex, reasons: [`Repair: "${worth.label}" is a better buy than "${replacement.option.label}".`] };
	}
	const close = cheapest('close-call');
	if (close) {
		return {
			verdict: 'close-call',
			optionIndex: close.optionIndex,
			reasons: [`A close call between "${close.label}" and "${replacement.option.label}" (${fmt.say(replacement.totals.total)}): either is reasonable.`]
		};
	}
	return {
		verdict: 'replace',
		optionIndex: replacement.index,
		reasons: [`Replace: "${replacement.option.label}" is a better buy than any repair offered.`]
	};
}

// ---------------------------------------------------------------------------------------------
// The boundary: unknown JSON in, ok:true with a result or ok:false with issues out. Never throws.

/** Settings in force: defaults ← the shop's saved overrides ← the request's own settings. */
export function resolveSettings(shop?: PricingSettingsOverrides, request?: PricingSettingsOverrides): PricingSettings {
	return mergeSettings(defaultPricingSettings, shop, request);
}

export function evaluateRequest(body: unknown, shopOverrides?: unknown): EvaluateResponse {
	try {
		let shop: PricingSettingsOverrides | undefined;
		if (shopOverrides !== undefined && shopOverrides !== null) {
			const parsedShop = pricingSettingsOverridesSchema.safeParse(shopOverrides, { error: pricingErrorMap });
			if (!parsedShop.success) {
				return failure("The shop's saved pricing settings are not valid; fix them on the settings page.", issuesOf(parsedShop.error, 'shopSettings'));
			}
			shop = parsedShop.data;
		}
		const parsed = pricingRequestSchema.safeParse(body, { error: pricingErrorMap });
		if (!parsed.success) {
			const issues = issuesOf(parsed.error);
			return failure(describeIssues(issues), issues);
		}
		const request = parsed.data;
		const fixedCurrency = request.settings?.currency ?? shop?.currency;
		if (fixedCurrency !== undefined && fixedCurrency !== request.currency) {
			return failure(`The request is in ${request.currency} but the pricing settings are in ${fixedCurrency}.`, [
				{ path: 'currency', message: `Use ${fixedCurrency}, the currency of the pricing settings, or change the settings' currency.` }
			]);
		}
		const settings = resolveSettings(shop, { ...request.settings, currency: request.currency });
		const result = evaluate(request, settings);
		return { ok: true, result };
	} catch (error) {
		if (error instanceof PricingError) {
			return failure(error.message, [{ path: error.path, message: error.message }]);
		}
		const message = 'The pricing request could not be evaluated; check the figures and try again.';
		return failure(message, [{ path: '', message }]);
	}
}

function failure(message: string, issues: FieldIssue[]): EvaluateResponse {
	return { ok: false, message, issues };
}

function describeIssues(issues: FieldIssue[]): string {
	if (issues.length === 0) return 'The pricing request is not valid.';
	const first = issues[0];
	const where = first.path ? `${first.path}: ` : '';
	const others = issues.length - 1;
	const more = others > 0 ? ` (and ${others} more problem${others > 1 ? 's' : ''}; see issues)` : '';
	return `The pricing request is not valid. ${where}${first.message}${more}`;
}

