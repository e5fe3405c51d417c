import type { Migration } from '../migrator';

/*
 * Until this release the models gave createdAt and updatedAt one shared column definition, and
 * Sequelize wrote both to created_at: every save through a model moved a row's creation time to
 * the time of the save (a job's "opened" time to its last status change), while updated_at kept the
 * time the row was inserted. Each row gets back the earlier of the two as its creation time and the
 * later as its last change; a job takes the time of its check-in from the audit trail where that
 * is earlier still (jobs written in bulk with a back-dated opening time).
 */
const TABLES = [
	'shops', 'users', 'customers', 'units', 'spec_sheets', 'jobs', 'parts', 'labour_operations',
	'replacement_units', 'quotes', 'outbox_messages', 'payments', 'refunds'
];

export const up: Migration = async ({ context: sequelize }) => {
	for (const table of TABLES) {
		await sequelize.query(`
			UPDATE ${table} SET created_at = least(created_at, updated_at), updated_at = greatest(created_at, updated_at)
			 WHERE created_at > updated_at`);
	}
	await sequelize.query(`
		UPDATE jobs j SET created_at = f.at
		  FROM (SELECT shop_id, entity_id, min(created_at) AS at FROM audit_events
		         WHERE entity = 'job' AND action = 'job.status' GROUP BY shop_id, entity_id) f
		 WHERE f.shop_id = j.shop_id AND f.entity_id = j.id::text AND f.at < j.created_at`);
};

/** Nothing to undo: the times put back are the ones the rows were written with. */
export const down: Migration = async () => {};
