export * from './money';
export * from './settings';
export * from './schema';
export * from './lines';
export * from './value';
export * from './economics';
export * from './staged';
export * from './bench';
export * from './format';
export { issuesOf, decimalField, pricingErrorMap, type FieldIssue } from './fields';
export {
	evaluate,
	evaluateRequest,
	resolveSettings,
	type EvaluateResponse,
	type PricingResult,
	type OptionResult,
	type LineResult,
	type TotalsResult,
	type StageResult,
	type StagedResult,
	type UnitValueResult,
	type ReplacementResult,
	type ComparisonResult,
	type RepairAssessment,
	type Recommendation
} from './evaluate';
