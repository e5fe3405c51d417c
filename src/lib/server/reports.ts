import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import { UNIT_KINDS, UNIT_KIND_LABELS, type UnitKind } from '../domain';
import { Dec, currencyDigits } from '../pricing/money';
import { db } from './db';
import { Shop } from './db/models';

/*
 * The manager's reports. Every figure is summed in PostgreSQL (see docs/reports.md for the basis of
 * each): per-job rows in the views report_job_rows and report_technician_rows, kept by triggers from
 * the quotes, answers and actuals; monthly sums of them for whole months; the rows themselves for
 * the CSVs and for the days at either end of a period.
 */

export const REPORT_NAMES = ['revenue', 'margin', 'approval', 'outcomes', 'outcomes-by-kind', 'days-to-approval', 'technicians', 'margin-lost'] as const;
export type ReportName = (typeof REPORT_NAMES)[number];

export type ColumnFormat = 'month' | 'text' | 'count' | 'money' | 'hours' | 'ratio' | 'percent' | 'days' | 'date';
export interface Column {
	key: string;
	label: string;
	format: ColumnFormat;
}

export interface Filters {
	from: string;
	to: string;
	technician: string | null;
	kind: UnitKind | null;
}

export interface ReportResult {
	name: ReportName;
	title: string;
	basis: string;
	currency: string;
	filters: Filters;
	columns: Column[];
	rows: Record<string, string | number | null>[];
	totals: Record<string, string | number | null>;
}

const MAX_RANGE_DAYS = 3660;
const TOP_MARGIN_LOST = 15;

const isoDate = (what: string) =>
	z.preprocess(
		(v) => (v === '' ? undefined : v),
		z.iso
			.date({ error: `Enter the ${what} date as YYYY-MM-DD.` })
			// Past year 9999 a date no longer fits YYYY-MM-DD (nor PostgreSQL's date arithmetic here).
			.refine((v) => v >= '1900-01-01' && v <= '2999-12-31', `Enter the ${what} date between 1900 and 2999.`)
			.optional()
	);

const blankToNull = (v: unknown) => (v === '' || v === undefined ? null : v);

/** Query-string filters; blanks mean "everyone", "every kind" and the last twelve months. */
export const filtersSchema = z
	.object({
		from: isoDate('start'),
		to: isoDate('end'),
		technician: z.preprocess(blankToNull, z.uuid({ error: 'Pick a technician from the list.' }).nullable()),
		kind: z.preprocess(blankToNull, z.enum(UNIT_KINDS, { error: 'Pick a kind of unit from the list.' }).nullable())
	})
	.transform((f, ctx) => {
		const to = f.to ?? new Date().toISOString().slice(0, 10);
		const from = f.from ?? defaultFrom(to);
		const days = (Date.parse(to) - Date.parse(from)) / 86_400_000;
		if (days < 0) ctx.addIssue({ code: 'custom', path: ['from'], message: 'The start date must be on or before the end date.' });
		else if (days > MAX_RANGE_DAYS) ctx.addIssue({ code: 'custom', path: ['from'], message: 'Choose a range of at most ten years.' });
		return { from, to, technician: f.technician, kind: f.kind } as Filters;
	});

/** The first day of the month eleven months before `to`: twelve whole months with the current one. */
export function defaultFrom(to: string): string {
	const [y, m] = to.split('-').map(Number);
	const start = new Date(Date.UTC(y, m - 1 - 11, 1));
	return start.toISOString().slice(0, 10);
}

export type ParsedFilters = { ok: true; filters: Filters } | { ok: false; message: string; issues: { path: string; message: string }[] };

export function parseFilters(params: URLSearchParams): ParsedFilters {
	const raw = Object.fromEntries(['from', 'to', 'technician', 'kind'].map((k) => [k, params.get(k) ?? undefined]));
	const parsed = filtersSchema.safeParse(raw);
	if (parsed.success) return { ok: true, filters: parsed.data };
	const issues = parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
	return { ok: false, message: issues[0]?.message ?? 'The report filters are not valid.', issues };
}

export function isReportName(name: string): name is ReportName {
	return (REPORT_NAMES as readonly string[]).includes(name);
}

// ---------------------------------------------------------------------------------------------
// SQL pieces. Periods are whole UTC days: from 00:00 on `from` up to, not including, the day after
// `to`. Whole months inside the period come from the monthly sums (report_months,
// report_technician_months), the days before the first whole month and after the last from the
// daily sums the monthly ones are built from; the CSVs read the per-job rows those are built from.

interface Scope {
	replacements: Record<string, unknown>;
	/** Technician and kind conditions for a table aliased `alias`. */
	filters(alias: string, technicianColumn?: string): string;
}

const DAY_MS = 86_400_000;
const iso = (ms: number) => new Date(ms).toISOString();
const firstOfMonth = (ms: number) => {
	const d = new Date(ms);
	return Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1);
};
const nextMonth = (ms: number) => {
	const d = new Date(ms);
	return Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1);
};

function scope(shopId: string, filters: Filters): Scope {
	const start = Date.parse(`${filters.from}T00:00:00Z`);
	const end = Date.parse(`${filters.to}T00:00:00Z`) + DAY_MS;
	let fullFrom = firstOfMonth(start) === start ? start : nextMonth(start);
	let fullTo = firstOfMonth(end);
	// No whole month inside: every day is read from the per-job rows.
	if (fullFrom >= fullTo) fullFrom = fullTo = end;
	const replacements: Record<string, unknown> = {
		shopId,
		from: filters.from,
		to: filters.to,
		start: iso(start),
		end: iso(end),
		fullFrom: iso(fullFrom).slice(0, 10),
		fullTo: iso(fullTo).slice(0, 10)
	};
	if (filters.technician) replacements.technician = filters.technician;
	if (filters.kind) replacements.kind = filters.kind;
	return {
		replacements,
		filters: (alias, technicianColumn = 'technician_id') =>
			(filters.technician ? ` AND ${alias}.${technicianColumn} = :technician` : '') + (filters.kind ? ` AND ${alias}.unit_kind = :kind` : '')
	};
}

const inPeriod = (column: string) => `${column} >= :start::timestamptz AND ${column} < :end::timestamptz`;
const dayOf = (column: string) => `to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM-DD')`;
const monthOf = (column: string) => `to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM')`;
/** Every month of the period, so empty months show as zero rather than vanish. */
const MONTHS = `SELECT m::date AS month FROM generate_series(date_trunc('month', :from::date), :to::date, interval '1 month') m`;
const percent = (part: string, whole: string) => `round(100 * (${part})::numeric / nullif(${whole}, 0), 1)`;

const CONTRIBUTION_COLUMNS = [
	'sent', 'sent_approved', 'sent_declined', 'approved', 'repaired', 'replaced', 'declined',
	'revenue', 'parts_sell', 'labour_sell', 'other_sell', 'parts_profit', 'labour_profit', 'other_profit', 'gross_profit',
	'days_sum', 'within_1', 'within_3', 'within_7',
	'actuals_jobs', 'losing_jobs', 'actuals_quoted_profit', 'actuals_gross_profit', 'margin_lost'
].join(', ');

const edgeDays = (column: string) =>
	`((${column} >= :from::date AND ${column} < :fullFrom::date) OR (${column} >= :fullTo::date AND ${column} <= :to::date))`;

/** Per month, technician and kind: the sums of the whole months and of the days at either end. */
const contributions = (s: Scope) => `
	SELECT r.month, r.technician_id, r.unit_kind, ${CONTRIBUTION_COLUMNS}
	  FROM report_months r
	 WHERE r.shop_id = :shopId AND r.month >= :fullFrom::date AND r.month < :fullTo::date${s.filters('r')}
	UNION ALL
	SELECT date_trunc('month', d.day)::date, d.technician_id, d.unit_kind, ${CONTRIBUTION_COLUMNS}
	  FROM report_days d
	 WHERE d.shop_id = :shopId AND ${edgeDays('d.day')}${s.filters('d')}`;

const TECHNICIAN_COLUMNS = 'jobs, hours_billed, hours_spent, revenue, gross_profit';
const technicianContributions = (s: Scope) => `
	SELECT r.month, r.technician_id, r.unit_kind, ${TECHNICIAN_COLUMNS}
	  FROM report_technician_months r
	 WHERE r.shop_id = :shopId AND r.month >= :fullFrom::date AND r.month < :fullTo::date${s.filters('r')}
	UNION ALL
	SELECT date_trunc('month', d.day)::date, d.technician_id, d.unit_kind, ${TECHNICIAN_COLUMNS}
	  FROM report_technician_days d
	 WHERE d.shop_id = :shopId AND ${edgeDays('d.day')}${s.filters('d')}`;

/**
 * Monthly rows and, last, the whole period's row (month null) in one pass: `measures` are
 * aggregate expressions over the contributions `c`.
 */
const byMonth = (s: Scope, measures: string) => `
	SELECT to_char(m.month, 'YYYY-MM') AS month, ${measures}
	  FROM (${MONTHS}) m LEFT JOIN (${contributions(s)}) c ON c.month = m.month
	 GROUP BY GROUPING SETS ((m.month), ()) ORDER BY m.month NULLS LAST`;
const overall = (s: Scope, measures: string) => `SELECT ${measures} FROM (${contributions(s)}) c`;

/** The labelled rows behind a report, for its CSV. */
const jobRows = (s: Scope, dateColumn: 'decided_at' | 'first_sent_at', extra = '') => `
	SELECT d.* FROM report_job_rows d
	 WHERE d.shop_id = :shopId AND ${inPeriod(`d.${dateColumn}`)}${s.filters('d')}${extra}`;
const JOB_LABELS = `LEFT JOIN jobs j ON j.id = d.job_id AND j.shop_id = :shopId`;
const TECH_JOIN = `LEFT JOIN users t ON t.id = d.technician_id AND t.shop_id = :shopId`;
const JOB_CSV_HEAD = `j.number AS job, ${dayOf('d.decided_at')} AS approved_on, ${monthOf('d.decided_at')} AS month,
	j.customer_name AS customer, j.unit_label AS unit, d.unit_kind AS kind, coalesce(t.name, 'Unassigned') AS technician`;

interface Definition {
	title: string;
	basis: string;
	columns: Column[];
	csvColumns: Column[];
	aggregate(s: Scope): string;
	/** The whole period's row; without it, the aggregate's last row (see byMonth) is the total. */
	totals?(s: Scope): string;
	csv(s: Scope): string;
}

const money = (key: string, label: string): Column => ({ key, label, format: 'money' });
const count = (key: string, label: string): Column => ({ key, label, format: 'count' });
const JOB_CSV_HEAD_COLUMNS: Column[] = [
	count('job', 'Job'),
	{ key: 'approved_on', label: 'Approved on', format: 'date' },
	{ key: 'month', label: 'Month', format: 'month' },
	{ key: 'customer', label: 'Customer', format: 'text' },
	{ key: 'unit', label: 'Unit', format: 'text' },
	{ key: 'kind', label: 'Kind', format: 'text' },
	{ key: 'technician', label: 'Technician', format: 'text' }
];

const REVENUE = `coalesce(sum(c.approved), 0)::int AS jobs, coalesce(sum(c.parts_sell), 0) AS parts, coalesce(sum(c.labour_sell), 0) AS labour,
	coalesce(sum(c.other_sell), 0) AS other, coalesce(sum(c.revenue), 0) AS revenue`;
const MARGIN = `coalesce(sum(c.parts_profit), 0) AS parts, coalesce(sum(c.labour_profit), 0) AS labour, coalesce(sum(c.other_profit), 0) AS other,
	coalesce(sum(c.gross_profit), 0) AS "grossProfit", coalesce(sum(c.revenue), 0) AS revenue, ${percent('sum(c.gross_profit)', 'sum(c.revenue)')} AS "marginPercent"`;
const APPROVAL = `coalesce(sum(c.sent), 0)::int AS sent, coalesce(sum(c.sent_approved), 0)::int AS approved, coalesce(sum(c.sent_declined), 0)::int AS declined,
	coalesce(sum(c.sent) - sum(c.sent_approved) - sum(c.sent_declined), 0)::int AS unanswered, ${percent('sum(c.sent_approved)', 'sum(c.sent)')} AS "ratePercent"`;
const OUTCOMES = `coalesce(sum(c.repaired), 0)::int AS repaired, coalesce(sum(c.replaced), 0)::int AS replaced, coalesce(sum(c.declined), 0)::int AS declined`;
const DAYS = `coalesce(sum(c.approved), 0)::int AS approvals, round(sum(c.days_sum) / nullif(sum(c.approved), 0), 1) AS "averageDays",
	coalesce(sum(c.within_1), 0)::int AS "withinDay", coalesce(sum(c.within_3) - sum(c.within_1), 0)::int AS "oneToThree",
	coalesce(sum(c.within_7) - sum(c.within_3), 0)::int AS "threeToSeven", coalesce(sum(c.approved) - sum(c.within_7), 0)::int AS "overWeek"`;
const LOST_TOTALS = `coalesce(sum(c.actuals_jobs), 0)::int AS jobs, coalesce(sum(c.losing_jobs), 0)::int AS "jobsLosing",
	coalesce(sum(c.actuals_quoted_profit), 0) AS "quotedProfit", coalesce(sum(c.actuals_gross_profit), 0) AS "grossProfit",
	coalesce(sum(c.margin_lost), 0) AS "marginLost"`;
function outcomeCsvColumns(): Column[] {
	return [
		count('job', 'Job'),
		{ key: 'decided_on', label: 'Answered on', format: 'date' },
		{ key: 'month', label: 'Month', format: 'month' },
		{ key: 'customer', label: 'Customer', format: 'text' },
		{ key: 'kind', label: 'Kind', format: 'text' },
		{ key: 'technician', label: 'Technician', format: 'text' },
		{ key: 'outcome', label: 'Outcome', format: 'text' },
		{ key: 'option', label: 'Option approved', format: 'text' }
	];
}

function outcomeCsv(s: Scope): string {
	return `
		SELECT j.number AS job, ${dayOf('d.decided_at')} AS decided_on, ${monthOf('d.decided_at')} AS month, j.customer_name AS customer,
		       d.unit_kind AS kind, coalesce(t.name, 'Unassigned') AS technician, d.outcome, d.option_label AS option
		  FROM (${jobRows(s, 'decided_at')}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number`;
}

const DEFINITIONS: Record<ReportName, Definition> = {
	revenue: {
		title: 'Revenue by month',
		basis:
			'Approved jobs by the month the customer approved: the approved option as quoted, before tax, split into parts, labour and everything else (fees, shop supplies, sublet work, new units, discounts and diagnostic credits).',
		columns: [
			{ key: 'month', label: 'Month', format: 'month' },
			count('jobs', 'Jobs approved'),
			money('parts', 'Parts'),
			money('labour', 'Labour'),
			money('other', 'Other'),
			money('revenue', 'Revenue')
		],
		csvColumns: [...JOB_CSV_HEAD_COLUMNS, { key: 'option', label: 'Option approved', format: 'text' }, money('parts', 'Parts'), money('labour', 'Labour'), money('other', 'Other'), money('revenue', 'Revenue')],
		aggregate: (s) => byMonth(s, REVENUE),
		csv: (s) => `
			SELECT ${JOB_CSV_HEAD}, d.option_label AS option, d.parts_sell AS parts, d.labour_sell AS labour, d.other_sell AS other, d.revenue
			  FROM (${jobRows(s, 'decided_at', " AND d.decision = 'approved'")}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number`
	},
	margin: {
		title: 'Gross margin by month',
		basis:
			'Approved jobs by the month of approval. Gross profit is the quoted price less cost, with actuals where recorded: labour at the hours actually spent times the labour cost per hour the estimate was priced with, and parts used beyond the estimate at cost.',
		columns: [
			{ key: 'month', label: 'Month', format: 'month' },
			money('parts', 'Parts profit'),
			money('labour', 'Labour profit'),
			money('other', 'Other profit'),
			money('grossProfit', 'Gross profit'),
			money('revenue', 'Revenue'),
			{ key: 'marginPercent', label: 'Margin %', format: 'percent' }
		],
		csvColumns: [
			...JOB_CSV_HEAD_COLUMNS,
			money('revenue', 'Revenue'),
			money('parts_sell', 'Parts sold'),
			money('parts_cost', 'Parts cost (quoted)'),
			money('extra_parts_cost', 'Parts beyond the estimate'),
			money('parts', 'Parts profit'),
			money('labour_sell', 'Labour sold'),
			{ key: 'billed_hours', label: 'Hours billed', format: 'hours' },
			{ key: 'actual_hours', label: 'Hours spent', format: 'hours' },
			money('labour_cost', 'Labour cost'),
			money('labour', 'Labour profit'),
			money('other', 'Other profit'),
			money('quoted_profit', 'Gross profit as quoted'),
			money('grossProfit', 'Gross profit')
		],
		aggregate: (s) => byMonth(s, MARGIN),
		csv: (s) => `
			SELECT ${JOB_CSV_HEAD}, d.revenue, d.parts_sell, d.parts_cost, d.extra_parts_cost, d.parts_profit AS parts,
			       d.labour_sell, d.billed_hours, d.actual_hours, d.actual_labour_cost AS labour_cost, d.labour_profit AS labour,
			       d.other_profit AS other, d.quoted_profit, d.gross_profit AS "grossProfit"
			  FROM (${jobRows(s, 'decided_at', " AND d.decision = 'approved'")}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number`
	},
	approval: {
		title: 'Approval rate of sent estimates',
		basis:
			'Estimates by the month they were first sent, however many versions followed. Rate = estimates approved ÷ estimates sent in that month, whenever the answer came; estimates still unanswered count as sent, not approved.',
		columns: [
			{ key: 'month', label: 'Month first sent', format: 'month' },
			count('sent', 'Quotes sent'),
			count('approved', 'Approved'),
			count('declined', 'Declined'),
			count('unanswered', 'Not answered yet'),
			{ key: 'ratePercent', label: 'Approval rate %', format: 'percent' }
		],
		csvColumns: [
			count('job', 'Job'),
			{ key: 'first_sent_on', label: 'First sent on', format: 'date' },
			{ key: 'month', label: 'Month first sent', format: 'month' },
			{ key: 'customer', label: 'Customer', format: 'text' },
			{ key: 'kind', label: 'Kind', format: 'text' },
			{ key: 'technician', label: 'Technician', format: 'text' },
			count('versions', 'Versions sent'),
			{ key: 'decision', label: 'Answer', format: 'text' },
			{ key: 'decided_on', label: 'Answered on', format: 'date' }
		],
		aggregate: (s) => byMonth(s, APPROVAL),
		csv: (s) => `
			SELECT j.number AS job, ${dayOf('d.first_sent_at')} AS first_sent_on, ${monthOf('d.first_sent_at')} AS month, j.customer_name AS customer,
			       d.unit_kind AS kind, coalesce(t.name, 'Unassigned') AS technician, d.versions_sent AS versions,
			       coalesce(d.decision, 'unanswered') AS decision, ${dayOf('d.decided_at')} AS decided_on
			  FROM (${jobRows(s, 'first_sent_at')}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.first_sent_at, j.number`
	},
	outcomes: {
		title: 'Outcomes by month',
		basis: "Customers' answers by the month they answered: repaired (a repair option approved), replaced (a replacement unit approved) or declined.",
		columns: [{ key: 'month', label: 'Month', format: 'month' }, count('repaired', 'Repaired'), count('replaced', 'Replaced'), count('declined', 'Declined')],
		csvColumns: outcomeCsvColumns(),
		aggregate: (s) => byMonth(s, OUTCOMES),
		csv: outcomeCsv
	},
	'outcomes-by-kind': {
		title: 'Outcomes by kind of unit',
		basis: 'The same answers as outcomes by month, for the whole period, by the kind of unit on the job.',
		columns: [{ key: 'kind', label: 'Kind of unit', format: 'text' }, count('repaired', 'Repaired'), count('replaced', 'Replaced'), count('declined', 'Declined')],
		csvColumns: outcomeCsvColumns(),
		aggregate: (s) => `
			SELECT k.kind, ${OUTCOMES}
			  FROM unnest(ARRAY[${UNIT_KINDS.map((k) => `'${k}'`).join(', ')}]::varchar[]) WITH ORDINALITY AS k(kind, position)
			  LEFT JOIN (${contributions(s)}) c ON c.unit_kind = k.kind
			 GROUP BY k.kind, k.position ORDER BY k.position`,
		totals: (s) => overall(s, OUTCOMES),
		csv: outcomeCsv
	},
	'days-to-approval': {
		title: 'Days from estimate to approval',
		basis:
			'Approved estimates by the month of approval: days from the first version sent to the approval, each rounded to a hundredth of a day; their average, and how many came within a day, within three days, within a week, or later.',
		columns: [
			{ key: 'month', label: 'Month approved', format: 'month' },
			count('approvals', 'Approvals'),
			{ key: 'averageDays', label: 'Average days', format: 'days' },
			count('withinDay', 'Within a day'),
			count('oneToThree', '1 to 3 days'),
			count('threeToSeven', '3 to 7 days'),
			count('overWeek', 'Over a week')
		],
		csvColumns: [
			count('job', 'Job'),
			{ key: 'first_sent_on', label: 'First sent on', format: 'date' },
			{ key: 'approved_on', label: 'Approved on', format: 'date' },
			{ key: 'month', label: 'Month approved', format: 'month' },
			{ key: 'customer', label: 'Customer', format: 'text' },
			{ key: 'kind', label: 'Kind', format: 'text' },
			{ key: 'technician', label: 'Technician', format: 'text' },
			{ key: 'days', label: 'Days to approval', format: 'days' }
		],
		aggregate: (s) => byMonth(s, DAYS),
		csv: (s) => `
			SELECT j.number AS job, ${dayOf('d.first_sent_at')} AS first_sent_on, ${dayOf('d.decided_at')} AS approved_on, ${monthOf('d.decided_at')} AS month,
			       j.customer_name AS customer, d.unit_kind AS kind, coalesce(t.name, 'Unassigned') AS technician, d.days
			  FROM (${jobRows(s, 'decided_at', " AND d.decision = 'approved'")}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number`
	},
	technicians: {
		title: 'Labour efficiency and margin per technician',
		basis:
			"Approved jobs by the month of approval. A job's hours billed, revenue and gross profit are shared among the people who recorded hours on it, in proportion to their hours (rounded so that the shares add up to the job); a job with no hours recorded counts for its assigned technician. Efficiency = hours billed ÷ hours spent, on jobs with hours recorded.",
		columns: [
			{ key: 'technician', label: 'Technician', format: 'text' },
			count('jobs', 'Jobs'),
			{ key: 'hoursBilled', label: 'Hours billed', format: 'hours' },
			{ key: 'hoursSpent', label: 'Hours spent', format: 'hours' },
			{ key: 'efficiency', label: 'Efficiency (billed ÷ spent)', format: 'ratio' },
			money('revenue', 'Revenue'),
			money('grossProfit', 'Gross profit'),
			{ key: 'marginPercent', label: 'Margin %', format: 'percent' }
		],
		csvColumns: [
			count('job', 'Job'),
			{ key: 'approved_on', label: 'Approved on', format: 'date' },
			{ key: 'technician', label: 'Technician', format: 'text' },
			{ key: 'share', label: 'Share of the job', format: 'ratio' },
			{ key: 'hoursBilled', label: 'Hours billed', format: 'hours' },
			{ key: 'hoursSpent', label: 'Hours spent', format: 'hours' },
			money('revenue', 'Revenue'),
			money('grossProfit', 'Gross profit')
		],
		aggregate: (s) => `
			SELECT c.technician_id AS "technicianId", coalesce(t.name, 'Unassigned') AS technician, sum(c.jobs)::int AS jobs,
			       sum(c.hours_billed) AS "hoursBilled", sum(c.hours_spent) AS "hoursSpent",
			       round(sum(c.hours_billed) / nullif(sum(c.hours_spent), 0), 2) AS efficiency,
			       sum(c.revenue) AS revenue, sum(c.gross_profit) AS "grossProfit", ${percent('sum(c.gross_profit)', 'sum(c.revenue)')} AS "marginPercent"
			  FROM (${technicianContributions(s)}) c LEFT JOIN users t ON t.id = c.technician_id AND t.shop_id = :shopId
			 GROUP BY c.technician_id, t.name ORDER BY t.name NULLS LAST`,
		totals: (s) => `
			SELECT coalesce(sum(c.hours_billed), 0) AS "hoursBilled", coalesce(sum(c.hours_spent), 0) AS "hoursSpent",
			       round(sum(c.hours_billed) / nullif(sum(c.hours_spent), 0), 2) AS efficiency,
			       coalesce(sum(c.revenue), 0) AS revenue, coalesce(sum(c.gross_profit), 0) AS "grossProfit",
			       ${percent('sum(c.gross_profit)', 'sum(c.revenue)')} AS "marginPercent"
			  FROM (${technicianContributions(s)}) c`,
		csv: (s) => `
			SELECT j.number AS job, ${dayOf('d.decided_at')} AS approved_on, coalesce(t.name, 'Unassigned') AS technician, d.share,
			       d.hours_billed AS "hoursBilled", d.hours_spent AS "hoursSpent", d.revenue, d.gross_profit AS "grossProfit"
			  FROM (SELECT * FROM report_technician_rows r WHERE r.shop_id = :shopId AND ${inPeriod('r.decided_at')}${s.filters('r')}) d
			  ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number, t.name`
	},
	'margin-lost': {
		title: 'Biggest jobs by margin lost',
		basis: `Approved jobs by the month of approval with actuals recorded. Margin lost = gross profit as quoted − gross profit after actuals (hours spent at the labour cost rate, parts beyond the estimate); negative when a job beat its estimate. The chart shows the ${TOP_MARGIN_LOST} largest losses; the totals net out the gains.`,
		columns: [
			count('job', 'Job'),
			{ key: 'customer', label: 'Customer', format: 'text' },
			{ key: 'technician', label: 'Technician', format: 'text' },
			money('quotedProfit', 'Gross profit as quoted'),
			money('grossProfit', 'Gross profit after actuals'),
			money('marginLost', 'Margin lost')
		],
		csvColumns: [
			...JOB_CSV_HEAD_COLUMNS,
			{ key: 'billed_hours', label: 'Hours billed', format: 'hours' },
			{ key: 'actual_hours', label: 'Hours spent', format: 'hours' },
			money('extra_parts_cost', 'Parts beyond the estimate'),
			money('quotedProfit', 'Gross profit as quoted'),
			money('grossProfit', 'Gross profit after actuals'),
			money('marginLost', 'Margin lost')
		],
		// Walks the losses from the largest down (job_outcomes_lost_idx) and stops at the limit.
		aggregate: (s) => `
			SELECT j.number AS job, j.id AS "jobId", j.customer_name AS customer, coalesce(t.name, 'Unassigned') AS technician,
			       d.quoted_profit AS "quotedProfit", d.gross_profit AS "grossProfit", d.margin_lost AS "marginLost"
			  FROM (SELECT * FROM report_job_rows r
			         WHERE r.shop_id = :shopId AND r.decision = 'approved' AND r.margin_lost > 0 AND ${inPeriod('r.decided_at')}${s.filters('r')}
			         ORDER BY r.margin_lost DESC, r.job_number LIMIT ${TOP_MARGIN_LOST}) d
			  ${JOB_LABELS} ${TECH_JOIN}
			 ORDER BY d.margin_lost DESC, d.job_number`,
		totals: (s) => overall(s, LOST_TOTALS),
		csv: (s) => `
			SELECT ${JOB_CSV_HEAD}, d.billed_hours, d.actual_hours, d.extra_parts_cost, d.quoted_profit AS "quotedProfit",
			       d.gross_profit AS "grossProfit", d.margin_lost AS "marginLost"
			  FROM (${jobRows(s, 'decided_at', " AND d.decision = 'approved' AND d.has_actuals")}) d ${JOB_LABELS} ${TECH_JOIN}
			 ORDER BY d.margin_lost DESC, j.number`
	}
};

// ---------------------------------------------------------------------------------------------

export function title(name: ReportName): string {
	return DEFINITIONS[name].title;
}

/** The reports in page order, with their titles, for the page to lay out before the data arrives. */
export function catalog() {
	return REPORT_NAMES.map((name) => ({ name, title: DEFINITIONS[name].title, basis: DEFINITIONS[name].basis }));
}

async function currencyOf(shopId: string): Promise<string> {
	const shop = await Shop.findByPk(shopId, { attributes: ['currency'] });
	return shop?.currency ?? 'USD';
}

function select<T extends object>(sql: string, replacements: Record<string, unknown>): Promise<T[]> {
	return db().query<T>(sql, { replacements, type: QueryTypes.SELECT });
}

/** One report's aggregated rows and totals for the shop and filters. */
export async function run(shopId: string, name: ReportName, filters: Filters): Promise<ReportResult> {
	const definition = DEFINITIONS[name];
	const s = scope(shopId, filters);
	type Row = Record<string, string | number | null>;
	const [aggregated, separate, currency] = await Promise.all([
		select<Row>(definition.aggregate(s), s.replacements),
		definition.totals ? select<Row>(definition.totals(s), s.replacements) : Promise.resolve(null),
		currencyOf(shopId)
	]);
	let totals: Row;
	if (separate) totals = separate[0];
	else {
		const { month: _whole, ...rest } = aggregated.pop()!;
		totals = rest;
	}
	if (name === 'outcomes-by-kind') for (const row of aggregated) row.kind = UNIT_KIND_LABELS[row.kind as UnitKind] ?? row.kind;
	// Money to the currency's minor unit, so an empty month reads 0.00 like the rest.
	const digits = currencyDigits(currency);
	const money = definition.columns.filter((c) => c.format === 'money').map((c) => c.key);
	for (const row of [...aggregated, totals]) {
		for (const key of money) if (typeof row[key] === 'string') row[key] = new Dec(row[key] as string).toFixed(digits);
	}
	return { name, title: definition.title, basis: definition.basis, currency, filters, columns: definition.columns, rows: aggregated, totals };
}

/** The rows behind a report, labelled, as CSV lines (header first). */
export async function csvRows(shopId: string, name: ReportName, filters: Filters): Promise<{ columns: Column[]; rows: Record<string, unknown>[] }> {
	const definition = DEFINITIONS[name];
	const s = scope(shopId, filters);
	const rows = await select<Record<string, unknown>>(definition.csv(s), s.replacements);
	return { columns: definition.csvColumns, rows };
}

/** A file name that says what and when: margin-2025-01-01-to-2025-12-31.csv */
export function csvFileName(name: ReportName, filters: Filters): string {
	return `${name}-${filters.from}-to-${filters.to}.csv`;
}

/** People whose name can filter the reports: everyone who can hold a job or record hours. */
export function technicianChoices(shopId: string) {
	return select<{ id: string; name: string }>(
		`SELECT id, name FROM users WHERE shop_id = :shopId AND role IN ('technician', 'manager', 'owner') ORDER BY name`,
		{ shopId }
	);
}
