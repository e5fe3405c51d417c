// The quote as the builder edits it. Every figure is text exactly as typed; the engine (through
// POST /api/pricing/evaluate) does all the arithmetic. Only stage likelihoods differ from the
// engine's request: people type a percentage, the engine takes a fraction.
import { Dec } from '$lib/pricing/money';

export type LineKind = 'part' | 'labour' | 'fee' | 'sublet' | 'unit' | 'discount';

export interface EditLine {
	kind: LineKind;
	id: string;
	description: string;
	quantity?: string;
	unitCost?: string;
	unitPrice?: string;
	specialOrder?: boolean;
	hours?: string;
	rate?: string;
	costRate?: string;
	amount?: string;
	cost?: string;
	price?: string;
	percent?: string;
	feeType?: string;
	appliesTo?: string;
	/** Editor only: which of percent and amount a discount uses. */
	discountBy?: 'percent' | 'amount';
}

export interface EditStage {
	key: string;
	label: string;
	likelihoodPercent: string;
	lines: EditLine[];
}

export type OptionKind = 'repair' | 'replacement' | 'decline';

export interface EditOption {
	id: string;
	label: string;
	kind: OptionKind;
	lines: EditLine[];
	stages: EditStage[] | null;
	creditDiagnosticFee: boolean;
	lifeYears: string;
	lifeHours: string;
	annualUpkeep: string;
	resaleAtEnd: string;
	notToExceed: string;
}

export interface EditUnit {
	description: string;
	ageYears: string;
	engineHours: string;
	lifeYears: string;
	lifeHours: string;
	condition: string;
	replacementCostNew: string;
	asIsValue: string;
	annualUpkeep: string;
	annualHours: string;
}

export interface EditDraft {
	unit: EditUnit;
	options: EditOption[];
}

export interface Issue {
	path: string;
	message: string;
}

export const CONDITIONS = ['excellent', 'good', 'fair', 'poor'] as const;
export const FEE_TYPES = ['diagnostic', 'disposal', 'pickup', 'delivery', 'setup', 'other'] as const;
export const DISCOUNT_TARGETS = ['option', 'parts', 'labour', 'fees', 'sublet', 'unit'] as const;

let counter = 0;
/** A short id, unique on this page, for lines, stages and options. */
export function newId(prefix: string): string {
	counter += 1;
	const random = typeof crypto !== 'undefined' && 'randomUUID' in crypto ? crypto.randomUUID().slice(0, 8) : Math.random().toString(36).slice(2, 10);
	return `${prefix}-${random}${counter}`;
}

const text = (value: unknown): string => (typeof value === 'string' ? value : typeof value === 'number' ? String(value) : '');
const isRecord = (value: unknown): value is Record<string, unknown> => !!value && typeof value === 'object' && !Array.isArray(value);

/** "0.6" → "60": exact, by decimal.js; text that is not a number is kept as it is. */
export function fractionToPercent(value: string): string {
	try {
		return new Dec(value).times(100).toString();
	} catch {
		return value;
	}
}

/** "60" → "0.6"; text that is not a number goes to the engine as it is, which names the problem. */
export function percentToFraction(value: string): string {
	const trimmed = value.trim();
	if (!/^-?\d+(\.\d+)?$/.test(trimmed)) return trimmed;
	return new Dec(trimmed).div(100).toString();
}

function editLine(raw: unknown, index: number, place: string): EditLine {
	const line = isRecord(raw) ? raw : {};
	const out: EditLine = { kind: (text(line.kind) || 'part') as LineKind, id: text(line.id) || `${place}l${index}`, description: text(line.description) };
	const fields = out as unknown as Record<string, string | boolean>;
	for (const [key, value] of Object.entries(line)) {
		if (key === 'kind' || key === 'id' || key === 'description') continue;
		fields[key] = typeof value === 'boolean' ? value : text(value);
	}
	if (out.kind === 'discount') out.discountBy = out.amount !== undefined && out.amount !== '' ? 'amount' : 'percent';
	return out;
}

/** The stored draft as the builder's editable state (missing ids are made from each line's place, as the server does). */
export function fromDraft(draft: unknown): EditDraft {
	const d = isRecord(draft) ? draft : {};
	const u = isRecord(d.unit) ? d.unit : {};
	const options = Array.isArray(d.options) ? d.options : [];
	return {
		unit: {
			description: text(u.description),
			ageYears: text(u.ageYears),
			engineHours: text(u.engineHours),
			lifeYears: text(u.lifeYears),
			lifeHours: text(u.lifeHours),
			condition: text(u.condition) || 'good',
			replacementCostNew: text(u.replacementCostNew),
			asIsValue: text(u.asIsValue),
			annualUpkeep: text(u.annualUpkeep),
			annualHours: text(u.annualHours)
		},
		options: options.map((raw, o) => {
			const option = isRecord(raw) ? raw : {};
			const stages = Array.isArray(option.stages)
				? option.stages.map((s, k) => {
						const stage = isRecord(s) ? s : {};
						return {
							key: newId('stage'),
							label: text(stage.label),
							likelihoodPercent: fractionToPercent(text(stage.likelihood)),
							lines: (Array.isArray(stage.lines) ? stage.lines : []).map((l, j) => editLine(l, j, `o${o}s${k}`))
						};
					})
				: null;
			return {
				id: text(option.id) || newId('option'),
				label: text(option.label),
				kind: (text(option.kind) || 'repair') as OptionKind,
				lines: (Array.isArray(option.lines) ? option.lines : []).map((l, j) => editLine(l, j, `o${o}`)),
				stages,
				creditDiagnosticFee: option.creditDiagnosticFee === true,
				lifeYears: text(option.lifeYears),
				lifeHours: text(option.lifeHours),
				annualUpkeep: text(option.annualUpkeep),
				resaleAtEnd: text(option.resaleAtEnd),
				notToExceed: text(option.notToExceed)
			};
		})
	};
}

/** Optional text fields are left out when empty, so the engine applies its default. */
function optional(out: Record<string, unknown>, key: string, value: string) {
	const trimmed = value.trim();
	if (trimmed !== '') out[key] = trimmed;
}

const LINE_TEXT_FIELDS = ['quantity', 'unitCost', 'unitPrice', 'hours', 'rate', 'costRate', 'amount', 'cost', 'price', 'percent', 'feeType', 'appliesTo'];

function requestLine(line: EditLine): Record<string, unknown> {
	const out: Record<string, unknown> = { kind: line.kind, id: line.id, description: line.description };
	for (const key of LINE_TEXT_FIELDS) {
		const value = (line as unknown as Record<string, unknown>)[key];
		if (typeof value === 'string') optional(out, key, value);
	}
	if (line.kind === 'part' && line.specialOrder === true) out.specialOrder = true;
	if (line.kind === 'discount') {
		// The editor keeps both boxes; the one not chosen is left out.
		if (line.discountBy === 'amount') delete out.percent;
		else delete out.amount;
	}
	return out;
}

/** The draft as the engine takes it (the request without currency and diagnostic fee). */
export function toDraft(edit: EditDraft): { unit: Record<string, unknown>; options: Record<string, unknown>[] } {
	const unit: Record<string, unknown> = {};
	for (const [key, value] of Object.entries(edit.unit)) optional(unit, key, value);
	if (unit.description === undefined) delete unit.description;
	const options = edit.options.map((option) => {
		const out: Record<string, unknown> = { id: option.id, label: option.label, kind: option.kind, lines: option.lines.map(requestLine) };
		if (option.stages) {
			out.lines = [];
			out.stages = option.stages.map((stage) => ({
				label: stage.label,
				likelihood: percentToFraction(stage.likelihoodPercent),
				lines: stage.lines.map(requestLine)
			}));
			optional(out, 'notToExceed', option.notToExceed);
		}
		if (option.kind === 'repair' && option.creditDiagnosticFee) out.creditDiagnosticFee = true;
		optional(out, 'lifeYears', option.lifeYears);
		if (option.kind === 'replacement') {
			optional(out, 'lifeHours', option.lifeHours);
			optional(out, 'resaleAtEnd', option.resaleAtEnd);
		}
		optional(out, 'annualUpkeep', option.annualUpkeep);
		return out;
	});
	return { unit, options };
}

/** Issues keyed by their dotted path ("options.0.lines.2.unitCost"), the first message per path. */
export function issuesByPath(issues: Issue[]): Record<string, string> {
	const out: Record<string, string> = {};
	for (const issue of issues) out[issue.path] ??= issue.message;
	return out;
}

/** Where an issue is, in words: "Option 1, line 3" for options.0.lines.2.unitCost. */
export function placeOf(path: string, labels: string[]): string {
	const parts = path.split('.');
	if (parts[0] === 'unit') return 'The unit';
	if (parts[0] !== 'options' || parts.length < 2) return 'The quote';
	const o = Number(parts[1]);
	let place = labels[o] ? `“${labels[o]}”` : `Option ${o + 1}`;
	if (parts[2] === 'stages' && parts[3] !== undefined) place += `, stage ${Number(parts[3]) + 1}`;
	const linesAt = parts.indexOf('lines');
	if (linesAt >= 0 && parts[linesAt + 1] !== undefined) place += `, line ${Number(parts[linesAt + 1]) + 1}`;
	return place;
}

export function blankLine(kind: LineKind, masked: boolean): EditLine {
	const id = newId(kind);
	switch (kind) {
		case 'part':
			return { kind, id, description: '', quantity: '1', unitCost: masked ? '0' : '', unitPrice: '', specialOrder: false };
		case 'labour':
			return { kind, id, description: '', hours: '', rate: '' };
		case 'fee':
			return { kind, id, description: '', amount: '', feeType: 'other' };
		case 'sublet':
			return { kind, id, description: '', cost: masked ? '0' : '', price: '' };
		case 'unit':
			return { kind, id, description: '', cost: masked ? '0' : '', price: '' };
		case 'discount':
			return { kind, id, description: 'Discount', discountBy: 'percent', percent: '', amount: '', appliesTo: 'option' };
	}
}

export function blankOption(kind: OptionKind, label: string): EditOption {
	return {
		id: newId('option'),
		label,
		kind,
		lines: [],
		stages: null,
		creditDiagnosticFee: kind === 'repair',
		lifeYears: '',
		lifeHours: '',
		annualUpkeep: '',
		resaleAtEnd: '',
		notToExceed: ''
	};
}
