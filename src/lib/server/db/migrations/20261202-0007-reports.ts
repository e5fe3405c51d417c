import type { Migration } from '../migrator';

/*
 * Actuals (labour hours per technician, parts used beyond the quote) and job_outcomes: one row per
 * quoted job holding what the manager reports add up — first send, the customer's decision, the
 * approved option's figures out of the frozen version's result, and the actuals. Triggers keep it
 * in step with its sources, so no service has to remember to; reports read only this table.
 */
export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		CREATE TABLE job_labour (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			job_id uuid NOT NULL REFERENCES jobs(id) ON DELETE CASCADE,
			technician_id uuid NOT NULL REFERENCES users(id),
			hours numeric(6,2) NOT NULL CHECK (hours > 0 AND hours <= 200),
			worked_on date NOT NULL DEFAULT current_date,
			note varchar(300) NOT NULL DEFAULT '',
			recorded_by uuid REFERENCES users(id),
			created_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX job_labour_job_idx ON job_labour (job_id, created_at);

		CREATE TABLE job_extra_parts (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			job_id uuid NOT NULL REFERENCES jobs(id) ON DELETE CASCADE,
			description varchar(200) NOT NULL,
			quantity numeric(10,2) NOT NULL CHECK (quantity > 0),
			unit_cost numeric(12,2) NOT NULL CHECK (unit_cost >= 0),
			line_cost numeric(14,2) GENERATED ALWAYS AS (round(quantity * unit_cost, 2)) STORED,
			recorded_by uuid REFERENCES users(id),
			created_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX job_extra_parts_job_idx ON job_extra_parts (job_id, created_at);

		CREATE TABLE job_outcomes (
			job_id uuid PRIMARY KEY REFERENCES jobs(id) ON DELETE CASCADE,
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			quote_id uuid NOT NULL REFERENCES quotes(id) ON DELETE CASCADE,
			job_number integer NOT NULL,
			technician_id uuid REFERENCES users(id) ON DELETE SET NULL,
			unit_kind varchar(20) NOT NULL,
			first_sent_at timestamptz NOT NULL,
			versions_sent integer NOT NULL,
			decision varchar(10) CHECK (decision IN ('approved', 'declined')),
			decided_at timestamptz,
			outcome varchar(10) CHECK (outcome IN ('repaired', 'replaced', 'declined')),
			option_label varchar(120),
			currency char(3),
			minor_digits integer NOT NULL DEFAULT 2,
			-- The approved option as quoted (zero unless approved). Money as the engine wrote it.
			revenue numeric NOT NULL DEFAULT 0,
			cost numeric NOT NULL DEFAULT 0,
			gross_profit numeric NOT NULL DEFAULT 0,
			parts_sell numeric NOT NULL DEFAULT 0,
			parts_cost numeric NOT NULL DEFAULT 0,
			labour_sell numeric NOT NULL DEFAULT 0,
			labour_cost numeric NOT NULL DEFAULT 0,
			billed_hours numeric NOT NULL DEFAULT 0,
			labour_cost_rate numeric NOT NULL DEFAULT 0,
			-- Actuals: null hours means none recorded, and the quoted labour cost stands.
			actual_hours numeric,
			technician_hours jsonb NOT NULL DEFAULT '{}',
			extra_parts_cost numeric NOT NULL DEFAULT 0,
			actual_labour_cost numeric GENERATED ALWAYS AS (
				CASE WHEN actual_hours IS NULL THEN labour_cost ELSE round(actual_hours * labour_cost_rate, minor_digits) END) STORED,
			actual_gross_profit numeric GENERATED ALWAYS AS (
				revenue - cost + labour_cost - extra_parts_cost
				- CASE WHEN actual_hours IS NULL THEN labour_cost ELSE round(actual_hours * labour_cost_rate, minor_digits) END) STORED,
			margin_lost numeric GENERATED ALWAYS AS (
				extra_parts_cost - labour_cost
				+ CASE WHEN actual_hours IS NULL THEN labour_cost ELSE round(actual_hours * labour_cost_rate, minor_digits) END) STORED,
			refreshed_at timestamptz NOT NULL DEFAULT now()
		);
		-- Raw rows in a period: the CSVs, and rebuilding a day's sums.
		CREATE INDEX job_outcomes_decided_idx ON job_outcomes (shop_id, decided_at) WHERE decided_at IS NOT NULL;
		CREATE INDEX job_outcomes_sent_idx ON job_outcomes (shop_id, first_sent_at);
		-- The biggest losses first.
		CREATE INDEX job_outcomes_lost_idx ON job_outcomes (shop_id, margin_lost DESC, job_number) WHERE decision = 'approved' AND margin_lost > 0;

		CREATE FUNCTION report_month(at timestamptz) RETURNS date LANGUAGE sql IMMUTABLE PARALLEL SAFE
			AS $fn$ SELECT (date_trunc('month', at AT TIME ZONE 'UTC'))::date $fn$;
		CREATE FUNCTION report_day(at timestamptz) RETURNS date LANGUAGE sql IMMUTABLE PARALLEL SAFE
			AS $fn$ SELECT (at AT TIME ZONE 'UTC')::date $fn$;

		-- Each job's figures as the reports add them up; the one place they are defined.
		CREATE VIEW report_job_rows AS
		SELECT o.job_id, o.shop_id, o.job_number, o.technician_id, o.unit_kind, o.first_sent_at, o.versions_sent,
		       o.decision, o.decided_at, o.outcome, o.option_label,
		       o.revenue, o.parts_sell, o.labour_sell, o.revenue - o.parts_sell - o.labour_sell AS other_sell,
		       o.parts_cost, o.extra_parts_cost, o.labour_cost AS quoted_labour_cost, o.actual_labour_cost,
		       o.parts_sell - o.parts_cost - o.extra_parts_cost AS parts_profit,
		       o.labour_sell - o.actual_labour_cost AS labour_profit,
		       (o.revenue - o.parts_sell - o.labour_sell) - (o.cost - o.parts_cost - o.labour_cost) AS other_profit,
		       o.gross_profit AS quoted_profit, o.actual_gross_profit AS gross_profit,
		       o.billed_hours, o.actual_hours, o.margin_lost,
		       (o.actual_hours IS NOT NULL OR o.extra_parts_cost <> 0) AS has_actuals,
		       CASE WHEN o.decision = 'approved' THEN round(extract(epoch FROM o.decided_at - o.first_sent_at) / 86400, 2) END AS days
		  FROM job_outcomes o;

		-- An approved job's hours billed, revenue and gross profit shared among the people who recorded
		-- hours, in proportion to their hours (each share rounded); with no hours, all to the assigned technician.
		CREATE VIEW report_technician_rows AS
		SELECT o.job_id, o.shop_id, o.decided_at, o.unit_kind, h.key::uuid AS technician_id,
		       round(h.value::numeric / o.actual_hours, 4) AS share, h.value::numeric AS hours_spent,
		       round(o.billed_hours * h.value::numeric / o.actual_hours, 2) AS hours_billed,
		       round(o.revenue * h.value::numeric / o.actual_hours, o.minor_digits) AS revenue,
		       round(o.actual_gross_profit * h.value::numeric / o.actual_hours, o.minor_digits) AS gross_profit
		  FROM job_outcomes o CROSS JOIN LATERAL jsonb_each_text(o.technician_hours) h
		 WHERE o.decision = 'approved' AND o.actual_hours > 0
		UNION ALL
		SELECT o.job_id, o.shop_id, o.decided_at, o.unit_kind, o.technician_id, 1, 0, 0, o.revenue, o.actual_gross_profit
		  FROM job_outcomes o
		 WHERE o.decision = 'approved' AND (o.actual_hours IS NULL OR o.actual_hours = 0);

		-- What each job adds to a month: its first send to the month it was sent, its answer, money and
		-- actuals to the day it was answered. Summed by day into report_days, and those by month.
		CREATE VIEW report_contributions AS
		SELECT r.shop_id, r.technician_id, r.unit_kind, r.first_sent_at AS at,
		       1 AS sent, (r.decision = 'approved' IS TRUE)::int AS sent_approved, (r.decision = 'declined' IS TRUE)::int AS sent_declined,
		       0 AS approved, 0 AS repaired, 0 AS replaced, 0 AS declined,
		       0::numeric AS revenue, 0::numeric AS parts_sell, 0::numeric AS labour_sell, 0::numeric AS other_sell,
		       0::numeric AS parts_profit, 0::numeric AS labour_profit, 0::numeric AS other_profit, 0::numeric AS gross_profit,
		       0::numeric AS days_sum, 0 AS within_1, 0 AS within_3, 0 AS within_7,
		       0 AS actuals_jobs, 0 AS losing_jobs, 0::numeric AS actuals_quoted_profit, 0::numeric AS actuals_gross_profit, 0::numeric AS margin_lost
		  FROM report_job_rows r
		UNION ALL
		SELECT r.shop_id, r.technician_id, r.unit_kind, r.decided_at,
		       0, 0, 0,
		       (r.decision = 'approved' IS TRUE)::int, (r.outcome = 'repaired' IS TRUE)::int, (r.outcome = 'replaced' IS TRUE)::int, (r.outcome = 'declined' IS TRUE)::int,
		       -- Money counts for approved jobs only: a declined job may still carry diagnosis hours.
		       CASE WHEN r.decision = 'approved' THEN r.revenue ELSE 0 END,
		       CASE WHEN r.decision = 'approved' THEN r.parts_sell ELSE 0 END,
		       CASE WHEN r.decision = 'approved' THEN r.labour_sell ELSE 0 END,
		       CASE WHEN r.decision = 'approved' THEN r.other_sell ELSE 0 END,
		       CASE WHEN r.decision = 'approved' THEN r.parts_profit ELSE 0 END,
		       CASE WHEN r.decision = 'approved' THEN r.labour_profit ELSE 0 END,
		       CASE WHEN r.decision = 'approved' THEN r.other_profit ELSE 0 END,
		       CASE WHEN r.decision = 'approved' THEN r.gross_profit ELSE 0 END,
		       coalesce(r.days, 0), (r.days <= 1 IS TRUE)::int, (r.days <= 3 IS TRUE)::int, (r.days <= 7 IS TRUE)::int,
		       ((r.decision = 'approved' AND r.has_actuals) IS TRUE)::int, ((r.decision = 'approved' AND r.has_actuals AND r.margin_lost > 0) IS TRUE)::int,
		       CASE WHEN r.decision = 'approved' AND r.has_actuals THEN r.quoted_profit ELSE 0 END,
		       CASE WHEN r.decision = 'approved' AND r.has_actuals THEN r.gross_profit ELSE 0 END,
		       CASE WHEN r.decision = 'approved' AND r.has_actuals THEN r.margin_lost ELSE 0 END
		  FROM report_job_rows r
		 WHERE r.decided_at IS NOT NULL;

		-- Sums by day, and by month, per assigned technician and kind of unit: a report over many months
		-- reads a few hundred monthly rows and the days at either end instead of every job. Rebuilt for
		-- the days (and their months) a change touches.
		CREATE TABLE report_days (
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			day date NOT NULL,
			technician_id uuid,
			unit_kind varchar(20) NOT NULL,
			sent integer NOT NULL, sent_approved integer NOT NULL, sent_declined integer NOT NULL,
			approved integer NOT NULL, repaired integer NOT NULL, replaced integer NOT NULL, declined integer NOT NULL,
			revenue numeric NOT NULL, parts_sell numeric NOT NULL, labour_sell numeric NOT NULL, other_sell numeric NOT NULL,
			parts_profit numeric NOT NULL, labour_profit numeric NOT NULL, other_profit numeric NOT NULL, gross_profit numeric NOT NULL,
			days_sum numeric NOT NULL, within_1 integer NOT NULL, within_3 integer NOT NULL, within_7 integer NOT NULL,
			actuals_jobs integer NOT NULL, losing_jobs integer NOT NULL, actuals_quoted_profit numeric NOT NULL,
			actuals_gross_profit numeric NOT NULL, margin_lost numeric NOT NULL
		);
		CREATE UNIQUE INDEX report_days_key ON report_days (shop_id, day, technician_id, unit_kind) NULLS NOT DISTINCT;
		CREATE TABLE report_months (LIKE report_days);
		ALTER TABLE report_months RENAME COLUMN day TO month;
		ALTER TABLE report_months ADD FOREIGN KEY (shop_id) REFERENCES shops(id) ON DELETE CASCADE;
		CREATE UNIQUE INDEX report_months_key ON report_months (shop_id, month, technician_id, unit_kind) NULLS NOT DISTINCT;

		-- The same for the shares of each person (see report_technician_rows).
		CREATE TABLE report_technician_days (
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			day date NOT NULL,
			technician_id uuid,
			unit_kind varchar(20) NOT NULL,
			jobs integer NOT NULL,
			hours_billed numeric NOT NULL,
			hours_spent numeric NOT NULL,
			revenue numeric NOT NULL,
			gross_profit numeric NOT NULL
		);
		CREATE UNIQUE INDEX report_technician_days_key ON report_technician_days (shop_id, day, technician_id, unit_kind) NULLS NOT DISTINCT;
		CREATE TABLE report_technician_months (LIKE report_technician_days);
		ALTER TABLE report_technician_months RENAME COLUMN day TO month;
		ALTER TABLE report_technician_months ADD FOREIGN KEY (shop_id) REFERENCES shops(id) ON DELETE CASCADE;
		CREATE UNIQUE INDEX report_technician_months_key ON report_technician_months (shop_id, month, technician_id, unit_kind) NULLS NOT DISTINCT;

		-- Rebuilds the daily sums of the given (shop, day) pairs and the monthly sums of their months;
		-- one shop at a time, so two transactions touching the same day never both write it.
		CREATE FUNCTION report_rollup(shops uuid[], days date[]) RETURNS void LANGUAGE plpgsql AS $fn$
		BEGIN
			PERFORM pg_advisory_xact_lock(hashtextextended('report rollup ' || s::text, 0))
			   FROM (SELECT DISTINCT unnest(shops) AS s ORDER BY 1) x;
			DELETE FROM report_days r USING (SELECT DISTINCT u.shop_id, u.day FROM unnest(shops, days) AS u(shop_id, day)) k WHERE r.shop_id = k.shop_id AND r.day = k.day;
			INSERT INTO report_days
			SELECT k.shop_id, k.day, c.technician_id, c.unit_kind, sum(c.sent), sum(c.sent_approved), sum(c.sent_declined),
			       sum(c.approved), sum(c.repaired), sum(c.replaced), sum(c.declined),
			       sum(c.revenue), sum(c.parts_sell), sum(c.labour_sell), sum(c.other_sell),
			       sum(c.parts_profit), sum(c.labour_profit), sum(c.other_profit), sum(c.gross_profit),
			       sum(c.days_sum), sum(c.within_1), sum(c.within_3), sum(c.within_7),
			       sum(c.actuals_jobs), sum(c.losing_jobs), sum(c.actuals_quoted_profit), sum(c.actuals_gross_profit), sum(c.margin_lost)
			  FROM (SELECT DISTINCT u.shop_id, u.day FROM unnest(shops, days) AS u(shop_id, day)) k
			  JOIN report_contributions c ON c.shop_id = k.shop_id
			   AND c.at >= k.day::timestamp AT TIME ZONE 'UTC' AND c.at < (k.day + 1)::timestamp AT TIME ZONE 'UTC'
			 GROUP BY k.shop_id, k.day, c.technician_id, c.unit_kind;

			DELETE FROM report_technician_days r USING (SELECT DISTINCT u.shop_id, u.day FROM unnest(shops, days) AS u(shop_id, day)) k WHERE r.shop_id = k.shop_id AND r.day = k.day;
			INSERT INTO report_technician_days
			SELECT k.shop_id, k.day, t.technician_id, t.unit_kind, count(*), sum(t.hours_billed), sum(t.hours_spent), sum(t.revenue), sum(t.gross_profit)
			  FROM (SELECT DISTINCT u.shop_id, u.day FROM unnest(shops, days) AS u(shop_id, day)) k
			  JOIN report_technician_rows t ON t.shop_id = k.shop_id
			   AND t.decided_at >= k.day::timestamp AT TIME ZONE 'UTC' AND t.decided_at < (k.day + 1)::timestamp AT TIME ZONE 'UTC'
			 GROUP BY k.shop_id, k.day, t.technician_id, t.unit_kind;

			DELETE FROM report_months r USING (SELECT DISTINCT u.shop_id, date_trunc('month', u.day)::date AS month FROM unnest(shops, days) AS u(shop_id, day)) k WHERE r.shop_id = k.shop_id AND r.month = k.month;
			INSERT INTO report_months
			SELECT k.shop_id, k.month, c.technician_id, c.unit_kind, sum(c.sent), sum(c.sent_approved), sum(c.sent_declined),
			       sum(c.approved), sum(c.repaired), sum(c.replaced), sum(c.declined),
			       sum(c.revenue), sum(c.parts_sell), sum(c.labour_sell), sum(c.other_sell),
			       sum(c.parts_profit), sum(c.labour_profit), sum(c.other_profit), sum(c.gross_profit),
			       sum(c.days_sum), sum(c.within_1), sum(c.within_3), sum(c.within_7),
			       sum(c.actuals_jobs), sum(c.losing_jobs), sum(c.actuals_quoted_profit), sum(c.actuals_gross_profit), sum(c.margin_lost)
			  FROM (SELECT DISTINCT u.shop_id, date_trunc('month', u.day)::date AS month FROM unnest(shops, days) AS u(shop_id, day)) k
			  JOIN report_days c ON c.shop_id = k.shop_id AND c.day >= k.month AND c.day < (k.month + interval '1 month')::date
			 GROUP BY k.shop_id, k.month, c.technician_id, c.unit_kind;

			DELETE FROM report_technician_months r USING (SELECT DISTINCT u.shop_id, date_trunc('month', u.day)::date AS month FROM unnest(shops, days) AS u(shop_id, day)) k WHERE r.shop_id = k.shop_id AND r.month = k.month;
			INSERT INTO report_technician_months
			SELECT k.shop_id, k.month, t.technician_id, t.unit_kind, sum(t.jobs), sum(t.hours_billed), sum(t.hours_spent), sum(t.revenue), sum(t.gross_profit)
			  FROM (SELECT DISTINCT u.shop_id, date_trunc('month', u.day)::date AS month FROM unnest(shops, days) AS u(shop_id, day)) k
			  JOIN report_technician_days t ON t.shop_id = k.shop_id AND t.day >= k.month AND t.day < (k.month + interval '1 month')::date
			 GROUP BY k.shop_id, k.month, t.technician_id, t.unit_kind;
		END $fn$;

		-- Recomputes the report row of each given job from its sources; jobs never quoted get none.
		CREATE FUNCTION report_upsert_outcomes(job_ids uuid[]) RETURNS void LANGUAGE sql AS $fn$
			DELETE FROM job_outcomes o
			 USING unnest(job_ids) AS ids(job_id)
			 WHERE o.job_id = ids.job_id
			   AND NOT EXISTS (SELECT 1 FROM quote_versions v JOIN quotes q ON q.id = v.quote_id WHERE q.job_id = o.job_id);

			INSERT INTO job_outcomes AS o (
				job_id, shop_id, quote_id, job_number, technician_id, unit_kind, first_sent_at, versions_sent,
				decision, decided_at, outcome, option_label, currency, minor_digits,
				revenue, cost, gross_profit, parts_sell, parts_cost, labour_sell, labour_cost, billed_hours, labour_cost_rate,
				actual_hours, technician_hours, extra_parts_cost, refreshed_at)
			SELECT j.id, j.shop_id, q.id, j.number, j.technician_id, u.kind, sent.first_sent_at, sent.versions_sent,
			       a.decision, a.created_at,
			       CASE WHEN a.decision = 'declined' THEN 'declined'
			            WHEN a.decision = 'approved' AND opt.o->>'kind' = 'replacement' THEN 'replaced'
			            WHEN a.decision = 'approved' THEN 'repaired' END,
			       CASE WHEN a.decision = 'approved' THEN coalesce(a.option_label, opt.o->>'label') END,
			       av.currency, coalesce((av.result->>'minorDigits')::int, 2),
			       coalesce((opt.o->>'subtotal')::numeric, 0),
			       coalesce((opt.o->>'cost')::numeric, 0),
			       coalesce((opt.o->>'grossProfit')::numeric, 0),
			       coalesce(lines.parts_sell, 0), coalesce(lines.parts_cost, 0),
			       coalesce(lines.labour_sell, 0), coalesce(lines.labour_cost, 0), coalesce(lines.billed_hours, 0),
			       coalesce((av.result->'settings'->>'labourCostRate')::numeric, 0),
			       lab.hours, coalesce(lab.by_technician, '{}'::jsonb), coalesce(extra.cost, 0), now()
			  FROM (SELECT DISTINCT unnest(job_ids) AS job_id) ids
			  JOIN quotes q ON q.job_id = ids.job_id
			  JOIN jobs j ON j.id = q.job_id
			  JOIN units u ON u.id = j.unit_id
			  JOIN LATERAL (SELECT min(v.sent_at) AS first_sent_at, count(*)::int AS versions_sent
			                  FROM quote_versions v WHERE v.quote_id = q.id) sent ON sent.versions_sent > 0
			  LEFT JOIN approvals a ON a.quote_id = q.id
			  LEFT JOIN quote_versions av ON av.id = a.version_id
			  LEFT JOIN LATERAL (SELECT av.result->'options'->a.option_index AS o WHERE a.decision = 'approved') opt ON true
			  LEFT JOIN LATERAL (
			       SELECT sum((l->>'sell')::numeric) FILTER (WHERE l->>'category' = 'parts') AS parts_sell,
			              sum((l->>'cost')::numeric) FILTER (WHERE l->>'category' = 'parts') AS parts_cost,
			              sum((l->>'sell')::numeric) FILTER (WHERE l->>'category' = 'labour') AS labour_sell,
			              sum((l->>'cost')::numeric) FILTER (WHERE l->>'category' = 'labour') AS labour_cost,
			              sum((l->>'quantity')::numeric) FILTER (WHERE l->>'kind' = 'labour') AS billed_hours
			         FROM (SELECT jsonb_path_query(opt.o, '$.lines[*]') AS l
			               UNION ALL SELECT jsonb_path_query(opt.o, '$.staged.stages[*].lines[*]')) all_lines) lines ON opt.o IS NOT NULL
			  LEFT JOIN LATERAL (
			       SELECT sum(t.hours) AS hours, jsonb_object_agg(t.technician_id, t.hours) AS by_technician
			         FROM (SELECT l.technician_id, sum(l.hours) AS hours FROM job_labour l WHERE l.job_id = j.id GROUP BY l.technician_id) t) lab ON true
			  LEFT JOIN LATERAL (SELECT sum(p.line_cost) AS cost FROM job_extra_parts p WHERE p.job_id = j.id) extra ON true
			ON CONFLICT (job_id) DO UPDATE SET
				quote_id = EXCLUDED.quote_id, job_number = EXCLUDED.job_number, technician_id = EXCLUDED.technician_id,
				unit_kind = EXCLUDED.unit_kind, first_sent_at = EXCLUDED.first_sent_at, versions_sent = EXCLUDED.versions_sent,
				decision = EXCLUDED.decision, decided_at = EXCLUDED.decided_at, outcome = EXCLUDED.outcome,
				option_label = EXCLUDED.option_label, currency = EXCLUDED.currency, minor_digits = EXCLUDED.minor_digits,
				revenue = EXCLUDED.revenue, cost = EXCLUDED.cost, gross_profit = EXCLUDED.gross_profit,
				parts_sell = EXCLUDED.parts_sell, parts_cost = EXCLUDED.parts_cost, labour_sell = EXCLUDED.labour_sell,
				labour_cost = EXCLUDED.labour_cost, billed_hours = EXCLUDED.billed_hours, labour_cost_rate = EXCLUDED.labour_cost_rate,
				actual_hours = EXCLUDED.actual_hours, technician_hours = EXCLUDED.technician_hours,
				extra_parts_cost = EXCLUDED.extra_parts_cost, refreshed_at = EXCLUDED.refreshed_at;
		$fn$;

		-- The entry point: the jobs' rows, then the days they counted in before and after.
		CREATE FUNCTION report_refresh_jobs(job_ids uuid[]) RETURNS void LANGUAGE plpgsql AS $fn$
		DECLARE
			before_shops uuid[];
			before_days date[];
			all_shops uuid[];
			all_days date[];
		BEGIN
			SELECT array_agg(k.shop_id), array_agg(k.month) INTO before_shops, before_days
			  FROM (SELECT DISTINCT o.shop_id, m.month
			          FROM job_outcomes o JOIN unnest(job_ids) AS i(job_id) ON o.job_id = i.job_id
			          CROSS JOIN LATERAL (VALUES (report_day(o.first_sent_at)), (report_day(o.decided_at))) AS m(month)
			         WHERE m.month IS NOT NULL) k;
			PERFORM report_upsert_outcomes(job_ids);
			SELECT array_agg(k.shop_id), array_agg(k.month) INTO all_shops, all_days
			  FROM (SELECT o.shop_id, m.month
			          FROM job_outcomes o JOIN unnest(job_ids) AS i(job_id) ON o.job_id = i.job_id
			          CROSS JOIN LATERAL (VALUES (report_day(o.first_sent_at)), (report_day(o.decided_at))) AS m(month)
			         WHERE m.month IS NOT NULL
			        UNION
			        SELECT * FROM unnest(before_shops, before_days)) k;
			IF all_shops IS NOT NULL THEN PERFORM report_rollup(all_shops, all_days); END IF;
		END $fn$;

		-- Statement-level, so a bulk insert refreshes its jobs in one pass. A bulk load may SET LOCAL
		-- mendwise.defer_reports = 'on' and call report_refresh_jobs once at its end instead.
		CREATE FUNCTION report_refresh_by_quote() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			IF current_setting('mendwise.defer_reports', true) = 'on' THEN RETURN NULL; END IF;
			PERFORM report_refresh_jobs(ARRAY(SELECT DISTINCT q.job_id FROM changed c JOIN quotes q ON q.id = c.quote_id));
			RETURN NULL;
		END $fn$;
		CREATE FUNCTION report_refresh_by_job() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			IF current_setting('mendwise.defer_reports', true) = 'on' THEN RETURN NULL; END IF;
			PERFORM report_refresh_jobs(ARRAY(SELECT DISTINCT c.job_id FROM changed c));
			RETURN NULL;
		END $fn$;
		CREATE FUNCTION report_refresh_job_row() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			IF current_setting('mendwise.defer_reports', true) = 'on' THEN RETURN NULL; END IF;
			PERFORM report_refresh_jobs(ARRAY[NEW.id]);
			RETURN NULL;
		END $fn$;
		CREATE FUNCTION report_refresh_unit_row() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			IF current_setting('mendwise.defer_reports', true) = 'on' THEN RETURN NULL; END IF;
			PERFORM report_refresh_jobs(ARRAY(SELECT j.id FROM jobs j WHERE j.unit_id = NEW.id));
			RETURN NULL;
		END $fn$;

		CREATE TRIGGER job_outcomes_versions AFTER INSERT ON quote_versions
			REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_quote();
		CREATE TRIGGER job_outcomes_versions_gone AFTER DELETE ON quote_versions
			REFERENCING OLD TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_quote();
		CREATE TRIGGER job_outcomes_approvals AFTER INSERT ON approvals
			REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_quote();
		CREATE TRIGGER job_outcomes_approvals_changed AFTER UPDATE ON approvals
			REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_quote();
		CREATE TRIGGER job_outcomes_approvals_gone AFTER DELETE ON approvals
			REFERENCING OLD TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_quote();
		CREATE TRIGGER job_outcomes_labour AFTER INSERT ON job_labour
			REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_job();
		CREATE TRIGGER job_outcomes_labour_changed AFTER UPDATE ON job_labour
			REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_job();
		CREATE TRIGGER job_outcomes_labour_gone AFTER DELETE ON job_labour
			REFERENCING OLD TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_job();
		CREATE TRIGGER job_outcomes_parts AFTER INSERT ON job_extra_parts
			REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_job();
		CREATE TRIGGER job_outcomes_parts_changed AFTER UPDATE ON job_extra_parts
			REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_job();
		CREATE TRIGGER job_outcomes_parts_gone AFTER DELETE ON job_extra_parts
			REFERENCING OLD TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION report_refresh_by_job();
		CREATE TRIGGER job_outcomes_job_moved AFTER UPDATE OF technician_id, unit_id ON jobs
			FOR EACH ROW WHEN (OLD.technician_id IS DISTINCT FROM NEW.technician_id OR OLD.unit_id IS DISTINCT FROM NEW.unit_id)
			EXECUTE FUNCTION report_refresh_job_row();
		CREATE TRIGGER job_outcomes_unit_kind AFTER UPDATE OF kind ON units
			FOR EACH ROW WHEN (OLD.kind IS DISTINCT FROM NEW.kind)
			EXECUTE FUNCTION report_refresh_unit_row();

		-- Quotes sent before this migration.
		SELECT report_refresh_jobs(ARRAY(SELECT job_id FROM quotes));
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		DROP TRIGGER job_outcomes_versions ON quote_versions;
		DROP TRIGGER job_outcomes_versions_gone ON quote_versions;
		DROP TRIGGER job_outcomes_approvals ON approvals;
		DROP TRIGGER job_outcomes_approvals_changed ON approvals;
		DROP TRIGGER job_outcomes_approvals_gone ON approvals;
		DROP TRIGGER job_outcomes_job_moved ON jobs;
		DROP TRIGGER job_outcomes_unit_kind ON units;
		DROP VIEW report_contributions, report_technician_rows, report_job_rows;
		DROP TABLE report_technician_months, report_technician_days, report_months, report_days, job_outcomes, job_extra_parts, job_labour;
		DROP FUNCTION report_refresh_by_quote(), report_refresh_by_job(), report_refresh_job_row(), report_refresh_unit_row();
		DROP FUNCTION report_refresh_jobs(uuid[]), report_upsert_outcomes(uuid[]), report_rollup(uuid[], date[]);
		DROP FUNCTION report_month(timestamptz), report_day(timestamptz);
	`);
};
