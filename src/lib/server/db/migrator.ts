import type { Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug, type MigrationFn } from 'umzug';
import { db } from './index';
import * as foundation from './migrations/20261202-0001-foundation';
import * as customers from './migrations/20261202-0002-customers';
import * as shopData from './migrations/20261202-0003-shop-data';
import * as outbox from './migrations/20261202-0004-outbox';
import * as quotes from './migrations/20261202-0005-quotes';
import * as payments from './migrations/20261202-0006-payments';
import * as reports from './migrations/20261202-0007-reports';
import * as boardCounts from './migrations/20261202-0008-board-counts';
import * as rollupDays from './migrations/20261202-0009-report-rollup-days';
import * as ageCounts from './migrations/20261202-0010-board-age-counts';
import * as searchWalk from './migrations/20261202-0011-board-search-walk';
import * as repairTimestamps from './migrations/20261202-0012-repair-timestamps';
import * as technicianShares from './migrations/20261202-0013-technician-shares';
import * as statusOrder from './migrations/20261202-0014-board-status-order';
import * as boardIndexChanges from './migrations/20261202-0015-board-index-changes';

export type Migration = MigrationFn<Sequelize>;

// Listed statically so the same list runs under tsx, in tests and from the built server.
const migrations: { name: string; module: { up: Migration; down: Migration } }[] = [
	{ name: '20261202-0001-foundation', module: foundation },
	{ name: '20261202-0002-customers', module: customers },
	{ name: '20261202-0003-shop-data', module: shopData },
	{ name: '20261202-0004-outbox', module: outbox },
	{ name: '20261202-0005-quotes', module: quotes },
	{ name: '20261202-0006-payments', module: payments },
	{ name: '20261202-0007-reports', module: reports },
	{ name: '20261202-0008-board-counts', module: boardCounts },
	{ name: '20261202-0009-report-rollup-days', module: rollupDays },
	{ name: '20261202-0010-board-age-counts', module: ageCounts },
	{ name: '20261202-0011-board-search-walk', module: searchWalk },
	{ name: '20261202-0012-repair-timestamps', module: repairTimestamps },
	{ name: '20261202-0013-technician-shares', module: technicianShares },
	{ name: '20261202-0014-board-status-order', module: statusOrder },
	{ name: '20261202-0015-board-index-changes', module: boardIndexChanges }
];

export function migrator(sequelize: Sequelize = db()) {
	return new Umzug({
		migrations: migrations.map(({ name, module }) => ({ name, up: module.up, down: module.down })),
		context: sequelize,
		storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
		logger: undefined
	});
}

export async function migrate(): Promise<string[]> {
	const done = await migrator().up();
	return done.map((m) => m.name);
}
