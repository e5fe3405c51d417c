#!/usr/bin/env node
// `npm run db:migrate | db:reset | db:seed` against DATABASE_URL or the project-local cluster.
import { database, dbTask, ensureDependencies } from './lib/bootstrap.mjs';

const command = process.argv[2];
if (!['migrate', 'reset', 'seed'].includes(command)) {
	console.error('usage: node scripts/db.mjs migrate|reset|seed');
	process.exit(2);
}
ensureDependencies();
const { url, superUrl, cluster } = await database({ name: 'pg', dbName: 'mendwise', durable: true });
try {
	dbTask(command === 'reset' ? 'reset' : command, { DATABASE_URL: url, ...(superUrl ? { SUPER_DATABASE_URL: superUrl } : {}) });
} finally {
	cluster?.stop();
}
