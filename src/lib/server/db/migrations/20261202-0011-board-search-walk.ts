import type { Migration } from '../migrator';

/*
 * A search or age filter that matches thousands of jobs finds its page by walking the sort order
 * and keeping the matches. With every column a board filter reads carried in each sort index, that
 * walk reads index entries alone, not a table row per job it passes.
 */
// name, key columns, carried before this migration, carried after it.
const SORT_INDEXES: [string, string, string, string][] = [
	['jobs_number_sort_idx', 'shop_id, number', 'id', 'id, search_text, status, technician_id, created_at, status_changed_at'],
	['jobs_customer_sort_idx', 'shop_id, customer_name, id', '', 'search_text, status, technician_id, created_at, status_changed_at'],
	['jobs_unit_sort_idx', 'shop_id, unit_label, id', '', 'search_text, status, technician_id, created_at, status_changed_at'],
	['jobs_status_sort_idx', 'shop_id, status, id', '', 'search_text, technician_id, created_at, status_changed_at'],
	['jobs_tech_sort_idx', 'shop_id, technician_name, id', '', 'search_text, status, technician_id, created_at, status_changed_at'],
	['jobs_promised_idx', 'shop_id, promised_on, id', '', 'search_text, status, technician_id, created_at, status_changed_at'],
	['jobs_changed_idx', 'shop_id, status_changed_at, id', 'status', 'status, search_text, technician_id, created_at'],
	['jobs_opened_idx', 'shop_id, created_at, id', 'status', 'status, search_text, technician_id, status_changed_at']
];

function rebuild(after: boolean): string {
	return SORT_INDEXES.map(([name, key, before, carried]) => {
		const include = after ? carried : before;
		return `DROP INDEX ${name}; CREATE INDEX ${name} ON jobs (${key})${include ? ` INCLUDE (${include})` : ''};`;
	}).join('\n');
}

export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(rebuild(true));
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(rebuild(false));
};
