// Database chores run by `npm start`, `npm test` and the db:* scripts (under tsx).
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { closeDb, db } from '../src/lib/server/db/index';
import { migrate, migrator } from '../src/lib/server/db/migrator';
import { seedDemo, type DemoSignIn } from '../src/lib/server/demo';

const dataDir = process.env.MENDWISE_DATA_DIR ?? path.resolve(import.meta.dirname, '..', '.data');
const credentialsFile = path.join(dataDir, 'demo-sign-ins.json');

/** Creates the app's role and database on a server we administer (the local cluster). */
async function ensureDatabase(superUrl: string, appUrl: string, fresh: boolean) {
	const app = new URL(appUrl);
	const dbName = decodeURIComponent(app.pathname.slice(1));
	const role = decodeURIComponent(app.username);
	const password = decodeURIComponent(app.password);
	const client = new pg.Client({ connectionString: superUrl });
	await client.connect();
	try {
		const ident = (s: string) => '"' + s.replace(/"/g, '""') + '"';
		const literal = (s: string) => "'" + s.replace(/'/g, "''") + "'";
		const roleExists = await client.query('SELECT 1 FROM pg_roles WHERE rolname = $1', [role]);
		if (!roleExists.rowCount) await client.query(`CREATE ROLE ${ident(role)} LOGIN PASSWORD ${literal(password)}`);
		if (fresh) await client.query(`DROP DATABASE IF EXISTS ${ident(dbName)} WITH (FORCE)`);
		const dbExists = await client.query('SELECT 1 FROM pg_database WHERE datname = $1', [dbName]);
		if (!dbExists.rowCount) await client.query(`CREATE DATABASE ${ident(dbName)} OWNER ${ident(role)}`);
	} finally {
		await client.end();
	}
}

function printSignIns(signIns: DemoSignIn[]) {
	console.log('\nDemo sign-ins (invented shop "Larkspur Engine & Generator Repair"):');
	for (const s of signIns) console.log(`  ${s.role.padEnd(10)} ${s.email.padEnd(34)} ${s.password}`);
	console.log('');
}

async function main() {
	const [command] = process.argv.slice(2);
	const superUrl = process.env.SUPER_DATABASE_URL;
	const appUrl = process.env.DATABASE_URL;
	if (!appUrl) throw new Error('DATABASE_URL is not set');
	if (superUrl) await ensureDatabase(superUrl, appUrl, command === 'fresh' || command === 'reset');
	else if (command === 'reset') {
		await migrator().down({ to: 0 });
	}

	const applied = await migrate();
	if (applied.length) console.log(`[mendwise] migrations applied: ${applied.join(', ')}`);

	if (command === 'prepare' || command === 'seed' || command === 'reset') {
		const created = await seedDemo();
		if (created) {
			fs.mkdirSync(dataDir, { recursive: true });
			fs.writeFileSync(credentialsFile, JSON.stringify(created, null, 2), { mode: 0o600 });
			if (command !== 'prepare') printSignIns(created);
		} else if (command === 'prepare') {
			// npm start prints the sign-ins once the app is up.
		} else if (fs.existsSync(credentialsFile)) {
			printSignIns(JSON.parse(fs.readFileSync(credentialsFile, 'utf8')));
		} else {
			console.log('[mendwise] the demo shop exists; its passwords were printed when it was first loaded.');
		}
	}
	await closeDb();
}

main().catch(async (e) => {
	console.error(`[mendwise] database task failed: ${e instanceof Error ? e.message : e}`);
	await closeDb().catch(() => {});
	process.exit(1);
});
