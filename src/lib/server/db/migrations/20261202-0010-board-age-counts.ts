import type { Migration } from '../migrator';

/*
 * The board's age filters ("opened in the last N days", "waiting over 14 days") count their first
 * matches per status. With the status carried in the index those counts are read from the index
 * alone, not from a table row per match.
 */
export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		DROP INDEX jobs_opened_idx, jobs_changed_idx;
		CREATE INDEX jobs_opened_idx ON jobs (shop_id, created_at, id) INCLUDE (status);
		CREATE INDEX jobs_changed_idx ON jobs (shop_id, status_changed_at, id) INCLUDE (status);
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		DROP INDEX jobs_opened_idx, jobs_changed_idx;
		CREATE INDEX jobs_opened_idx ON jobs (shop_id, created_at, id);
		CREATE INDEX jobs_changed_idx ON jobs (shop_id, status_changed_at, id);
	`);
};
