#!/usr/bin/env node
// `npm run db:migrate | db:reset | db:seed` against DATABASE_URL or the project-local cluster.
import path from 'node:path';
import { database, dbTask, ensureDependencies, root, run, tsx } from './lib/bootstrap.mjs';

const command = process.argv[2];
if (!['migrate', 'reset', 'seed', 'volume'].includes(command)) {
	console.error('usage: node scripts/db.mjs migrate|reset|seed|volume');
	process.exit(2);
}
ensureDependencies();
const { url, superUrl, cluster } = await database({ name: 'pg', dbName: 'mendwise', durable: true });
try {
	const env = { DATABASE_URL: url, ...(superUrl ? { SUPER_DATABASE_URL: superUrl } : {}) };
	if (command === 'volume') {
		dbTask('migrate', env);
		run(tsx, [path.join(root, 'scripts', 'seed-volume.ts')], { env: { ...process.env, ...env } });
	} else {
		dbTask(command, env);
	}
} finally {
	cluster?.stop();
}
