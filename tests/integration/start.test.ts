// `npm start` end to end on its own data folder: a cluster on 127.0.0.1 only, durable, the demo
// owner can sign in, Ctrl+C stops everything, and a second start keeps every row.
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { Client } from '../helpers/client';
import { freePort, root } from '../helpers/app';

const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'mendwise-start-'));
fs.chmodSync(dataDir, 0o755);
let current: ChildProcess | undefined;

function start(port: number): Promise<{ output: string }> {
	const env: NodeJS.ProcessEnv = { ...process.env, MENDWISE_DATA_DIR: dataDir, PORT: String(port), MENDWISE_SKIP_BUILD: "1" };
	delete env.DATABASE_URL;
	delete env.ORIGIN;
	const child = spawn(process.execPath, [path.join(root, 'scripts', 'start.mjs')], { env, cwd: root });
	current = child;
	let output = '';
	return new Promise((resolve, reject) => {
		const timer = setTimeout(() => reject(new Error(`npm start did not come up:\n${output}`)), 90_000);
		const onData = (chunk: Buffer) => {
			output += chunk.toString();
			if (output.includes('Mendwise is running at')) {
				clearTimeout(timer);
				resolve({ output });
			}
		};
		child.stdout.on('data', onData);
		child.stderr.on('data', onData);
		child.once('exit', (code) => {
			clearTimeout(timer);
			reject(new Error(`npm start exited early (${code}):\n${output}`));
		});
	});
}

function interrupt(): Promise<number | null> {
	const child = current!;
	return new Promise((resolve) => {
		child.removeAllListeners('exit');
		child.once('exit', (code) => resolve(code));
		child.kill('SIGINT');
	});
}

afterAll(async () => {
	if (current && current.exitCode === null) await interrupt();
	fs.rmSync(dataDir, { recursive: true, force: true });
});

describe('npm start', () => {
	it('serves sign-in, keeps rows across a restart, and listens on loopback only', { timeout: 240_000 }, async () => {
		const port = await freePort();
		const first = await start(port);
		const base = `http://127.0.0.1:${port}`;
		expect(first.output).toContain(`Mendwise is running at ${base}`);
		const signIns = JSON.parse(fs.readFileSync(path.join(dataDir, 'demo-sign-ins.json'), 'utf8'));
		const owner = signIns.find((s: { role: string }) => s.role === 'owner');
		expect(first.output).toContain(owner.email);
		expect(first.output).toContain(owner.password);

		expect((await new Client(base).get('/signin')).status).toBe(200);
		const client = new Client(base);
		await client.signIn(owner.email, owner.password);
		const invited = 'kept.across.restart@shop.example';
		expect((await client.form('/team?/invite', { email: invited, role: 'writer' })).status).toBe(200);

		const meta = JSON.parse(fs.readFileSync(path.join(dataDir, 'pg.json'), 'utf8'));
		const admin = new pg.Client({ host: '127.0.0.1', port: meta.port, user: 'postgres', password: meta.password, database: 'mendwise' });
		await admin.connect();
		const settings = await admin.query(
			"SELECT name, setting FROM pg_settings WHERE name IN ('listen_addresses', 'fsync', 'synchronous_commit')"
		);
		// The demo tells one consistent story: a job past "quoted" has an estimate the customer answered.
		const unanswered = await admin.query(`
			SELECT count(*)::int AS n FROM jobs j
			 WHERE (j.status IN ('approved', 'in_repair', 'ready') AND NOT EXISTS (
			         SELECT 1 FROM quotes q JOIN approvals a ON a.quote_id = q.id WHERE q.job_id = j.id AND a.decision = 'approved'))
			    OR (j.status = 'quoted' AND NOT EXISTS (SELECT 1 FROM quotes q WHERE q.job_id = j.id AND q.sent_versions > 0))`);
		expect(unanswered.rows[0].n).toBe(0);
		// ...and a unit handed back after an approval was paid for in full, to the cent of its estimate.
		const paid = await admin.query(`
			SELECT count(*)::int AS jobs,
			       count(*) FILTER (WHERE (v.result->'options'->a.option_index->>'authorised')::numeric
			         <> coalesce((SELECT sum(p.amount) FROM payments p WHERE p.job_id = j.id AND p.status = 'paid'), 0))::int AS unsettled
			  FROM jobs j JOIN quotes q ON q.job_id = j.id JOIN approvals a ON a.quote_id = q.id AND a.decision = 'approved'
			  JOIN quote_versions v ON v.id = a.version_id
			 WHERE j.status = 'picked_up'`);
		expect(paid.rows[0].jobs).toBeGreaterThan(0);
		expect(paid.rows[0].unsettled).toBe(0);
		await admin.end();
		const byName = Object.fromEntries(settings.rows.map((r) => [r.name, r.setting]));
		expect(byName).toEqual({ listen_addresses: '127.0.0.1', fsync: 'on', synchronous_commit: 'on' });

		expect(await interrupt()).toBe(0);
		await expect(fetch(`${base}/api/health`)).rejects.toThrow();

		const second = await start(port);
		expect(second.output).toContain('PostgreSQL listening');
		expect(second.output).not.toContain('creating PostgreSQL cluster');
		const again = new Client(base);
		await again.signIn(owner.email, owner.password);
		expect((await again.get('/team')).text).toContain(invited);
		expect(await interrupt()).toBe(0);
	});
});
