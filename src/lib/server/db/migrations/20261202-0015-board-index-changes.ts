import type { Migration } from '../migrator';

/*
 * What the board's in-memory index (src/lib/server/board-index.ts) reads to stay current: each job
 * row records the transaction that last wrote it, and a deleted job leaves a line saying so. A
 * reader that kept the oldest transaction still running when it last read (the xmin of its
 * snapshot) finds everything written since with one index range scan: any transaction its snapshot
 * could not see has an id at least that old. xid8 does not wrap around.
 */
export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		ALTER TABLE jobs ADD COLUMN written_by xid8;
		CREATE INDEX jobs_written_by_idx ON jobs (shop_id, written_by);
		CREATE FUNCTION jobs_written_by() RETURNS trigger LANGUAGE plpgsql AS $$
		BEGIN
			NEW.written_by := pg_current_xact_id();
			RETURN NEW;
		END $$;
		CREATE TRIGGER jobs_written_by BEFORE INSERT OR UPDATE ON jobs FOR EACH ROW EXECUTE FUNCTION jobs_written_by();

		CREATE TABLE job_deletions (
			shop_id uuid NOT NULL,
			job_id uuid NOT NULL,
			deleted_by xid8 NOT NULL DEFAULT pg_current_xact_id()
		);
		CREATE INDEX job_deletions_idx ON job_deletions (shop_id, deleted_by);
		CREATE FUNCTION jobs_deleted() RETURNS trigger LANGUAGE plpgsql AS $$
		BEGIN
			INSERT INTO job_deletions (shop_id, job_id) SELECT shop_id, id FROM gone;
			RETURN NULL;
		END $$;
		CREATE TRIGGER jobs_deleted AFTER DELETE ON jobs REFERENCING OLD TABLE AS gone
			FOR EACH STATEMENT EXECUTE FUNCTION jobs_deleted();
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		DROP TRIGGER jobs_deleted ON jobs;
		DROP FUNCTION jobs_deleted();
		DROP TABLE job_deletions;
		DROP TRIGGER jobs_written_by ON jobs;
		DROP FUNCTION jobs_written_by();
		DROP INDEX jobs_written_by_idx;
		ALTER TABLE jobs DROP COLUMN written_by;
	`);
};
