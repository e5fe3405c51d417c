// `npm run db:backup` and `npm run db:restore` on a database of this file's own: back up a shop
// with one of everything, wipe the database, restore, and find every row as it was.
import { spawnSync } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { closeDb } from '../../src/lib/server/db/index';
import { migrate } from '../../src/lib/server/db/migrator';
import { root } from '../helpers/app';
import { buildWorld, type World } from '../helpers/world';

const superUrl = process.env.SUPER_DATABASE_URL;
const ownName = `mendwise_backup_${randomUUID().slice(0, 8)}`;
const ownUrl = (() => {
	const url = new URL(process.env.DATABASE_URL!);
	url.pathname = `/${ownName}`;
	return url.toString();
})();
const scratch = fs.mkdtempSync(path.join(os.tmpdir(), 'mendwise-backup-'));
let world: World;

async function query<T extends pg.QueryResultRow>(url: string, sql: string, values: unknown[] = []): Promise<T[]> {
	const client = new pg.Client({ connectionString: url });
	await client.connect();
	try {
		return (await client.query<T>(sql, values)).rows;
	} finally {
		await client.end();
	}
}

/** Row count and a checksum of every table, in a stable order. */
async function everyRow(): Promise<Record<string, { rows: number; sum: string | null }>> {
	const tables = await query<{ table_name: string }>(ownUrl, "SELECT table_name FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY 1");
	const out: Record<string, { rows: number; sum: string | null }> = {};
	for (const { table_name } of tables) {
		const [row] = await query<{ rows: string; sum: string | null }>(
			ownUrl,
			`SELECT count(*) AS rows, md5(string_agg(to_jsonb(t)::text, ',' ORDER BY to_jsonb(t)::text)) AS sum FROM "${table_name}" t`
		);
		out[table_name] = { rows: Number(row.rows), sum: row.sum };
	}
	return out;
}

function script(name: string, args: string[], env: Record<string, string> = {}) {
	const result = spawnSync(process.execPath, [path.join(root, 'scripts', name), ...args], {
		cwd: root, encoding: 'utf8', env: { ...process.env, DATABASE_URL: ownUrl, ...env }, stdio: ['ignore', 'pipe', 'pipe']
	});
	return { status: result.status, output: `${result.stdout}${result.stderr}` };
}

beforeAll(async () => {
	if (!superUrl) throw new Error('This test makes a database of its own: run it with `npm test`, which sets SUPER_DATABASE_URL.');
	const role = decodeURIComponent(new URL(process.env.DATABASE_URL!).username);
	await query(superUrl, `CREATE DATABASE "${ownName}" OWNER "${role}"`);
	vi.stubEnv('DATABASE_URL', ownUrl);
	await migrate();
	world = await buildWorld('Backup');
	await closeDb();
}, 120_000);

afterAll(async () => {
	await closeDb();
	vi.unstubAllEnvs();
	fs.rmSync(scratch, { recursive: true, force: true });
	if (superUrl) await query(superUrl, `DROP DATABASE IF EXISTS "${ownName}" WITH (FORCE)`).catch(() => {});
});

describe('backup and restore', () => {
	it('a backup, a wiped database and a restore give back every row', async () => {
		const before = await everyRow();
		expect(Object.keys(before).length).toBeGreaterThan(15);
		expect(before.jobs.rows).toBeGreaterThanOrEqual(3);
		expect(before.quote_versions.rows).toBeGreaterThanOrEqual(2);
		expect(before.photos.rows).toBe(1);

		const file = path.join(scratch, 'shop.dump');
		const backup = script('db-backup.mjs', [file]);
		expect(backup.status, backup.output).toBe(0);
		expect(fs.statSync(file).size).toBeGreaterThan(1_000);
		// The custom format's signature; the password never reaches the output.
		expect(fs.readFileSync(file).subarray(0, 5).toString()).toBe('PGDMP');
		expect(backup.output).not.toContain(decodeURIComponent(new URL(ownUrl).password));

		await query(ownUrl, 'DROP SCHEMA public CASCADE');
		await query(ownUrl, 'CREATE SCHEMA public');
		expect(Object.keys(await everyRow())).toEqual([]);

		const restore = script('db-restore.mjs', [file]);
		expect(restore.status, restore.output).toBe(0);
		expect(await everyRow()).toEqual(before);
		const [photo] = await query<{ caption: string; bytes: number }>(ownUrl, 'SELECT caption, octet_length(data) AS bytes FROM photos');
		expect(photo.caption).toBe(`Photo ${world.marker}`);
		expect(photo.bytes).toBeGreaterThan(100);
	}, 120_000);

	it('restoring over live data puts the backed-up rows back and keeps the schema usable', async () => {
		const file = path.join(scratch, 'again.dump');
		expect(script('db-backup.mjs', [file]).status).toBe(0);
		const before = await everyRow();
		await query(ownUrl, 'DELETE FROM audit_events');
		await query(ownUrl, "UPDATE customers SET name = 'Overwritten'");
		const restore = script('db-restore.mjs', [file]);
		expect(restore.status, restore.output).toBe(0);
		expect(await everyRow()).toEqual(before);
		// The migration history came back too: the migrator has nothing left to do.
		vi.stubEnv('DATABASE_URL', ownUrl);
		expect(await migrate()).toEqual([]);
		await closeDb();
	}, 120_000);

	it('without a path the backup goes to .data/backups/<timestamp>.dump, and restore takes the newest', async () => {
		const dataDir = path.join(scratch, 'data');
		const made = script('db-backup.mjs', [], { MENDWISE_DATA_DIR: dataDir });
		expect(made.status, made.output).toBe(0);
		const files = fs.readdirSync(path.join(dataDir, 'backups'));
		expect(files).toHaveLength(1);
		expect(files[0]).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}-\d{2}-\d{2}-\d{3}Z\.dump$/);
		const restored = script('db-restore.mjs', [], { MENDWISE_DATA_DIR: dataDir });
		expect(restored.status, restored.output).toBe(0);
		expect(restored.output).toContain(files[0]);
	}, 120_000);

	it('a missing backup file is a clear failure that changes nothing', async () => {
		const before = await everyRow();
		const reply = script('db-restore.mjs', [path.join(scratch, 'nope.dump')]);
		expect(reply.status).toBe(1);
		expect(reply.output).toContain('no such backup file');
		expect(await everyRow()).toEqual(before);
	});
});
