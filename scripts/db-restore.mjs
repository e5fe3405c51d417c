#!/usr/bin/env node
// `npm run db:restore [-- file] [-- --yes]`: puts a backup made by `npm run db:backup` back with
// pg_restore --clean --if-exists, in one transaction (all of it or none of it). Without a file, the
// newest in .data/backups. The database is DATABASE_URL when set, else the project-local one.
// Everything in the backup replaces what the database holds now; at a terminal it asks first.
import fs from 'node:fs';
import path from 'node:path';
import readline from 'node:readline/promises';
import { log } from './lib/bootstrap.mjs';
import { backupDir, connection, describe, runTool, targetDatabase } from './lib/pg-tools.mjs';

const args = process.argv.slice(2);
const [given] = args.filter((a) => !a.startsWith('--'));

function newestBackup() {
	const files = fs.existsSync(backupDir) ? fs.readdirSync(backupDir).filter((f) => f.endsWith('.dump')).sort() : [];
	if (!files.length) throw new Error(`no backups in ${backupDir}; make one with npm run db:backup, or name the file`);
	return path.join(backupDir, files.at(-1));
}

let target;
try {
	const file = path.resolve(given ?? newestBackup());
	if (!fs.existsSync(file)) throw new Error(`no such backup file: ${file}`);
	target = await targetDatabase();
	if (process.stdin.isTTY && !args.includes('--yes')) {
		const prompt = readline.createInterface({ input: process.stdin, output: process.stdout });
		const answer = await prompt.question(`Replace the data in ${describe(target.url)} with ${file}? Type yes: `);
		prompt.close();
		if (answer.trim() !== 'yes') throw new Error('nothing restored');
	}
	const { dbname, env } = connection(target.url);
	log(`restoring ${file} into ${describe(target.url)}`);
	runTool('pg_restore', ['--clean', '--if-exists', '--no-owner', '--no-privileges', '--single-transaction', '--exit-on-error', `--dbname=${dbname}`, file], env);
	log('restore complete');
} catch (e) {
	console.error(`[mendwise] restore failed: ${e instanceof Error ? e.message : e}`);
	process.exitCode = 1;
} finally {
	target?.stop();
}
