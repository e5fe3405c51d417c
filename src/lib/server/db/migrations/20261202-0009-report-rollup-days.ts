import type { Migration } from '../migrator';

/*
 * report_rollup rebuilt day by day when a change touches a few days (an approval touches one or
 * two): each day's sums then come from index range scans with the day as a constant, instead of a
 * join that reads every report row of the shop. The per-shop lock is held for milliseconds, not
 * for the length of a scan. Many days at once (a bulk load) still take the set-based pass.
 */
const DAY_SUMS = `sum(c.sent), sum(c.sent_approved), sum(c.sent_declined),
	sum(c.approved), sum(c.repaired), sum(c.replaced), sum(c.declined),
	sum(c.revenue), sum(c.parts_sell), sum(c.labour_sell), sum(c.other_sell),
	sum(c.parts_profit), sum(c.labour_profit), sum(c.other_profit), sum(c.gross_profit),
	sum(c.days_sum), sum(c.within_1), sum(c.within_3), sum(c.within_7),
	sum(c.actuals_jobs), sum(c.losing_jobs), sum(c.actuals_quoted_profit), sum(c.actuals_gross_profit), sum(c.margin_lost)`;

export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		ALTER FUNCTION report_rollup(uuid[], date[]) RENAME TO report_rollup_many;

		CREATE FUNCTION report_rollup(shops uuid[], days date[]) RETURNS void LANGUAGE plpgsql AS $fn$
		DECLARE
			k record;
			day_start timestamptz;
			day_end timestamptz;
		BEGIN
			IF (SELECT count(DISTINCT (u.shop_id, u.day)) FROM unnest(shops, days) AS u(shop_id, day)) > 31 THEN
				PERFORM report_rollup_many(shops, days);
				RETURN;
			END IF;
			PERFORM pg_advisory_xact_lock(hashtextextended('report rollup ' || s::text, 0))
			   FROM (SELECT DISTINCT unnest(shops) AS s ORDER BY 1) x;
			FOR k IN SELECT DISTINCT u.shop_id, u.day FROM unnest(shops, days) AS u(shop_id, day) ORDER BY 1, 2 LOOP
				day_start := k.day::timestamp AT TIME ZONE 'UTC';
				day_end := (k.day + 1)::timestamp AT TIME ZONE 'UTC';
				DELETE FROM report_days r WHERE r.shop_id = k.shop_id AND r.day = k.day;
				INSERT INTO report_days
				SELECT k.shop_id, k.day, c.technician_id, c.unit_kind, ${DAY_SUMS}
				  FROM report_contributions c
				 WHERE c.shop_id = k.shop_id AND c.at >= day_start AND c.at < day_end
				 GROUP BY c.technician_id, c.unit_kind;
				DELETE FROM report_technician_days r WHERE r.shop_id = k.shop_id AND r.day = k.day;
				INSERT INTO report_technician_days
				SELECT k.shop_id, k.day, t.technician_id, t.unit_kind, count(*), sum(t.hours_billed), sum(t.hours_spent), sum(t.revenue), sum(t.gross_profit)
				  FROM report_technician_rows t
				 WHERE t.shop_id = k.shop_id AND t.decided_at >= day_start AND t.decided_at < day_end
				 GROUP BY t.technician_id, t.unit_kind;
			END LOOP;
			FOR k IN SELECT DISTINCT u.shop_id, date_trunc('month', u.day)::date AS month FROM unnest(shops, days) AS u(shop_id, day) ORDER BY 1, 2 LOOP
				DELETE FROM report_months r WHERE r.shop_id = k.shop_id AND r.month = k.month;
				INSERT INTO report_months
				SELECT k.shop_id, k.month, c.technician_id, c.unit_kind, ${DAY_SUMS}
				  FROM report_days c
				 WHERE c.shop_id = k.shop_id AND c.day >= k.month AND c.day < (k.month + interval '1 month')::date
				 GROUP BY c.technician_id, c.unit_kind;
				DELETE FROM report_technician_months r WHERE r.shop_id = k.shop_id AND r.month = k.month;
				INSERT INTO report_technician_months
				SELECT k.shop_id, k.month, t.technician_id, t.unit_kind, sum(t.jobs), sum(t.hours_billed), sum(t.hours_spent), sum(t.revenue), sum(t.gross_profit)
				  FROM report_technician_days t
				 WHERE t.shop_id = k.shop_id AND t.day >= k.month AND t.day < (k.month + interval '1 month')::date
				 GROUP BY t.technician_id, t.unit_kind;
			END LOOP;
		END $fn$;
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		DROP FUNCTION report_rollup(uuid[], date[]);
		ALTER FUNCTION report_rollup_many(uuid[], date[]) RENAME TO report_rollup;
	`);
};
