#!/usr/bin/env node
// `npm run db:backup [-- file]`: a pg_dump of the app's database in PostgreSQL's custom format
// (compressed, restorable table by table) into .data/backups/<timestamp>.dump, or into the given
// file. The database is DATABASE_URL when set, else the project-local one.
import fs from 'node:fs';
import path from 'node:path';
import { log } from './lib/bootstrap.mjs';
import { backupDir, connection, describe, runTool, targetDatabase } from './lib/pg-tools.mjs';

const [given] = process.argv.slice(2).filter((a) => !a.startsWith('--'));
const stamp = new Date().toISOString().replace(/[:.]/g, '-');
const file = path.resolve(given ?? path.join(backupDir, `${stamp}.dump`));

const target = await targetDatabase();
try {
	fs.mkdirSync(path.dirname(file), { recursive: true });
	const partial = `${file}.partial`;
	const { dbname, env } = connection(target.url);
	log(`backing up ${describe(target.url)}`);
	runTool('pg_dump', ['--format=custom', '--compress=6', '--no-owner', '--no-privileges', `--file=${partial}`, `--dbname=${dbname}`], env);
	// Only a complete dump takes the final name, so a half-written file is never mistaken for a backup.
	fs.renameSync(partial, file);
	log(`backup written: ${file} (${(fs.statSync(file).size / 1024).toFixed(1)} KB)`);
} catch (e) {
	console.error(`[mendwise] backup failed: ${e instanceof Error ? e.message : e}`);
	process.exitCode = 1;
} finally {
	target.stop();
}
