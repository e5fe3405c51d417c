// Shared by `npm run db:backup` and `npm run db:restore`: which database, and PostgreSQL's client
// programs with the password passed in the environment (never on the command line).
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { dataDir, database, ensureDependencies, postgresBinDir } from './bootstrap.mjs';

export const backupDir = path.join(dataDir, 'backups');

/** DATABASE_URL when set, else the project-local database (its cluster started for the chore). */
export async function targetDatabase() {
	if (!process.env.DATABASE_URL) ensureDependencies();
	const { url, cluster } = await database({ name: 'pg', dbName: 'mendwise', durable: true });
	return { url, stop: () => cluster?.stop() };
}

/** pg_dump / pg_restore: the newest local PostgreSQL's, else the one on PATH. */
export function tool(name) {
	const bin = postgresBinDir();
	const local = bin && path.join(bin, name);
	return local && fs.existsSync(local) ? local : name;
}

/** The URL without its password, and the environment that carries the password instead. */
export function connection(url) {
	const parsed = new URL(url);
	const password = decodeURIComponent(parsed.password);
	parsed.password = '';
	return { dbname: parsed.toString(), env: { ...process.env, ...(password ? { PGPASSWORD: password } : {}) } };
}

export function runTool(name, args, env) {
	const result = spawnSync(tool(name), args, { stdio: ['ignore', 'inherit', 'inherit'], env });
	if (result.error) throw new Error(`${name} could not run (${result.error.message}). Install PostgreSQL's client programs.`);
	if (result.status !== 0) throw new Error(`${name} failed (exit ${result.status ?? result.signal})`);
}

/** Where a URL points, for messages: host, port and database, never the password. */
export function describe(url) {
	const parsed = new URL(url);
	return `${parsed.hostname}:${parsed.port || 5432}${parsed.pathname}`;
}
