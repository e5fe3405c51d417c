import type { Migration } from '../migrator';

/*
 * A board sorted by status follows a job's path through the shop (checked in, diagnosing, quoted,
 * approved, declined, in repair, ready, picked up), not the alphabet of the status names. The rank
 * is a stored column kept by PostgreSQL itself, and the status sort index is keyed on it, so the
 * walk along it stays an index walk. The order here is that of JOB_STATUSES in src/lib/domain.ts
 * (a test holds the two together).
 */
const RANK = `CASE status WHEN 'checked_in' THEN 1 WHEN 'diagnosing' THEN 2 WHEN 'quoted' THEN 3 WHEN 'approved' THEN 4
	WHEN 'declined' THEN 5 WHEN 'in_repair' THEN 6 WHEN 'ready' THEN 7 WHEN 'picked_up' THEN 8 END`;
const CARRIED = 'search_text, technician_id, created_at, status_changed_at';

export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		ALTER TABLE jobs ADD COLUMN status_rank smallint GENERATED ALWAYS AS (${RANK}) STORED;
		DROP INDEX jobs_status_sort_idx;
		CREATE INDEX jobs_status_sort_idx ON jobs (shop_id, status_rank, id) INCLUDE (status, ${CARRIED});
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		DROP INDEX jobs_status_sort_idx;
		ALTER TABLE jobs DROP COLUMN status_rank;
		CREATE INDEX jobs_status_sort_idx ON jobs (shop_id, status, id) INCLUDE (${CARRIED});
	`);
};
