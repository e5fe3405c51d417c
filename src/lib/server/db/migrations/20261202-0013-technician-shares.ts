import type { Migration } from '../migrator';

/*
 * An approved job's hours billed, revenue and gross profit are shared among the people who recorded
 * hours on it, in proportion to their hours. Rounding each share on its own let the shares of a job
 * miss its whole by a cent (three people on 100.00: 33.33 three times), so the technicians report
 * disagreed with the revenue report. Each share is now the rounded running total less the rounded
 * running total before it (people in a fixed order): every share still rounds its exact part to
 * within one minor unit, and the shares of a job add up to the job exactly.
 */
const JOB_SHARES = (running: boolean) => `
		CREATE OR REPLACE VIEW report_technician_rows AS
		SELECT o.job_id, o.shop_id, o.decided_at, o.unit_kind, h.technician_id,
		       round(h.hours / o.actual_hours, 4) AS share, h.hours AS hours_spent,
		       ${running ? part('o.billed_hours', '2') : 'round(o.billed_hours * h.hours / o.actual_hours, 2)'} AS hours_billed,
		       ${running ? part('o.revenue', 'o.minor_digits') : 'round(o.revenue * h.hours / o.actual_hours, o.minor_digits)'} AS revenue,
		       ${running ? part('o.actual_gross_profit', 'o.minor_digits') : 'round(o.actual_gross_profit * h.hours / o.actual_hours, o.minor_digits)'} AS gross_profit
		  FROM job_outcomes o
		  CROSS JOIN LATERAL (
		       SELECT e.key::uuid AS technician_id, e.value::numeric AS hours,
		              sum(e.value::numeric) OVER (ORDER BY e.key) AS upto
		         FROM jsonb_each_text(o.technician_hours) e) h
		 WHERE o.decision = 'approved' AND o.actual_hours > 0
		UNION ALL
		SELECT o.job_id, o.shop_id, o.decided_at, o.unit_kind, o.technician_id, 1, 0, 0, o.revenue, o.actual_gross_profit
		  FROM job_outcomes o
		 WHERE o.decision = 'approved' AND (o.actual_hours IS NULL OR o.actual_hours = 0);`;

/** This person's share of `whole`: the rounded running total through them less the one before them. */
function part(whole: string, digits: string): string {
	return `round(${whole} * h.upto / o.actual_hours, ${digits}) - round(${whole} * (h.upto - h.hours) / o.actual_hours, ${digits})`;
}

/** The stored per-person sums, worked out again for every day that has an answered job. */
const REBUILD = `
		SELECT report_rollup_many(array_agg(d.shop_id), array_agg(d.day))
		  FROM (SELECT DISTINCT shop_id, (decided_at AT TIME ZONE 'UTC')::date AS day
		          FROM job_outcomes WHERE decision = 'approved' AND decided_at IS NOT NULL) d
		HAVING count(*) > 0;`;

export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(JOB_SHARES(true));
	await sequelize.query(REBUILD);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(JOB_SHARES(false));
	await sequelize.query(REBUILD);
};
