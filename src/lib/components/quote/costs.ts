// What a person who may not see costs gets of a pricing result: the same prices, totals and
// verdict, without costs, gross profit, margins, markups or the settings that reveal them.
import type { LineResult, OptionResult, PricingResult, StageResult, TotalsResult } from '$lib/pricing/evaluate';

type CostKey = 'cost' | 'grossProfit' | 'marginPercent' | 'markupPercent';
type Hidden<T> = Omit<T, CostKey> & Partial<Pick<T, Extract<keyof T, CostKey>>>;

export type ShownLine = Hidden<LineResult>;
export type ShownTotals = Hidden<TotalsResult>;
export type ShownStage = Hidden<Omit<StageResult, 'lines'>> & { lines: ShownLine[] };
export type ShownOption = Hidden<Omit<OptionResult, 'lines' | 'staged' | 'meetsTargetMargin'>> & {
	lines: ShownLine[];
	staged: (Omit<NonNullable<OptionResult['staged']>, 'stages'> & { stages: ShownStage[] }) | null;
	meetsTargetMargin?: boolean | null;
};
export type ShownSettings = Omit<PricingResult['settings'], 'labourCostRate' | 'markupTiers'> &
	Partial<Pick<PricingResult['settings'], 'labourCostRate' | 'markupTiers'>>;
export type ShownResult = Omit<PricingResult, 'options' | 'settings'> & { options: ShownOption[]; settings: ShownSettings };

/** The keys removed from every line, stage and option. */
export const COST_KEYS: readonly CostKey[] = ['cost', 'grossProfit', 'marginPercent', 'markupPercent'];

function withoutCostKeys<T extends object>(value: T): Hidden<T> {
	const copy = { ...value } as Record<string, unknown>;
	for (const key of COST_KEYS) delete copy[key];
	return copy as Hidden<T>;
}

/** The result with every cost figure removed (a new object; the input is left as it is). */
export function hideCosts(result: PricingResult | ShownResult): ShownResult {
	const options = result.options.map((option) => {
		const { meetsTargetMargin: _target, ...rest } = withoutCostKeys(option) as ShownOption;
		return {
			...rest,
			lines: option.lines.map((line) => withoutCostKeys(line)),
			staged: option.staged
				? {
						...option.staged,
						stages: option.staged.stages.map((stage) => ({ ...withoutCostKeys(stage), lines: stage.lines.map((line) => withoutCostKeys(line)) }))
					}
				: null
		} satisfies ShownOption;
	});
	const { labourCostRate: _rate, markupTiers: _tiers, ...settings } = result.settings;
	return { ...result, options, settings };
}

/** Whether any cost figure is left anywhere in a result (for tests and a last check before sending). */
export function carriesCosts(result: unknown): boolean {
	const seen = JSON.stringify(result);
	return /"(cost|grossProfit|marginPercent|markupPercent|labourCostRate|markupTiers|meetsTargetMargin)":/.test(seen);
}
