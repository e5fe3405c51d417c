import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import { UNIT_KINDS, UNIT_KIND_LABELS, type UnitKind } from '../domain';
import { db } from './db';
import { Shop } from './db/models';

/*
 * The manager's reports. Every figure is summed in PostgreSQL from job_outcomes (one row per quoted
 * job, kept by triggers; see docs/reports.md for the basis of each figure). Each report has row
 * expressions (one row per job, or per job and technician), an aggregate over exactly those rows
 * for the chart and table, and a CSV of the same rows with names added.
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
	z.preprocess((v) => (v === '' ? undefined : v), z.iso.date({ error: `Enter the ${what} date as YYYY-MM-DD.` }).optional());

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
// SQL pieces. Periods are whole UTC days: from 00:00 on `from` up to, not including, the day after `to`.

interface Scope {
	replacements: Record<string, unknown>;
	/** Conditions on job_outcomes o: shop, technician (the job's assigned one) and unit kind. */
	where: string;
}

function scope(shopId: string, filters: Filters, { byAssignedTechnician = true } = {}): Scope {
	const conditions = ['o.shop_id = :shopId'];
	const replacements: Record<string, unknown> = {
		shopId,
		from: filters.from,
		to: filters.to,
		start: `${filters.from}T00:00:00Z`,
		end: new Date(Date.parse(`${filters.to}T00:00:00Z`) + 86_400_000).toISOString()
	};
	if (filters.technician) {
		replacements.technician = filters.technician;
		if (byAssignedTechnician) conditions.push('o.technician_id = :technician');
	}
	if (filters.kind) {
		conditions.push('o.unit_kind = :kind');
		replacements.kind = filters.kind;
	}
	return { where: conditions.join(' AND '), replacements };
}

const decidedIn = `o.decided_at >= :start::timestamptz AND o.decided_at < :end::timestamptz`;
const sentIn = `o.first_sent_at >= :start::timestamptz AND o.first_sent_at < :end::timestamptz`;
const monthOf = (column: string) => `to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM')`;
const dayOf = (column: string) => `to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM-DD')`;
/** Every month of the period, so empty months show as zero rather than vanish. */
const MONTHS = `SELECT to_char(m, 'YYYY-MM') AS month
	FROM generate_series(date_trunc('month', :from::date), :to::date, interval '1 month') m`;
const percent = (part: string, whole: string) => `round(100 * (${part}) / nullif(${whole}, 0), 1)`;

/** Names and labels the CSV adds to each job's row. */
const JOB_LABELS = `LEFT JOIN jobs j ON j.id = d.job_id AND j.shop_id = :shopId`;

interface Definition {
	title: string;
	basis: string;
	columns: Column[];
	csvColumns: Column[];
	/** One row per job (or per job and technician), with the columns the aggregate needs and `job_id`. */
	rows(s: Scope): string;
	aggregate(rows: string): string;
	totals(rows: string): string;
	/** The CSV: the same rows, labelled. `d` is the rows subquery. */
	csv(rows: string): string;
	/** Rows the chart shows when it shows only some of the aggregate (margin lost). */
	limit?: number;
}

const money = (key: string, label: string): Column => ({ key, label, format: 'money' });
const count = (key: string, label: string): Column => ({ key, label, format: 'count' });

const APPROVED_JOB_ROWS = (s: Scope, extra = '') => `
	SELECT o.job_id, o.job_number, o.decided_at, ${monthOf('o.decided_at')} AS month, o.unit_kind, o.technician_id,
	       o.revenue, o.parts_sell, o.labour_sell, o.revenue - o.parts_sell - o.labour_sell AS other_sell,
	       o.parts_cost, o.extra_parts_cost, o.labour_cost AS quoted_labour_cost, o.actual_labour_cost,
	       o.cost - o.parts_cost - o.labour_cost AS other_cost,
	       o.parts_sell - o.parts_cost - o.extra_parts_cost AS parts_profit,
	       o.labour_sell - o.actual_labour_cost AS labour_profit,
	       (o.revenue - o.parts_sell - o.labour_sell) - (o.cost - o.parts_cost - o.labour_cost) AS other_profit,
	       o.gross_profit AS quoted_profit, o.actual_gross_profit AS gross_profit,
	       o.billed_hours, o.actual_hours, o.margin_lost, o.option_label${extra}
	  FROM job_outcomes o
	 WHERE ${s.where} AND o.decision = 'approved' AND ${decidedIn}`;

const JOB_CSV_HEAD = `j.number AS job, ${dayOf('d.decided_at')} AS approved_on, d.month,
	j.customer_name AS customer, j.unit_label AS unit, d.unit_kind AS kind,
	coalesce(t.name, 'Unassigned') AS technician`;
const TECH_JOIN = `LEFT JOIN users t ON t.id = d.technician_id AND t.shop_id = :shopId`;
const JOB_CSV_HEAD_COLUMNS: Column[] = [
	count('job', 'Job'),
	{ key: 'approved_on', label: 'Approved on', format: 'date' },
	{ key: 'month', label: 'Month', format: 'month' },
	{ key: 'customer', label: 'Customer', format: 'text' },
	{ key: 'unit', label: 'Unit', format: 'text' },
	{ key: 'kind', label: 'Kind', format: 'text' },
	{ key: 'technician', label: 'Technician', format: 'text' }
];

const DEFINITIONS: Record<ReportName, Definition> = {
	revenue: {
		title: 'Revenue by month',
		basis:
			'Approved jobs by the month the customer approved: the approved option as quoted, before tax, split into parts, labour and everything else (fees, shop supplies, sublet work, new units, discounts).',
		columns: [
			{ key: 'month', label: 'Month', format: 'month' },
			count('jobs', 'Jobs approved'),
			money('parts', 'Parts'),
			money('labour', 'Labour'),
			money('other', 'Other'),
			money('revenue', 'Revenue')
		],
		csvColumns: [...JOB_CSV_HEAD_COLUMNS, { key: 'option', label: 'Option approved', format: 'text' }, money('parts', 'Parts'), money('labour', 'Labour'), money('other', 'Other'), money('revenue', 'Revenue')],
		rows: (s) => APPROVED_JOB_ROWS(s),
		aggregate: (rows) => `
			SELECT m.month, count(d.job_id)::int AS jobs, coalesce(sum(d.parts_sell), 0) AS parts, coalesce(sum(d.labour_sell), 0) AS labour,
			       coalesce(sum(d.other_sell), 0) AS other, coalesce(sum(d.revenue), 0) AS revenue
			  FROM (${MONTHS}) m LEFT JOIN (${rows}) d ON d.month = m.month
			 GROUP BY m.month ORDER BY m.month`,
		totals: (rows) => `
			SELECT count(*)::int AS jobs, coalesce(sum(d.parts_sell), 0) AS parts, coalesce(sum(d.labour_sell), 0) AS labour,
			       coalesce(sum(d.other_sell), 0) AS other, coalesce(sum(d.revenue), 0) AS revenue FROM (${rows}) d`,
		csv: (rows) => `
			SELECT ${JOB_CSV_HEAD}, d.option_label AS option, d.parts_sell AS parts, d.labour_sell AS labour, d.other_sell AS other, d.revenue
			  FROM (${rows}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number`
	},
	margin: {
		title: 'Gross margin by month',
		basis:
			'Approved jobs by the month of approval. Gross profit is the quoted price less cost, with actuals where recorded: labour at the hours actually spent times the labour cost per hour the quote was priced with, and parts used beyond the quote at cost.',
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
			money('extra_parts_cost', 'Parts beyond the quote'),
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
		rows: (s) => APPROVED_JOB_ROWS(s),
		aggregate: (rows) => `
			SELECT m.month, coalesce(sum(d.parts_profit), 0) AS parts, coalesce(sum(d.labour_profit), 0) AS labour,
			       coalesce(sum(d.other_profit), 0) AS other, coalesce(sum(d.gross_profit), 0) AS "grossProfit",
			       coalesce(sum(d.revenue), 0) AS revenue, ${percent('sum(d.gross_profit)', 'sum(d.revenue)')} AS "marginPercent"
			  FROM (${MONTHS}) m LEFT JOIN (${rows}) d ON d.month = m.month
			 GROUP BY m.month ORDER BY m.month`,
		totals: (rows) => `
			SELECT coalesce(sum(d.parts_profit), 0) AS parts, coalesce(sum(d.labour_profit), 0) AS labour,
			       coalesce(sum(d.other_profit), 0) AS other, coalesce(sum(d.gross_profit), 0) AS "grossProfit",
			       coalesce(sum(d.revenue), 0) AS revenue, ${percent('sum(d.gross_profit)', 'sum(d.revenue)')} AS "marginPercent"
			  FROM (${rows}) d`,
		csv: (rows) => `
			SELECT ${JOB_CSV_HEAD}, d.revenue, d.parts_sell, d.parts_cost, d.extra_parts_cost, d.parts_profit AS parts,
			       d.labour_sell, d.billed_hours, d.actual_hours, d.actual_labour_cost AS labour_cost, d.labour_profit AS labour,
			       d.other_profit AS other, d.quoted_profit, d.gross_profit AS "grossProfit"
			  FROM (${rows}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number`
	},
	approval: {
		title: 'Approval rate of sent quotes',
		basis:
			'Quotes by the month they were first sent, however many versions followed. Rate = quotes approved ÷ quotes sent in that month, whenever the answer came; quotes still unanswered count as sent, not approved.',
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
		rows: (s) => `
			SELECT o.job_id, o.first_sent_at, ${monthOf('o.first_sent_at')} AS month, o.unit_kind, o.technician_id,
			       o.versions_sent, o.decision, o.decided_at
			  FROM job_outcomes o WHERE ${s.where} AND ${sentIn}`,
		aggregate: (rows) => `
			SELECT m.month, count(d.job_id)::int AS sent, count(*) FILTER (WHERE d.decision = 'approved')::int AS approved,
			       count(*) FILTER (WHERE d.decision = 'declined')::int AS declined,
			       count(*) FILTER (WHERE d.job_id IS NOT NULL AND d.decision IS NULL)::int AS unanswered,
			       ${percent("count(*) FILTER (WHERE d.decision = 'approved')", 'count(d.job_id)')} AS "ratePercent"
			  FROM (${MONTHS}) m LEFT JOIN (${rows}) d ON d.month = m.month
			 GROUP BY m.month ORDER BY m.month`,
		totals: (rows) => `
			SELECT count(*)::int AS sent, count(*) FILTER (WHERE d.decision = 'approved')::int AS approved,
			       count(*) FILTER (WHERE d.decision = 'declined')::int AS declined,
			       count(*) FILTER (WHERE d.decision IS NULL)::int AS unanswered,
			       ${percent("count(*) FILTER (WHERE d.decision = 'approved')", 'count(*)')} AS "ratePercent"
			  FROM (${rows}) d`,
		csv: (rows) => `
			SELECT j.number AS job, ${dayOf('d.first_sent_at')} AS first_sent_on, d.month, j.customer_name AS customer, d.unit_kind AS kind,
			       coalesce(t.name, 'Unassigned') AS technician, d.versions_sent AS versions, coalesce(d.decision, 'unanswered') AS decision,
			       ${dayOf('d.decided_at')} AS decided_on
			  FROM (${rows}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.first_sent_at, j.number`
	},
	outcomes: {
		title: 'Outcomes by month',
		basis:
			"Customers' answers by the month they answered: repaired (a repair option approved), replaced (a replacement unit approved) or declined.",
		columns: [{ key: 'month', label: 'Month', format: 'month' }, count('repaired', 'Repaired'), count('replaced', 'Replaced'), count('declined', 'Declined')],
		csvColumns: outcomeCsvColumns(),
		rows: outcomeRows,
		aggregate: (rows) => `
			SELECT m.month, ${outcomeCounts}
			  FROM (${MONTHS}) m LEFT JOIN (${rows}) d ON d.month = m.month
			 GROUP BY m.month ORDER BY m.month`,
		totals: (rows) => `SELECT ${outcomeCounts} FROM (${rows}) d`,
		csv: outcomeCsv
	},
	'outcomes-by-kind': {
		title: 'Outcomes by kind of unit',
		basis: "The same answers as outcomes by month, for the whole period, by the kind of unit on the job.",
		columns: [{ key: 'kind', label: 'Kind of unit', format: 'text' }, count('repaired', 'Repaired'), count('replaced', 'Replaced'), count('declined', 'Declined')],
		csvColumns: outcomeCsvColumns(),
		rows: outcomeRows,
		aggregate: (rows) => `
			SELECT k.kind, ${outcomeCounts}
			  FROM unnest(ARRAY[${UNIT_KINDS.map((k) => `'${k}'`).join(', ')}]::varchar[]) WITH ORDINALITY AS k(kind, position)
			  LEFT JOIN (${rows}) d ON d.unit_kind = k.kind
			 GROUP BY k.kind, k.position ORDER BY k.position`,
		totals: (rows) => `SELECT ${outcomeCounts} FROM (${rows}) d`,
		csv: outcomeCsv
	},
	'days-to-approval': {
		title: 'Days from quote to approval',
		basis:
			'Approved quotes by the month of approval: days from the first version sent to the customer\u2019s approval, each rounded to a hundredth of a day; the average and the median of those.',
		columns: [
			{ key: 'month', label: 'Month approved', format: 'month' },
			count('approvals', 'Approvals'),
			{ key: 'averageDays', label: 'Average days', format: 'days' },
			{ key: 'medianDays', label: 'Median days', format: 'days' }
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
		rows: (s) => `
			SELECT o.job_id, o.first_sent_at, o.decided_at, ${monthOf('o.decided_at')} AS month, o.unit_kind, o.technician_id,
			       round(extract(epoch FROM o.decided_at - o.first_sent_at) / 86400, 2) AS days
			  FROM job_outcomes o WHERE ${s.where} AND o.decision = 'approved' AND ${decidedIn}`,
		aggregate: (rows) => `
			SELECT m.month, count(d.job_id)::int AS approvals, round(avg(d.days), 1) AS "averageDays",
			       round((percentile_cont(0.5) WITHIN GROUP (ORDER BY d.days))::numeric, 1) AS "medianDays"
			  FROM (${MONTHS}) m LEFT JOIN (${rows}) d ON d.month = m.month
			 GROUP BY m.month ORDER BY m.month`,
		totals: (rows) => `
			SELECT count(*)::int AS approvals, round(avg(d.days), 1) AS "averageDays",
			       round((percentile_cont(0.5) WITHIN GROUP (ORDER BY d.days))::numeric, 1) AS "medianDays"
			  FROM (${rows}) d`,
		csv: (rows) => `
			SELECT j.number AS job, ${dayOf('d.first_sent_at')} AS first_sent_on, ${dayOf('d.decided_at')} AS approved_on, d.month,
			       j.customer_name AS customer, d.unit_kind AS kind, coalesce(t.name, 'Unassigned') AS technician, d.days
			  FROM (${rows}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number`
	},
	technicians: {
		title: 'Labour efficiency and margin per technician',
		basis:
			"Approved jobs by the month of approval. A job's hours billed, revenue and gross profit are shared among the technicians who recorded hours on it, in proportion to their hours (each share rounded); a job with no hours recorded counts for its assigned technician. Efficiency = hours billed ÷ hours spent, on jobs with hours recorded.",
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
		rows: (s) => `
			WITH approved AS (
				SELECT o.job_id, o.decided_at, o.technician_id, o.technician_hours, o.actual_hours, o.billed_hours, o.revenue,
				       o.actual_gross_profit, o.minor_digits
				  FROM job_outcomes o WHERE ${s.where} AND o.decision = 'approved' AND ${decidedIn}),
			shares AS (
				SELECT a.*, h.key::uuid AS person, h.value::numeric AS spent, h.value::numeric / a.actual_hours AS share
				  FROM approved a CROSS JOIN LATERAL jsonb_each_text(a.technician_hours) h WHERE a.actual_hours > 0
				UNION ALL
				SELECT a.*, a.technician_id, 0, 1 FROM approved a WHERE a.actual_hours IS NULL OR a.actual_hours = 0)
			SELECT s.job_id, s.decided_at, s.person AS technician_id, round(s.share, 4) AS share, s.spent AS hours_spent,
			       CASE WHEN s.actual_hours > 0 THEN round(s.billed_hours * s.share, 2) ELSE 0 END AS hours_billed,
			       round(s.revenue * s.share, s.minor_digits) AS revenue, round(s.actual_gross_profit * s.share, s.minor_digits) AS gross_profit
			  FROM shares s${s.replacements.technician ? ' WHERE s.person = :technician' : ''}`,
		aggregate: (rows) => `
			SELECT d.technician_id AS "technicianId", coalesce(t.name, 'Unassigned') AS technician, count(*)::int AS jobs,
			       sum(d.hours_billed) AS "hoursBilled", sum(d.hours_spent) AS "hoursSpent",
			       round(sum(d.hours_billed) / nullif(sum(d.hours_spent), 0), 2) AS efficiency,
			       sum(d.revenue) AS revenue, sum(d.gross_profit) AS "grossProfit", ${percent('sum(d.gross_profit)', 'sum(d.revenue)')} AS "marginPercent"
			  FROM (${rows}) d ${TECH_JOIN}
			 GROUP BY d.technician_id, t.name ORDER BY t.name NULLS LAST`,
		totals: (rows) => `
			SELECT count(DISTINCT d.job_id)::int AS jobs, coalesce(sum(d.hours_billed), 0) AS "hoursBilled", coalesce(sum(d.hours_spent), 0) AS "hoursSpent",
			       round(sum(d.hours_billed) / nullif(sum(d.hours_spent), 0), 2) AS efficiency,
			       coalesce(sum(d.revenue), 0) AS revenue, coalesce(sum(d.gross_profit), 0) AS "grossProfit",
			       ${percent('sum(d.gross_profit)', 'sum(d.revenue)')} AS "marginPercent"
			  FROM (${rows}) d`,
		csv: (rows) => `
			SELECT j.number AS job, ${dayOf('d.decided_at')} AS approved_on, coalesce(t.name, 'Unassigned') AS technician, d.share,
			       d.hours_billed AS "hoursBilled", d.hours_spent AS "hoursSpent", d.revenue, d.gross_profit AS "grossProfit"
			  FROM (${rows}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number, t.name`
	},
	'margin-lost': {
		title: 'Biggest jobs by margin lost',
		basis:
			'Approved jobs by the month of approval with actuals recorded. Margin lost = gross profit as quoted − gross profit after actuals (more hours than billed at the labour cost rate, parts beyond the quote); negative when the job beat its quote. The chart shows the largest losses.',
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
			money('extra_parts_cost', 'Parts beyond the quote'),
			money('quotedProfit', 'Gross profit as quoted'),
			money('grossProfit', 'Gross profit after actuals'),
			money('marginLost', 'Margin lost')
		],
		rows: (s) => `${APPROVED_JOB_ROWS(s)} AND (o.actual_hours IS NOT NULL OR o.extra_parts_cost <> 0)`,
		limit: TOP_MARGIN_LOST,
		aggregate: (rows) => `
			SELECT j.number AS job, j.id AS "jobId", j.customer_name AS customer, coalesce(t.name, 'Unassigned') AS technician,
			       d.quoted_profit AS "quotedProfit", d.gross_profit AS "grossProfit", d.margin_lost AS "marginLost"
			  FROM (SELECT * FROM (${rows}) r WHERE r.margin_lost > 0 ORDER BY r.margin_lost DESC, r.job_number LIMIT ${TOP_MARGIN_LOST}) d
			  ${JOB_LABELS} ${TECH_JOIN}
			 ORDER BY d.margin_lost DESC, d.job_number`,
		totals: (rows) => `
			SELECT count(*)::int AS jobs, count(*) FILTER (WHERE d.margin_lost > 0)::int AS "jobsLosing",
			       coalesce(sum(d.quoted_profit), 0) AS "quotedProfit", coalesce(sum(d.gross_profit), 0) AS "grossProfit",
			       coalesce(sum(d.margin_lost), 0) AS "marginLost"
			  FROM (${rows}) d`,
		csv: (rows) => `
			SELECT ${JOB_CSV_HEAD}, d.billed_hours, d.actual_hours, d.extra_parts_cost, d.quoted_profit AS "quotedProfit",
			       d.gross_profit AS "grossProfit", d.margin_lost AS "marginLost"
			  FROM (${rows}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.margin_lost DESC, j.number`
	}
};

const outcomeCounts = `count(*) FILTER (WHERE d.outcome = 'repaired')::int AS repaired,
	count(*) FILTER (WHERE d.outcome = 'replaced')::int AS replaced,
	count(*) FILTER (WHERE d.outcome = 'declined')::int AS declined`;

function outcomeRows(s: Scope): string {
	return `
		SELECT o.job_id, o.decided_at, ${monthOf('o.decided_at')} AS month, o.unit_kind, o.technician_id, o.outcome, o.option_label
		  FROM job_outcomes o WHERE ${s.where} AND o.decided_at IS NOT NULL AND ${decidedIn}`;
}

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

function outcomeCsv(rows: string): string {
	return `
		SELECT j.number AS job, ${dayOf('d.decided_at')} AS decided_on, d.month, j.customer_name AS customer, d.unit_kind AS kind,
		       coalesce(t.name, 'Unassigned') AS technician, d.outcome, d.option_label AS option
		  FROM (${rows}) d ${JOB_LABELS} ${TECH_JOIN} ORDER BY d.decided_at, j.number`;
}

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
	const s = scope(shopId, filters, { byAssignedTechnician: name !== 'technicians' });
	const rows = definition.rows(s);
	const [aggregated, [totals], currency] = await Promise.all([
		select<Record<string, string | number | null>>(definition.aggregate(rows), s.replacements),
		select<Record<string, string | number | null>>(definition.totals(rows), s.replacements),
		currencyOf(shopId)
	]);
	if (name === 'outcomes-by-kind') for (const row of aggregated) row.kind = UNIT_KIND_LABELS[row.kind as UnitKind] ?? row.kind;
	return { name, title: definition.title, basis: definition.basis, currency, filters, columns: definition.columns, rows: aggregated, totals };
}

/** The rows behind a report, labelled, as CSV lines (header first). */
export async function csvRows(shopId: string, name: ReportName, filters: Filters): Promise<{ columns: Column[]; rows: Record<string, unknown>[] }> {
	const definition = DEFINITIONS[name];
	const s = scope(shopId, filters, { byAssignedTechnician: name !== 'technicians' });
	const rows = await select<Record<string, unknown>>(definition.csv(definition.rows(s)), s.replacements);
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
