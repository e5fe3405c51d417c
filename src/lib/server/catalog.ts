import { parse } from 'csv-parse/sync';
import { stringify } from 'csv-stringify/sync';
import { Op, UniqueConstraintError, type ModelStatic, type Transaction, type WhereOptions } from 'sequelize';
import { z } from 'zod';
import * as audit from './audit';
import { db } from './db';
import { LabourOperation, Part, ReplacementUnit, UNIT_KINDS } from './db/models';
import type { FieldErrors } from './forms';

export const LISTS = ['parts', 'labour', 'replacements'] as const;
export type ListName = (typeof LISTS)[number];

export const MAX_IMPORT_BYTES = 2 * 1024 * 1024;
export const MAX_IMPORT_ROWS = 5000;
/** Rows shown per list on the page; a search narrows the rest. */
export const PAGE_ROWS = 300;

export interface Actor {
	id: string;
	shopId: string;
}

export class CatalogError extends Error {
	constructor(
		message: string,
		readonly errors: FieldErrors = {}
	) {
		super(message);
	}
}

export interface ImportProblem {
	/** The file's line, the header being line 1. */
	line: number;
	/** The CSV column, or '' for the whole row or file. */
	column: string;
	message: string;
}

export class ImportError extends Error {
	constructor(
		message: string,
		readonly problems: ImportProblem[] = []
	) {
		super(message);
	}
}

// ---------------------------------------------------------------------------------------------
// Fields. Every value is text in (form or CSV) and a normalised string out, ready for NUMERIC.

const PLAIN_NUMBER = /^-?(\d+)(?:\.(\d+))?$/;

interface NumberRule {
	what: string;
	decimals: number;
	min: number;
	minExclusive?: boolean;
	max: string;
	example: string;
}

/** A decimal written as plain digits; returns it fixed to `decimals` places, exact (no float). */
function decimalText(rule: NumberRule) {
	return z.string({ error: `Enter ${rule.what}.` }).transform((raw, ctx) => {
		const value = raw.trim();
		const fail = (message: string) => {
			ctx.addIssue({ code: 'custom', message });
			return z.NEVER;
		};
		if (value === '') return fail(`Enter ${rule.what}.`);
		const match = PLAIN_NUMBER.exec(value);
		if (!match) {
			return fail(`Enter ${rule.what} as a number like ${rule.example}: digits with an optional decimal point, no currency sign or thousands separator.`);
		}
		const negative = value.startsWith('-') && /[1-9]/.test(value);
		if (negative) return fail(`${capital(rule.what)} cannot be negative.`);
		const [, whole, fraction = ''] = match;
		if (fraction.length > rule.decimals) {
			return fail(
				rule.decimals === 0
					? `Enter ${rule.what} as a whole number.`
					: `Use at most ${rule.decimals} decimal place${rule.decimals === 1 ? '' : 's'} for ${rule.what}.`
			);
		}
		const normalised = stripZeros(whole) + (rule.decimals > 0 ? '.' + fraction.padEnd(rule.decimals, '0') : '');
		if (compareDecimal(normalised, rule.max) > 0) return fail(`${capital(rule.what)} can be at most ${rule.max}.`);
		const isZero = !/[1-9]/.test(normalised);
		if (isZero && rule.minExclusive) return fail(`${capital(rule.what)} must be more than 0.`);
		return normalised;
	});
}

function stripZeros(digits: string): string {
	return digits.replace(/^0+(?=\d)/, '');
}

/** Compares two non-negative plain decimal strings exactly. */
function compareDecimal(a: string, b: string): number {
	const [aw, af = ''] = a.split('.');
	const [bw, bf = ''] = b.split('.');
	const wa = stripZeros(aw);
	const wb = stripZeros(bw);
	if (wa.length !== wb.length) return wa.length < wb.length ? -1 : 1;
	if (wa !== wb) return wa < wb ? -1 : 1;
	const width = Math.max(af.length, bf.length);
	const fa = af.padEnd(width, '0');
	const fb = bf.padEnd(width, '0');
	return fa === fb ? 0 : fa < fb ? -1 : 1;
}

const capital = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

function wholeNumber(what: string, min: number, max: number) {
	return z.string({ error: `Enter ${what}.` }).transform((raw, ctx) => {
		const value = raw.trim();
		if (!/^-?\d{1,9}$/.test(value)) {
			ctx.addIssue({ code: 'custom', message: `Enter ${what} as a whole number, such as ${Math.max(min, 1)}.` });
			return z.NEVER;
		}
		const n = Number(value);
		if (n < min || n > max) {
			ctx.addIssue({ code: 'custom', message: `${capital(what)} must be from ${min.toLocaleString('en')} to ${max.toLocaleString('en')}.` });
			return z.NEVER;
		}
		return n;
	});
}

const requiredText = (what: string, max: number) =>
	z.string({ error: `Enter ${what}.` }).trim().min(1, `Enter ${what}.`).max(max, `Keep ${what} to ${max} characters or fewer.`);
const optionalText = (what: string, max: number) => z.string().trim().max(max, `Keep ${what} to ${max} characters or fewer.`);

const YES = ['yes', 'y', 'true', '1', 'on'];
const NO = ['no', 'n', 'false', '0', 'off', ''];
const yesNo = (what: string) =>
	z.string().transform((raw, ctx) => {
		const value = raw.trim().toLowerCase();
		if (YES.includes(value)) return true;
		if (NO.includes(value)) return false;
		ctx.addIssue({ code: 'custom', message: `Write "yes" or "no" for ${what}.` });
		return z.NEVER;
	});

const unitKind = z.string().transform((raw, ctx) => {
	const value = raw.trim().toLowerCase().replace(/[\s-]+/g, '_');
	if ((UNIT_KINDS as readonly string[]).includes(value)) return value as (typeof UNIT_KINDS)[number];
	ctx.addIssue({ code: 'custom', message: `Choose the kind: one of ${UNIT_KINDS.join(', ')}.` });
	return z.NEVER;
});

const MONEY_MAX = '9999999999.99';

export const partSchema = z.object({
	number: requiredText('the part number', 60),
	description: requiredText('a description', 200),
	cost: decimalText({ what: 'the cost', decimals: 2, min: 0, max: MONEY_MAX, example: '12.50' }),
	supplier: optionalText('the supplier', 120),
	stock: wholeNumber('the stock', 0, 1_000_000),
	specialOrder: yesNo('special order')
});

export const labourSchema = z.object({
	name: requiredText('the operation name', 120),
	hours: decimalText({ what: 'the hours', decimals: 2, min: 0, minExclusive: true, max: '999.99', example: '2.50' })
});

export const replacementSchema = z.object({
	kind: unitKind,
	name: requiredText('the unit name', 120),
	ratedWatts: wholeNumber('the rated watts', 0, 2_000_000),
	priceNew: decimalText({ what: 'the price new', decimals: 2, min: 0, max: MONEY_MAX, example: '899.00' }),
	lifeYears: decimalText({ what: 'the expected life in years', decimals: 1, min: 0, minExclusive: true, max: '100.0', example: '10' }),
	lifeHours: decimalText({ what: 'the expected life in engine hours', decimals: 0, min: 0, minExclusive: true, max: '1000000', example: '1500' })
});

export type PartInput = z.output<typeof partSchema>;
export type LabourInput = z.output<typeof labourSchema>;
export type ReplacementInput = z.output<typeof replacementSchema>;

// ---------------------------------------------------------------------------------------------
// The three lists described once: model, key, CSV columns, search fields, order.

interface Column {
	/** CSV header. */
	header: string;
	/** Model attribute and form field name. */
	field: string;
	/** Value a new row takes when the file has no such column; absent means the column is needed for new rows. */
	fallback?: string;
	/** Cost columns are left out for those who may not see costs. */
	cost?: boolean;
	export(value: unknown): string;
}

interface ListSpec {
	name: ListName;
	model: ModelStatic<any>;
	schema: z.ZodObject<any>;
	key: 'number' | 'name';
	/** "part", "labour operation", "replacement unit". */
	noun: string;
	columns: Column[];
	search: string[];
	order: [string, 'ASC' | 'DESC'][];
}

const asText = (value: unknown) => (value === null || value === undefined ? '' : String(value));
const asYesNo = (value: unknown) => (value ? 'yes' : 'no');

const SPECS: Record<ListName, ListSpec> = {
	parts: {
		name: 'parts',
		model: Part,
		schema: partSchema,
		key: 'number',
		noun: 'part',
		columns: [
			{ header: 'number', field: 'number', export: asText },
			{ header: 'description', field: 'description', export: asText },
			{ header: 'cost', field: 'cost', cost: true, export: asText },
			{ header: 'supplier', field: 'supplier', fallback: '', export: asText },
			{ header: 'stock', field: 'stock', fallback: '0', export: asText },
			{ header: 'special_order', field: 'specialOrder', fallback: 'no', export: asYesNo }
		],
		search: ['number', 'description', 'supplier'],
		order: [['number', 'ASC']]
	},
	labour: {
		name: 'labour',
		model: LabourOperation,
		schema: labourSchema,
		key: 'name',
		noun: 'labour operation',
		columns: [
			{ header: 'name', field: 'name', export: asText },
			{ header: 'hours', field: 'hours', export: asText }
		],
		search: ['name'],
		order: [['name', 'ASC']]
	},
	replacements: {
		name: 'replacements',
		model: ReplacementUnit,
		schema: replacementSchema,
		key: 'name',
		noun: 'replacement unit',
		columns: [
			{ header: 'kind', field: 'kind', export: asText },
			{ header: 'name', field: 'name', export: asText },
			{ header: 'rated_watts', field: 'ratedWatts', export: asText },
			{ header: 'price_new', field: 'priceNew', export: asText },
			{ header: 'life_years', field: 'lifeYears', export: asText },
			{ header: 'life_hours', field: 'lifeHours', export: asText }
		],
		search: ['name', 'kind'],
		order: [['name', 'ASC']]
	}
};

export function isList(value: string): value is ListName {
	return (LISTS as readonly string[]).includes(value);
}

export function nounOf(list: ListName): string {
	return SPECS[list].noun;
}

const editableFields = (spec: ListSpec) => spec.columns.map((c) => c.field);

// ---------------------------------------------------------------------------------------------
// Reading.

function escapeLike(text: string): string {
	return text.replace(/[\\%_]/g, (c) => '\\' + c);
}

/** A labour operation as the pages show it. */
export function labourView(row: Record<string, unknown>) {
	return { id: String(row.id), name: String(row.name), hours: String(row.hours) };
}

/** A replacement unit as the pages show it. */
export function replacementView(row: Record<string, unknown>) {
	return {
		id: String(row.id),
		kind: String(row.kind),
		name: String(row.name),
		ratedWatts: Number(row.ratedWatts),
		priceNew: String(row.priceNew),
		lifeYears: String(row.lifeYears),
		lifeHours: String(row.lifeHours)
	};
}

/** Rows of one list, searched by text, at most PAGE_ROWS of them, and how many match in all. */
export async function list(shopId: string, name: ListName, query = '') {
	const spec = SPECS[name];
	const q = query.trim().slice(0, 100);
	const where: WhereOptions = q
		? { shopId, [Op.or]: spec.search.map((field) => ({ [field]: { [Op.iLike]: `%${escapeLike(q)}%` } })) }
		: { shopId };
	const [rows, total] = await Promise.all([
		spec.model.findAll({ where, order: spec.order, limit: PAGE_ROWS }),
		spec.model.count({ where })
	]);
	return { rows: rows.map((r) => r.get({ plain: true }) as Record<string, unknown>), total };
}

export async function find(shopId: string, name: ListName, id: string): Promise<Record<string, unknown> | null> {
	if (!z.uuid().safeParse(id).success) return null;
	const row = await SPECS[name].model.findOne({ where: { id, shopId } });
	return row ? (row.get({ plain: true }) as Record<string, unknown>) : null;
}

// ---------------------------------------------------------------------------------------------
// Writing one row from a form.

function firstErrors(error: z.ZodError): FieldErrors {
	const errors: FieldErrors = {};
	for (const issue of error.issues) errors[String(issue.path[0] ?? 'form')] ??= issue.message;
	return errors;
}

function parseRow(name: ListName, raw: Record<string, string>) {
	const parsed = SPECS[name].schema.safeParse(raw);
	if (!parsed.success) throw new CatalogError('Nothing was saved. Please correct the highlighted fields.', firstErrors(parsed.error));
	return parsed.data as Record<string, unknown>;
}

function duplicateMessage(spec: ListSpec, key: unknown): CatalogError {
	const what = spec.key === 'number' ? 'part number' : 'name';
	return new CatalogError(`Your catalog already has a ${spec.noun} with the ${what} "${String(key)}".`, {
		[spec.key]: `Another ${spec.noun} already uses this ${what}; choose another or edit that one.`
	});
}

/** Adds a row from form fields (raw text). */
export async function create(actor: Actor, name: ListName, raw: Record<string, string>): Promise<string> {
	const spec = SPECS[name];
	const values = parseRow(name, raw);
	try {
		return await db().transaction(async (transaction) => {
			const row = await spec.model.create({ ...values, shopId: actor.shopId }, { transaction });
			await audit.record(
				{ shopId: actor.shopId, userId: actor.id, action: `catalog.${name}.created`, entity: spec.name, entityId: row.get('id') as string, detail: { key: values[spec.key] } },
				transaction
			);
			return row.get('id') as string;
		});
	} catch (e) {
		if (e instanceof UniqueConstraintError) throw duplicateMessage(spec, values[spec.key]);
		throw e;
	}
}

/** Changes a row of the actor's shop; false when there is no such row in the shop. */
export async function update(actor: Actor, name: ListName, id: string, raw: Record<string, string>): Promise<boolean> {
	const spec = SPECS[name];
	const values = parseRow(name, raw);
	if (!z.uuid().safeParse(id).success) return false;
	try {
		return await db().transaction(async (transaction) => {
			const row = await spec.model.findOne({ where: { id, shopId: actor.shopId }, transaction, lock: transaction.LOCK.UPDATE });
			if (!row) return false;
			const changed = editableFields(spec).filter((f) => String(row.get(f)) !== String(values[f]));
			if (changed.length === 0) return true;
			row.set(values);
			await row.save({ transaction });
			await audit.record(
				{ shopId: actor.shopId, userId: actor.id, action: `catalog.${name}.updated`, entity: spec.name, entityId: id, detail: { key: values[spec.key], changed } },
				transaction
			);
			return true;
		});
	} catch (e) {
		if (e instanceof UniqueConstraintError) throw duplicateMessage(spec, values[spec.key]);
		throw e;
	}
}

/** Deletes a row of the actor's shop; false when there is no such row in the shop. */
export async function remove(actor: Actor, name: ListName, id: string): Promise<boolean> {
	const spec = SPECS[name];
	if (!z.uuid().safeParse(id).success) return false;
	return db().transaction(async (transaction) => {
		const row = await spec.model.findOne({ where: { id, shopId: actor.shopId }, transaction });
		if (!row) return false;
		const key = row.get(spec.key);
		await row.destroy({ transaction });
		await audit.record({ shopId: actor.shopId, userId: actor.id, action: `catalog.${name}.deleted`, entity: spec.name, entityId: id, detail: { key } }, transaction);
		return true;
	});
}

// ---------------------------------------------------------------------------------------------
// CSV.

/** Cells a spreadsheet would run as a formula get a leading apostrophe on export; import takes it off. */
const FORMULA_START = /^'*[=+\-@\t\r]/;
const guardCell = (text: string) => (FORMULA_START.test(text) ? `'${text}` : text);
const unguardCell = (text: string) => (text.startsWith("'") && FORMULA_START.test(text.slice(1)) ? text.slice(1) : text);

/** Column names match loosely: "Special order", "special_order" and "specialOrder" are the same. */
const headerKey = (text: string) => text.toLowerCase().replace(/[^a-z0-9]/g, '');

export function csvColumns(name: ListName, includeCost: boolean): string[] {
	return SPECS[name].columns.filter((c) => includeCost || !c.cost).map((c) => c.header);
}

/** The whole list of the shop as CSV with a header row (UTF-8 with a byte-order mark for spreadsheets). */
export async function exportCsv(shopId: string, name: ListName, includeCost: boolean): Promise<string> {
	const spec = SPECS[name];
	const columns = spec.columns.filter((c) => includeCost || !c.cost);
	const rows = await spec.model.findAll({ where: { shopId }, order: spec.order, raw: true });
	const records = rows.map((row: Record<string, unknown>) => columns.map((c) => guardCell(c.export(row[c.field]))));
	return '\ufeff' + stringify([columns.map((c) => c.header), ...records], { record_delimiter: '\r\n' });
}

interface ParsedRecord {
	line: number;
	cells: string[];
}

function readCsv(bytes: Uint8Array): ParsedRecord[] {
	if (bytes.length === 0) throw new ImportError('The file is empty. Choose a CSV file with a header row and one row per entry.');
	if (bytes.length > MAX_IMPORT_BYTES) {
		throw new ImportError(`The file is larger than ${MAX_IMPORT_BYTES / 1024 / 1024} MB. Split it into smaller files and import each.`);
	}
	if (bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04) {
		throw new ImportError('This looks like a spreadsheet workbook, not CSV. In your spreadsheet, save or export the sheet as "CSV UTF-8" and import that file.');
	}
	let text: string;
	try {
		text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
	} catch {
		throw new ImportError('The file is not UTF-8 text. Save it as "CSV UTF-8" and import it again.');
	}
	if (text.includes('\u0000')) throw new ImportError('The file is not a text file. Choose a CSV file.');
	let records: { record: string[]; info: { lines: number } }[];
	try {
		records = parse(text, { bom: true, info: true, skip_empty_lines: true, to: MAX_IMPORT_ROWS + 2 }) as unknown as typeof records;
	} catch (e) {
		const line = typeof (e as { lines?: unknown }).lines === 'number' ? (e as { lines: number }).lines : 0;
		const reason = csvReason(e);
		throw new ImportError(`The file could not be read as CSV${line ? ` at line ${line}` : ''}: ${reason}`, [{ line, column: '', message: reason }]);
	}
	// info.lines is the line a record ends on; a quoted cell may span lines, so count back to where it starts.
	return records.map(({ record, info }) => ({
		line: info.lines - record.reduce((n, cell) => n + (cell.match(/\n/g)?.length ?? 0), 0),
		cells: record
	}));
}

function csvReason(e: unknown): string {
	const code = (e as { code?: string }).code;
	if (code === 'CSV_RECORD_INCONSISTENT_FIELDS_LENGTH' || code === 'CSV_RECORD_DONT_MATCH_COLUMNS_LENGTH') {
		return 'this row has a different number of cells from the header row. Check for a missing or extra comma.';
	}
	if (code === 'CSV_QUOTE_NOT_CLOSED') return 'a quoted cell is never closed. Check for a stray double quote.';
	if (code === 'CSV_INVALID_CLOSING_QUOTE' || code === 'CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE') {
		return 'a double quote appears inside a cell that is not quoted. Put the cell in double quotes and double the quote inside it ("").';
	}
	return 'the file is not valid CSV. Save it from your spreadsheet as "CSV UTF-8".';
}

export interface ImportResult {
	added: number;
	updated: number;
	unchanged: number;
}

const PROBLEMS_SHOWN = 20;

/**
 * Imports a CSV file into one list: every row is checked first, and one bad row means nothing is
 * written. A row whose key (part number, or name) exists updates that entry; others are added.
 */
export async function importCsv(actor: Actor, name: ListName, bytes: Uint8Array): Promise<ImportResult> {
	const spec = SPECS[name];
	const records = readCsv(bytes);
	if (records.length === 0) throw new ImportError('The file is empty. Choose a CSV file with a header row and one row per entry.');
	const [header, ...rows] = records;
	if (rows.length > MAX_IMPORT_ROWS) {
		throw new ImportError(`The file has more than ${MAX_IMPORT_ROWS.toLocaleString('en')} rows. Split it into smaller files and import each.`);
	}

	const columns = mapHeader(spec, header);
	const present = new Set(columns.map((c) => c.field));
	const problems: ImportProblem[] = [];
	const seen = new Map<string, number>();
	const parsedRows: { line: number; values: Record<string, unknown> }[] = [];

	for (const { line, cells } of rows) {
		const raw: Record<string, string> = {};
		columns.forEach((column, i) => {
			const cell = unguardCell(cells[i] ?? '');
			// An empty optional cell means its default ("stock" empty is 0).
			raw[column.field] = cell.trim() === '' && column.fallback !== undefined ? column.fallback : cell;
		});
		// Absent columns validate against their fallback; whether they are kept or filled in is decided below.
		for (const column of spec.columns) if (!(column.field in raw)) raw[column.field] = column.fallback ?? placeholderFor(column.field);
		const parsed = spec.schema.safeParse(raw);
		if (!parsed.success) {
			const reported = new Set<string>();
			for (const issue of parsed.error.issues) {
				const field = String(issue.path[0] ?? '');
				if (reported.has(field)) continue;
				reported.add(field);
				problems.push({ line, column: headerOf(spec, field), message: issue.message });
			}
			continue;
		}
		const values = parsed.data as Record<string, unknown>;
		const key = String(values[spec.key]);
		const earlier = seen.get(key);
		if (earlier !== undefined) {
			problems.push({ line, column: headerOf(spec, spec.key), message: `"${key}" already appears on line ${earlier}; each ${spec.noun} may appear once.` });
			continue;
		}
		seen.set(key, line);
		parsedRows.push({ line, values: Object.fromEntries(Object.entries(values).filter(([field]) => present.has(field))) });
	}
	if (problems.length) throw importProblems(problems);

	try {
		return await db().transaction(async (transaction) => {
			const result = await writeRows(actor, spec, parsedRows, transaction);
			await audit.record(
				{ shopId: actor.shopId, userId: actor.id, action: `catalog.${name}.imported`, entity: spec.name, entityId: null, detail: { ...result } },
				transaction
			);
			return result;
		});
	} catch (e) {
		if (e instanceof UniqueConstraintError) {
			throw new ImportError('The catalog changed while the file was being imported. Nothing was imported; import the file again.');
		}
		throw e;
	}
}

/** A value that passes the schema, used only to check the other cells of a row when a column is absent. */
function placeholderFor(field: string): string {
	if (field === 'kind') return 'other';
	if (field === 'ratedWatts') return '0';
	return '1';
}

function headerOf(spec: ListSpec, field: string): string {
	return spec.columns.find((c) => c.field === field)?.header ?? field;
}

function importProblems(problems: ImportProblem[]): ImportError {
	problems.sort((a, b) => a.line - b.line);
	const lines = new Set(problems.map((p) => p.line)).size;
	const rows = lines === 1 ? `line ${problems[0].line} has a problem` : `${lines} lines have problems`;
	return new ImportError(`Nothing was imported: ${rows}. Fix the file and import it again.`, problems.slice(0, PROBLEMS_SHOWN));
}

function mapHeader(spec: ListSpec, header: ParsedRecord): Column[] {
	const expected = spec.columns.map((c) => c.header).join(', ');
	const problems: ImportProblem[] = [];
	const used = new Set<string>();
	const columns: Column[] = [];
	header.cells.forEach((cell) => {
		const column = spec.columns.find((c) => headerKey(c.header) === headerKey(cell));
		if (!column) {
			problems.push({ line: header.line, column: cell, message: `Unknown column "${cell.slice(0, 40)}". The columns are: ${expected}.` });
		} else if (used.has(column.field)) {
			problems.push({ line: header.line, column: column.header, message: `The column "${column.header}" appears twice.` });
		} else {
			used.add(column.field);
			columns.push(column);
		}
	});
	if (!used.has(spec.key)) {
		problems.push({ line: header.line, column: headerOf(spec, spec.key), message: `The header row needs a "${headerOf(spec, spec.key)}" column. The columns are: ${expected}.` });
	}
	if (problems.length) throw importProblems(problems);
	return columns;
}

async function writeRows(actor: Actor, spec: ListSpec, rows: { line: number; values: Record<string, unknown> }[], transaction: Transaction): Promise<ImportResult> {
	const fields = editableFields(spec);
	const keys = rows.map((r) => String(r.values[spec.key]));
	const existing = new Map<string, Record<string, unknown>>();
	for (let i = 0; i < keys.length; i += 1000) {
		const found = await spec.model.findAll({
			where: { shopId: actor.shopId, [spec.key]: keys.slice(i, i + 1000) },
			transaction,
			lock: transaction.LOCK.UPDATE,
			raw: true
		});
		for (const row of found as Record<string, unknown>[]) existing.set(String(row[spec.key]), row);
	}

	const inserts: Record<string, unknown>[] = [];
	const updates: Record<string, unknown>[] = [];
	const problems: ImportProblem[] = [];
	let unchanged = 0;
	for (const { line, values } of rows) {
		const current = existing.get(String(values[spec.key]));
		if (current) {
			const merged = { ...current, ...values };
			if (fields.every((f) => String(current[f]) === String(merged[f]))) unchanged++;
			else updates.push({ ...merged, updatedAt: new Date() });
			continue;
		}
		const missing = spec.columns.filter((c) => !(c.field in values) && c.fallback === undefined);
		for (const column of missing) {
			problems.push({ line, column: column.header, message: `A new ${spec.noun} needs a value here; add the "${column.header}" column to the file.` });
		}
		if (missing.length) continue;
		const filled: Record<string, unknown> = { ...values, shopId: actor.shopId };
		for (const column of spec.columns) {
			if (!(column.field in filled)) filled[column.field] = spec.schema.shape[column.field].parse(column.fallback);
		}
		inserts.push(filled);
	}
	if (problems.length) throw importProblems(problems);

	for (let i = 0; i < inserts.length; i += 1000) {
		await spec.model.bulkCreate(inserts.slice(i, i + 1000), { transaction, validate: false });
	}
	for (let i = 0; i < updates.length; i += 1000) {
		await spec.model.bulkCreate(updates.slice(i, i + 1000), { transaction, updateOnDuplicate: [...fields, 'updatedAt'] });
	}
	return { added: inserts.length, updated: updates.length, unchanged };
}

/** The form fields of one list as text; an unticked box is "no" and an empty stock is 0. */
export function fieldsFromForm(name: ListName, form: FormData): Record<string, string> {
	const out: Record<string, string> = {};
	for (const column of SPECS[name].columns) {
		const value = form.get(column.field);
		out[column.field] = typeof value === 'string' ? value : '';
	}
	if (name === 'parts') {
		out.specialOrder = form.has('specialOrder') && out.specialOrder !== 'no' ? 'yes' : 'no';
		if (out.stock.trim() === '') out.stock = '0';
	}
	return out;
}

/** A stored row as form text, for the edit form. */
export function formValuesOf(name: ListName, row: Record<string, unknown>): Record<string, string> {
	return Object.fromEntries(SPECS[name].columns.map((c) => [c.field, c.export(row[c.field])]));
}
