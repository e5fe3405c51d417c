import type { Transaction } from 'sequelize';
import { z } from 'zod';
import { plainNumber } from './validators';
import * as currencyCodes from 'currency-codes';
import { decimalField, MAX_MONEY } from '../pricing/fields';
import { Dec, HUNDRED, currencyDigits, isKnownCurrency, type Decimal } from '../pricing/money';
import {
	categories,
	conditions,
	defaultPricingSettings,
	mergeSettings,
	pricingSettingsOverridesSchema,
	pricingSettingsSchema,
	settingsToJson,
	type PricingSettings,
	type PricingSettingsJson,
	type PricingSettingsOverrides
} from '../pricing/settings';
import type { RoleName } from '../roles';
import * as audit from './audit';
import { db } from './db';
import { Shop } from './db/models';
import type { FieldErrors, Parsed } from './forms';

/*
 * shops.settings (jsonb) holds:
 *   pricing            the engine's settings as JSON strings (a complete set once saved here)
 *   quoteValidityDays  days a quote may be approved after it is sent
 *   techniciansSeeCosts whether technicians see part costs and margins
 *   fees               { diagnostic, disposal, pickup } as decimal strings
 * Other keys in the column belong to other modules and are kept as they are.
 * shops.currency always equals pricing.currency.
 */

export const FEE_NAMES = ['diagnostic', 'disposal', 'pickup'] as const;
export type FeeName = (typeof FEE_NAMES)[number];

export interface ShopSettings {
	pricing: PricingSettings;
	currency: string;
	quoteValidityDays: number;
	techniciansSeeCosts: boolean;
	fees: Record<FeeName, Decimal>;
}

/** Defaults for the parts of the settings the pricing engine does not hold. Common practice, no source. */
export const DEFAULT_QUOTE_VALIDITY_DAYS = 30;
export const DEFAULT_TECHNICIANS_SEE_COSTS = true;
export const DEFAULT_FEES: Record<FeeName, string> = { diagnostic: '85.00', disposal: '12.00', pickup: '45.00' };

const feeField = (what: string) => decimalField({ min: 0, max: MAX_MONEY, maxDecimals: 4, what });
const validityField = z.preprocess(
	plainNumber,
	z.coerce
		.number({ error: 'Enter the number of days an estimate stays valid.' })
		.int('Enter whole days.')
		.min(1, 'An estimate stays valid for at least 1 day.')
		.max(365, 'Keep estimate validity to 365 days or fewer.')
);

const storedExtrasSchema = {
	quoteValidityDays: validityField,
	techniciansSeeCosts: z.boolean(),
	fees: z.strictObject({ diagnostic: feeField('the diagnostic fee'), disposal: feeField('the disposal fee'), pickup: feeField('the pick-up fee') })
};

type StoredSettings = Record<string, unknown>;

function storedOf(shop: Shop): StoredSettings {
	const value = shop.settings;
	return value && typeof value === 'object' && !Array.isArray(value) ? (value as StoredSettings) : {};
}

/** Each stored pricing key that still validates; a key the engine no longer knows or accepts is skipped. */
function storedPricing(stored: StoredSettings): PricingSettingsOverrides {
	const raw = stored.pricing;
	if (!raw || typeof raw !== 'object' || Array.isArray(raw)) return {};
	const shape = pricingSettingsOverridesSchema.shape as Record<string, z.ZodType>;
	const out: Record<string, unknown> = {};
	for (const [key, value] of Object.entries(raw)) {
		const schema = shape[key];
		if (!schema) continue;
		const parsed = schema.safeParse(value);
		if (parsed.success && parsed.data !== undefined) out[key] = parsed.data;
	}
	return out as PricingSettingsOverrides;
}

function storedExtra<K extends keyof typeof storedExtrasSchema>(stored: StoredSettings, key: K, fallback: z.output<(typeof storedExtrasSchema)[K]>) {
	const parsed = storedExtrasSchema[key].safeParse(stored[key]);
	return parsed.success ? (parsed.data as z.output<(typeof storedExtrasSchema)[K]>) : fallback;
}

function fromShop(shop: Shop): ShopSettings {
	const stored = storedOf(shop);
	const pricing = mergeSettings(defaultPricingSettings, { currency: shop.currency }, storedPricing(stored));
	const defaultFees = Object.fromEntries(FEE_NAMES.map((k) => [k, new Dec(DEFAULT_FEES[k])])) as Record<FeeName, Decimal>;
	const storedFees = stored.fees && typeof stored.fees === 'object' ? (stored.fees as Record<string, unknown>) : {};
	const fees = { ...defaultFees };
	for (const name of FEE_NAMES) {
		const parsed = feeField('a fee').safeParse(storedFees[name]);
		if (parsed.success) fees[name] = parsed.data;
	}
	return {
		pricing,
		currency: pricing.currency,
		quoteValidityDays: storedExtra(stored, 'quoteValidityDays', DEFAULT_QUOTE_VALIDITY_DAYS),
		techniciansSeeCosts: storedExtra(stored, 'techniciansSeeCosts', DEFAULT_TECHNICIANS_SEE_COSTS),
		fees
	};
}

async function findShop(shopId: string, transaction?: Transaction, lock = false): Promise<Shop> {
	const shop = await Shop.findByPk(shopId, { transaction, lock: lock && transaction ? transaction.LOCK.UPDATE : undefined });
	if (!shop) throw new Error(`shop ${shopId} not found`);
	return shop;
}

/** The shop's settings with defaults filled in. */
export async function get(shopId: string, transaction?: Transaction): Promise<ShopSettings> {
	return fromShop(await findShop(shopId, transaction));
}

/**
 * The shop's pricing settings as JSON, ready to pass as `shopOverrides` to evaluateRequest. It is
 * the complete merged set, so it also fixes the currency quotes are priced in.
 */
export async function pricingOverrides(shopId: string, transaction?: Transaction): Promise<PricingSettingsJson> {
	return settingsToJson((await get(shopId, transaction)).pricing);
}

/** Whether someone of this role sees part costs and margins in this shop. */
export function seesCosts(role: RoleName, settings: Pick<ShopSettings, 'techniciansSeeCosts'>): boolean {
	return role !== 'technician' || settings.techniciansSeeCosts;
}

// ---------------------------------------------------------------------------------------------
// The settings form: flat fields, percentages where people think in percent.

export const shopProfileSchema = z.object({
	name: z.string({ error: 'Enter the shop name.' }).trim().min(1, 'Enter the shop name.').max(120, 'Keep the shop name under 120 characters.'),
	phone: z.string().trim().max(40, 'Keep the phone number under 40 characters.').default(''),
	email: z
		.string()
		.trim()
		.toLowerCase()
		.max(254, 'That e-mail address is too long.')
		.refine((v) => v === '' || z.email().safeParse(v).success, 'Enter a valid e-mail address, like desk@example.com, or leave it empty.')
		.default(''),
	address: z.string().trim().max(300, 'Keep the address under 300 characters.').default('')
});
export type ShopProfile = z.output<typeof shopProfileSchema>;

export interface SettingsInput {
	profile: ShopProfile;
	pricing: PricingSettings;
	quoteValidityDays: number;
	techniciansSeeCosts: boolean;
	fees: Record<FeeName, Decimal>;
}

/** What the form shows: every value as typed text, tiers as two parallel lists, taxable as the ticked categories. */
export interface SettingsFormValues {
	fields: Record<string, string>;
	tierUpTo: string[];
	tierMultiplier: string[];
	taxable: string[];
}

const CONDITION_FIELDS = { excellent: 'conditionExcellent', good: 'conditionGood', fair: 'conditionFair', poor: 'conditionPoor' } as const;
const FEE_FIELDS: Record<FeeName, string> = { diagnostic: 'feeDiagnostic', disposal: 'feeDisposal', pickup: 'feePickup' };

/** Engine keys typed in the form exactly as the engine takes them. */
const DIRECT_FIELDS = [
	'currency',
	'roundingMode',
	'labourRate',
	'labourCostRate',
	'suppliesPercent',
	'suppliesCap',
	'depositRule',
	'depositPercent',
	'annualHours',
	'salvageFloorPercent',
	'repairThresholdPercent',
	'minimumLifeAfterRepair',
	'targetMarginPercent'
] as const;

const MONEY_FIELDS = new Set<string>(['labourRate', 'labourCostRate', 'suppliesCap']);

/** Engine fractions shown in the form as percentages. */
const PERCENT_FIELDS = {
	taxRate: { field: 'taxPercent', max: 100, what: 'a tax rate in percent' },
	discountRate: { field: 'discountPercent', max: 100, what: 'a discount rate in percent' },
	closeCallBand: { field: 'closeCallPercent', max: 50, what: 'a close-call band in percent' }
} as const;

const extrasFormSchema = z.object({
	quoteValidityDays: validityField,
	feeDiagnostic: feeField('the diagnostic fee'),
	feeDisposal: feeField('the disposal fee'),
	feePickup: feeField('the pick-up fee'),
	taxPercent: decimalField({ min: 0, max: PERCENT_FIELDS.taxRate.max, maxDecimals: 6, what: PERCENT_FIELDS.taxRate.what }),
	discountPercent: decimalField({ min: 0, max: PERCENT_FIELDS.discountRate.max, maxDecimals: 6, what: PERCENT_FIELDS.discountRate.what }),
	closeCallPercent: decimalField({ min: 0, max: PERCENT_FIELDS.closeCallBand.max, maxDecimals: 6, what: PERCENT_FIELDS.closeCallBand.what })
});

const text = (value: Decimal) => value.toString();
const percentOf = (fraction: Decimal) => text(fraction.times(HUNDRED));

/** Money as a form shows it: the currency's minor digits ("95.00"), unless it holds finer fractions. */
export function moneyField(value: Decimal, currency: string): string {
	const digits = currencyDigits(currency);
	return value.decimalPlaces() <= digits ? value.toFixed(digits) : text(value);
}

/** Form values for the shop's current settings. */
export async function formValues(shopId: string): Promise<SettingsFormValues> {
	const shop = await findShop(shopId);
	const s = fromShop(shop);
	const p = s.pricing;
	const fields: Record<string, string> = {
		name: shop.name,
		phone: shop.phone,
		email: shop.email,
		address: shop.address,
		quoteValidityDays: String(s.quoteValidityDays),
		techniciansSeeCosts: s.techniciansSeeCosts ? 'on' : '',
		taxPercent: percentOf(p.taxRate),
		discountPercent: percentOf(p.discountRate),
		closeCallPercent: percentOf(p.closeCallBand)
	};
	const money = (value: Decimal) => moneyField(value, p.currency);
	for (const key of DIRECT_FIELDS) {
		const value = p[key];
		fields[key] = typeof value === 'string' ? value : MONEY_FIELDS.has(key) ? money(value) : text(value);
	}
	for (const c of conditions) fields[CONDITION_FIELDS[c]] = text(p.conditionFactors[c]);
	for (const fee of FEE_NAMES) fields[FEE_FIELDS[fee]] = money(s.fees[fee]);
	return {
		fields,
		tierUpTo: p.markupTiers.map((t) => (t.upTo ? money(t.upTo) : '')),
		tierMultiplier: p.markupTiers.map((t) => text(t.multiplier)),
		taxable: categories.filter((c) => p.taxable[c])
	};
}

/** What was typed, for a form sent back with errors. */
export function echoForm(form: FormData): SettingsFormValues {
	const fields: Record<string, string> = {};
	for (const [key, value] of form.entries()) {
		if (typeof value === 'string' && !['tierUpTo', 'tierMultiplier', 'taxable'].includes(key)) fields[key] = value.slice(0, 400);
	}
	const strings = (key: string) => form.getAll(key).map((v) => (typeof v === 'string' ? v.slice(0, 60) : '')).slice(0, 40);
	return { fields, tierUpTo: strings('tierUpTo'), tierMultiplier: strings('tierMultiplier'), taxable: strings('taxable') };
}

/** Validates the settings form; field errors are keyed by form field name (tiers as tierUpTo.2). */
export function readForm(form: FormData): Parsed<SettingsInput> {
	const values = echoForm(form);
	const f = values.fields;
	const errors: FieldErrors = {};
	const addError = (key: string, message: string) => {
		errors[key] ??= message;
	};

	const profile = shopProfileSchema.safeParse({ name: f.name ?? '', phone: f.phone ?? '', email: f.email ?? '', address: f.address ?? '' });
	if (!profile.success) for (const issue of profile.error.issues) addError(String(issue.path[0] ?? 'name'), issue.message);

	const extras = extrasFormSchema.safeParse({
		quoteValidityDays: (f.quoteValidityDays ?? '').trim() || undefined,
		feeDiagnostic: f.feeDiagnostic ?? '',
		feeDisposal: f.feeDisposal ?? '',
		feePickup: f.feePickup ?? '',
		taxPercent: f.taxPercent ?? '',
		discountPercent: f.discountPercent ?? '',
		closeCallPercent: f.closeCallPercent ?? ''
	});
	if (!extras.success) for (const issue of extras.error.issues) addError(String(issue.path[0]), issue.message);

	// Tier rows with both cells empty are left out; rowOf maps the kept rows back to form rows.
	const rowOf: number[] = [];
	const tiers: { upTo: string | null; multiplier: string }[] = [];
	const rows = Math.max(values.tierUpTo.length, values.tierMultiplier.length);
	for (let row = 0; row < rows; row++) {
		const upTo = (values.tierUpTo[row] ?? '').trim();
		const multiplier = (values.tierMultiplier[row] ?? '').trim();
		if (upTo === '' && multiplier === '') continue;
		if (multiplier === '') addError(`tierMultiplier.${row}`, 'Enter the multiplier for this tier, such as 1.75.');
		rowOf.push(row);
		tiers.push({ upTo: upTo === '' ? null : upTo, multiplier });
	}

	const pricingRaw: Record<string, unknown> = {
		markupTiers: tiers,
		taxable: Object.fromEntries(categories.map((c) => [c, values.taxable.includes(c)])),
		conditionFactors: Object.fromEntries(conditions.map((c) => [c, f[CONDITION_FIELDS[c]] ?? ''])),
		taxRate: '0',
		discountRate: '0',
		closeCallBand: '0'
	};
	for (const key of DIRECT_FIELDS) pricingRaw[key] = f[key] ?? '';
	if (extras.success) {
		pricingRaw.taxRate = text(extras.data.taxPercent.div(HUNDRED));
		pricingRaw.discountRate = text(extras.data.discountPercent.div(HUNDRED));
		pricingRaw.closeCallBand = text(extras.data.closeCallPercent.div(HUNDRED));
	}
	const pricing = pricingSettingsSchema.safeParse(pricingRaw);
	if (!pricing.success) {
		for (const issue of pricing.error.issues) addError(formFieldOf(issue.path, rowOf), issue.message);
	}

	if (Object.keys(errors).length > 0 || !profile.success || !extras.success || !pricing.success) {
		return { ok: false, message: 'Nothing was saved. Please correct the highlighted fields.', errors };
	}
	return {
		ok: true,
		data: {
			profile: profile.data,
			pricing: pricing.data,
			quoteValidityDays: extras.data.quoteValidityDays,
			techniciansSeeCosts: (f.techniciansSeeCosts ?? '') !== '',
			fees: { diagnostic: extras.data.feeDiagnostic, disposal: extras.data.feeDisposal, pickup: extras.data.feePickup }
		}
	};
}

function formFieldOf(path: PropertyKey[], rowOf: number[]): string {
	const [key, index, leaf] = path;
	if (key === 'markupTiers') {
		if (typeof index === 'number') return `${leaf === 'multiplier' ? 'tierMultiplier' : 'tierUpTo'}.${rowOf[index] ?? index}`;
		return 'tiers';
	}
	if (key === 'conditionFactors' && typeof index === 'string') return CONDITION_FIELDS[index as keyof typeof CONDITION_FIELDS] ?? 'conditionGood';
	if (key === 'taxable') return 'taxable';
	if (typeof key === 'string' && key in PERCENT_FIELDS) return PERCENT_FIELDS[key as keyof typeof PERCENT_FIELDS].field;
	return typeof key === 'string' ? key : 'form';
}

/** ISO 4217 fund and accounting units: valid codes, but not what a customer pays a repair bill in. */
const FUND_CODES = new Set(['BOV', 'CHE', 'CHW', 'CLF', 'COU', 'MXV', 'USN', 'UYI', 'UYW']);

/** ISO 4217 codes a shop can be paid in, for the currency list. */
export function currencyChoices(current = ''): { code: string; name: string }[] {
	return currencyCodes.data
		.filter((c) => isKnownCurrency(c.code) && (!FUND_CODES.has(c.code) || c.code === current))
		.map((c) => ({ code: c.code, name: c.currency }))
		.sort((a, b) => a.code.localeCompare(b.code));
}

export interface Actor {
	id: string;
	shopId: string;
}

/** Saves the shop's profile and settings; shops.currency follows the pricing currency. */
export async function update(actor: Actor, input: SettingsInput): Promise<void> {
	await db().transaction(async (transaction) => {
		const shop = await findShop(actor.shopId, transaction, true);
		const before = storedOf(shop);
		const next: StoredSettings = {
			...before,
			pricing: settingsToJson(input.pricing),
			quoteValidityDays: input.quoteValidityDays,
			techniciansSeeCosts: input.techniciansSeeCosts,
			fees: Object.fromEntries(FEE_NAMES.map((k) => [k, text(input.fees[k])]))
		};
		const changed = changedKeys(before, next);
		const profileChanged = (['name', 'phone', 'email', 'address'] as const).filter((k) => shop[k] !== input.profile[k]);
		shop.set({ ...input.profile, currency: input.pricing.currency, settings: next });
		shop.changed('settings', true);
		await shop.save({ transaction });
		await audit.record(
			{
				shopId: actor.shopId,
				userId: actor.id,
				action: 'shop.settings_updated',
				entity: 'shop',
				entityId: actor.shopId,
				detail: { changed: [...profileChanged, ...changed] }
			},
			transaction
		);
	});
}

function changedKeys(before: StoredSettings, after: StoredSettings): string[] {
	const out: string[] = [];
	const beforePricing = (before.pricing ?? {}) as Record<string, unknown>;
	const afterPricing = (after.pricing ?? {}) as Record<string, unknown>;
	for (const key of Object.keys(afterPricing)) {
		if (JSON.stringify(beforePricing[key]) !== JSON.stringify(afterPricing[key])) out.push(`pricing.${key}`);
	}
	for (const key of ['quoteValidityDays', 'techniciansSeeCosts', 'fees']) {
		if (JSON.stringify(before[key]) !== JSON.stringify(after[key])) out.push(key);
	}
	return out;
}
