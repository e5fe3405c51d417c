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
		-- Decisions in a period (margin, revenue, outcomes, days to approval, technicians, margin lost).
		CREATE INDEX job_outcomes_decided_idx ON job_outcomes (shop_id, decided_at) WHERE decided_at IS NOT NULL;
		CREATE INDEX job_outcomes_tech_decided_idx ON job_outcomes (shop_id, technician_id, decided_at) WHERE decided_at IS NOT NULL;
		CREATE INDEX job_outcomes_kind_decided_idx ON job_outcomes (shop_id, unit_kind, decided_at) WHERE decided_at IS NOT NULL;
		-- Quotes first sent in a period (approval rate).
		CREATE INDEX job_outcomes_sent_idx ON job_outcomes (shop_id, first_sent_at);
		CREATE INDEX job_outcomes_tech_sent_idx ON job_outcomes (shop_id, technician_id, first_sent_at);
		CREATE INDEX job_outcomes_kind_sent_idx ON job_outcomes (shop_id, unit_kind, first_sent_at);

		-- Recomputes the report row of each given job from its sources; jobs never quoted get none.
		CREATE FUNCTION report_refresh_jobs(job_ids uuid[]) RETURNS void LANGUAGE sql AS $fn$
			DELETE FROM job_outcomes o
			 WHERE o.job_id = ANY(job_ids)
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
			  FROM quotes q
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
			 WHERE q.job_id = ANY(job_ids)
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

		-- Statement-level, so a bulk insert refreshes its jobs in one set-based pass.
		CREATE FUNCTION report_refresh_by_quote() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			PERFORM report_refresh_jobs(ARRAY(SELECT DISTINCT q.job_id FROM changed c JOIN quotes q ON q.id = c.quote_id));
			RETURN NULL;
		END $fn$;
		CREATE FUNCTION report_refresh_by_job() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			PERFORM report_refresh_jobs(ARRAY(SELECT DISTINCT c.job_id FROM changed c));
			RETURN NULL;
		END $fn$;
		CREATE FUNCTION report_refresh_job_row() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			PERFORM report_refresh_jobs(ARRAY[NEW.id]);
			RETURN NULL;
		END $fn$;
		CREATE FUNCTION report_refresh_unit_row() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
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
		DROP TABLE job_outcomes, job_extra_parts, job_labour;
		DROP FUNCTION report_refresh_by_quote(), report_refresh_by_job(), report_refresh_job_row(), report_refresh_unit_row();
		DROP FUNCTION report_refresh_jobs(uuid[]);
	`);
};
