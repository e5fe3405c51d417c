import { z } from 'zod';
import {
	currencyField,
	decimalField,
	fractionField,
	hoursField,
	moneyField,
	percentField,
	quantityField,
	textField,
	yearsField
} from './fields';
import { ZERO } from './money';
import { conditions, pricingSettingsOverridesSchema } from './settings';

export const MAX_OPTIONS = 20;
export const MAX_STAGES = 10;
export const MAX_LINES_PER_LIST = 200;
export const MAX_LINES_PER_REQUEST = 1000;

const description = textField(200, 'a description');
const lineId = textField(64, 'a line id').optional();

const partLine = z.strictObject({
	kind: z.literal('part'),
	id: lineId,
	description,
	quantity: quantityField('a part quantity'),
	unitCost: moneyField('a part unit cost'),
	/** Overrides the sell price the markup tiers would give. */
	unitPrice: moneyField('a part unit price').optional(),
	specialOrder: z.boolean().optional()
});

const labourLine = z.strictObject({
	kind: z.literal('labour'),
	id: lineId,
	description,
	hours: decimalField({ min: 0, minExclusive: true, max: 10000, maxDecimals: 4, what: 'labour hours' }),
	rate: moneyField('a labour rate').optional(),
	costRate: moneyField('a labour cost rate').optional()
});

const feeLine = z.strictObject({
	kind: z.literal('fee'),
	id: lineId,
	description,
	amount: moneyField('a fee amount'),
	cost: moneyField('a fee cost').optional(),
	feeType: z.enum(['diagnostic', 'disposal', 'pickup', 'delivery', 'setup', 'other']).optional()
});

const subletLine = z.strictObject({
	kind: z.literal('sublet'),
	id: lineId,
	description,
	cost: moneyField('a sublet cost'),
	price: moneyField('a sublet price')
});

const unitLine = z.strictObject({
	kind: z.literal('unit'),
	id: lineId,
	description,
	cost: moneyField('the new unit cost'),
	price: moneyField('the new unit price')
});

const discountLine = z
	.strictObject({
		kind: z.literal('discount'),
		id: lineId,
		description,
		percent: percentField('a discount percentage').optional(),
		amount: moneyField('a discount amount').optional(),
		appliesTo: z.enum(['option', 'parts', 'labour', 'fees', 'sublet', 'unit']).default('option')
	})
	.superRefine((line, ctx) => {
		if ((line.percent === undefined) === (line.amount === undefined)) {
			ctx.addIssue({ code: 'custom', path: ['percent'], message: 'Give a discount either a percent or an amount, not both or neither.' });
		}
	});

export const lineSchema = z.discriminatedUnion('kind', [partLine, labourLine, feeLine, subletLine, unitLine, discountLine], {
	error: 'Each line needs a kind: part, labour, fee, sublet, unit or discount.'
});

const lineList = z
	.array(lineSchema, { error: 'Give the lines as a list.' })
	.max(MAX_LINES_PER_LIST, { error: `Use at most ${MAX_LINES_PER_LIST} lines in one list.` });

const stageSchema = z.strictObject({
	label: textField(120, 'a stage label'),
	/** Chance this stage ends the fault, as a fraction. */
	likelihood: fractionField('a likelihood between 0 and 1'),
	lines: lineList
});

const optionSchema = z
	.strictObject({
		id: textField(64, 'an option id').optional(),
		label: textField(120, 'an option label'),
		kind: z.enum(['repair', 'replacement', 'decline'], { error: 'Choose the option kind "repair", "replacement" or "decline".' }),
		lines: lineList.default([]),
		stages: z
			.array(stageSchema, { error: 'Give the stages as a list.' })
			.min(1, { error: 'A staged option needs at least one stage.' })
			.max(MAX_STAGES, { error: `Use at most ${MAX_STAGES} stages.` })
			.optional(),
		creditDiagnosticFee: z.boolean().optional(),
		/** Repair: stated life after repair. Replacement: the new unit's life, if not the unit's class life. */
		lifeYears: yearsField('a life in years').optional(),
		lifeHours: hoursField('a life in engine hours').optional(),
		annualUpkeep: moneyField('an annual upkeep cost').optional(),
		resaleAtEnd: moneyField('a resale value at end of life').optional(),
		notToExceed: moneyField('a not-to-exceed amount').optional()
	})
	.superRefine((option, ctx) => {
		const stages = option.stages ?? [];
		const allLines = [...option.lines, ...stages.flatMap((stage) => stage.lines)];
		const unitLines = option.lines.filter((line) => line.kind === 'unit').length;
		if (option.kind === 'replacement') {
			if (unitLines !== 1) {
				ctx.addIssue({ code: 'custom', path: ['lines'], message: 'A replacement option needs exactly one line of kind "unit" (the new unit).' });
			}
			if (stages.length > 0) ctx.addIssue({ code: 'custom', path: ['stages'], message: 'Only a repair option can have stages.' });
		} else {
			if (allLines.some((line) => line.kind === 'unit')) {
				ctx.addIssue({ code: 'custom', path: ['lines'], message: 'Only a replacement option can hold a new unit line.' });
			}
			if (option.resaleAtEnd !== undefined) {
				ctx.addIssue({ code: 'custom', path: ['resaleAtEnd'], message: 'A resale value at end of life belongs to a replacement option.' });
			}
			if (option.lifeHours !== undefined) {
				ctx.addIssue({ code: 'custom', path: ['lifeHours'], message: 'A life in engine hours belongs to a replacement option; give a repair its life in years.' });
			}
		}
		if (option.kind === 'decline' && stages.length > 0) {
			ctx.addIssue({ code: 'custom', path: ['stages'], message: 'Only a repair option can have stages.' });
		}
		if (stages.length > 0 && option.lines.length > 0) {
			ctx.addIssue({ code: 'custom', path: ['lines'], message: 'A staged option keeps its lines inside its stages; leave the option lines empty.' });
		}
		if (option.notToExceed !== undefined && stages.length === 0) {
			ctx.addIssue({ code: 'custom', path: ['notToExceed'], message: 'A not-to-exceed amount belongs to a staged option.' });
		}
		if (option.creditDiagnosticFee && option.kind !== 'repair') {
			ctx.addIssue({ code: 'custom', path: ['creditDiagnosticFee'], message: 'The diagnostic fee can be credited on a repair option only.' });
		}
		const likelihoodSum = stages.reduce((sum, stage) => sum.plus(stage.likelihood), ZERO);
		if (likelihoodSum.gt(1)) {
			ctx.addIssue({
				code: 'custom',
				path: ['stages'],
				message: `The stage likelihoods add up to ${likelihoodSum.toString()}; they may add up to at most 1.`
			});
		}
	});

const unitSchema = z.strictObject({
	description: textField(200, 'a unit description').optional(),
	/** Years since it was bought; the caller works it out from the year bought and today's date. */
	ageYears: decimalField({ min: 0, max: 200, maxDecimals: 4, what: 'an age in years' }),
	engineHours: decimalField({ min: 0, max: '1000000', maxDecimals: 2, what: 'engine hours' }).default(ZERO),
	lifeYears: yearsField('an expected life in years'),
	lifeHours: hoursField('an expected engine life in hours').optional(),
	condition: z.enum(conditions, { error: 'Choose the condition "excellent", "good", "fair" or "poor".' }).default('good'),
	replacementCostNew: moneyField('a replacement cost new').optional(),
	/** What the failed unit fetches as-is today (S). */
	asIsValue: moneyField('an as-is value').default(ZERO),
	annualUpkeep: moneyField('an annual upkeep cost').default(ZERO),
	annualHours: decimalField({ min: 0, minExclusive: true, max: 8784, maxDecimals: 2, what: 'engine hours per year' }).optional()
});

export const pricingRequestSchema = z
	.strictObject(
		{
			currency: currencyField,
			settings: pricingSettingsOverridesSchema.optional(),
			/** The job's diagnostic fee, credited on a repair option that asks for it. */
			diagnosticFee: moneyField('a diagnostic fee').optional(),
			unit: unitSchema,
			options: z
				.array(optionSchema, { error: 'Give the options as a list.' })
				.min(1, { error: 'Give at least one option.' })
				.max(MAX_OPTIONS, { error: `Use at most ${MAX_OPTIONS} options.` })
		},
		{ error: 'Send the pricing request as a JSON object with currency, unit and options.' }
	)
	.superRefine((request, ctx) => {
		let lines = 0;
		for (const option of request.options) {
			lines += option.lines.length;
			for (const stage of option.stages ?? []) lines += stage.lines.length;
		}
		if (lines > MAX_LINES_PER_REQUEST) {
			ctx.addIssue({ code: 'custom', path: ['options'], message: `Use at most ${MAX_LINES_PER_REQUEST} lines in one request.` });
		}
		request.options.forEach((option, index) => {
			if (option.creditDiagnosticFee && request.diagnosticFee === undefined) {
				ctx.addIssue({
					code: 'custom',
					path: ['options', index, 'creditDiagnosticFee'],
					message: 'Give the diagnosticFee to credit it on this option.'
				});
			}
		});
	});

export type PricingRequestInput = z.input<typeof pricingRequestSchema>;
export type PricingRequest = z.output<typeof pricingRequestSchema>;
export type OptionInput = PricingRequest['options'][number];
export type LineInput = z.output<typeof lineSchema>;
export type StageInput = NonNullable<OptionInput['stages']>[number];
export type UnitInput = PricingRequest['unit'];
