import type { Migration } from '../migrator';

/*
 * The job board's counts per status, kept by triggers so the board never counts a shop's whole
 * history on each request: one row per (shop, technician or none, status). Statement-level
 * triggers with transition tables turn a bulk insert or update into one upsert; rows are written
 * in key order so two transactions never wait on each other in opposite orders.
 *
 * Also: every sort key of the board gets an index in the shape (shop, key, id), so a page in
 * either direction is a walk along one index, not a sort of the shop's jobs.
 */
const NO_TECHNICIAN = `'00000000-0000-0000-0000-000000000000'::uuid`;

export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		CREATE TABLE job_status_counts (
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			technician_key uuid NOT NULL,
			status varchar(20) NOT NULL,
			n integer NOT NULL,
			PRIMARY KEY (shop_id, technician_key, status)
		);

		CREATE FUNCTION job_counts_add(deltas jsonb) RETURNS void LANGUAGE sql AS $fn$
			INSERT INTO job_status_counts AS c (shop_id, technician_key, status, n)
			SELECT d.shop_id, d.technician_key, d.status, d.n
			  FROM jsonb_to_recordset(deltas) AS d(shop_id uuid, technician_key uuid, status varchar, n int)
			 WHERE d.n <> 0
			 ORDER BY d.shop_id, d.technician_key, d.status
			ON CONFLICT (shop_id, technician_key, status) DO UPDATE SET n = c.n + EXCLUDED.n;
		$fn$;

		CREATE FUNCTION job_counts_inserted() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			PERFORM job_counts_add((SELECT jsonb_agg(x) FROM (
				SELECT shop_id, coalesce(technician_id, ${NO_TECHNICIAN}) AS technician_key, status, count(*) AS n
				  FROM added GROUP BY 1, 2, 3) x));
			RETURN NULL;
		END $fn$;

		CREATE FUNCTION job_counts_updated() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			PERFORM job_counts_add((SELECT jsonb_agg(x) FROM (
				SELECT d.shop_id, d.technician_key, d.status, sum(d.n) AS n
				  FROM added a JOIN removed r ON r.id = a.id
				 CROSS JOIN LATERAL (VALUES (a.shop_id, coalesce(a.technician_id, ${NO_TECHNICIAN}), a.status, 1),
				                            (r.shop_id, coalesce(r.technician_id, ${NO_TECHNICIAN}), r.status, -1))
				       AS d(shop_id, technician_key, status, n)
				 WHERE (a.status, a.technician_id, a.shop_id) IS DISTINCT FROM (r.status, r.technician_id, r.shop_id)
				 GROUP BY 1, 2, 3) x));
			RETURN NULL;
		END $fn$;

		-- Only lowers rows that exist: when a whole shop goes, its counts have gone with it.
		CREATE FUNCTION job_counts_deleted() RETURNS trigger LANGUAGE plpgsql AS $fn$
		BEGIN
			UPDATE job_status_counts c SET n = c.n - d.n
			  FROM (SELECT shop_id, coalesce(technician_id, ${NO_TECHNICIAN}) AS technician_key, status, count(*) AS n
			          FROM removed GROUP BY 1, 2, 3 ORDER BY 1, 2, 3) d
			 WHERE c.shop_id = d.shop_id AND c.technician_key = d.technician_key AND c.status = d.status;
			RETURN NULL;
		END $fn$;

		CREATE TRIGGER job_counts_insert AFTER INSERT ON jobs REFERENCING NEW TABLE AS added
			FOR EACH STATEMENT EXECUTE FUNCTION job_counts_inserted();
		CREATE TRIGGER job_counts_update AFTER UPDATE ON jobs REFERENCING OLD TABLE AS removed NEW TABLE AS added
			FOR EACH STATEMENT EXECUTE FUNCTION job_counts_updated();
		CREATE TRIGGER job_counts_delete AFTER DELETE ON jobs REFERENCING OLD TABLE AS removed
			FOR EACH STATEMENT EXECUTE FUNCTION job_counts_deleted();

		INSERT INTO job_status_counts (shop_id, technician_key, status, n)
		SELECT shop_id, coalesce(technician_id, ${NO_TECHNICIAN}), status, count(*) FROM jobs GROUP BY 1, 2, 3;

		DROP INDEX jobs_board_idx;
		CREATE INDEX jobs_opened_idx ON jobs (shop_id, created_at, id);
		CREATE INDEX jobs_status_sort_idx ON jobs (shop_id, status, id);
		CREATE INDEX jobs_number_sort_idx ON jobs (shop_id, number) INCLUDE (id);
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		DROP INDEX jobs_number_sort_idx, jobs_status_sort_idx, jobs_opened_idx;
		CREATE INDEX jobs_board_idx ON jobs (shop_id, created_at DESC, id);
		DROP TRIGGER job_counts_insert ON jobs;
		DROP TRIGGER job_counts_update ON jobs;
		DROP TRIGGER job_counts_delete ON jobs;
		DROP FUNCTION job_counts_inserted(), job_counts_updated(), job_counts_deleted(), job_counts_add(jsonb);
		DROP TABLE job_status_counts;
	`);
};
