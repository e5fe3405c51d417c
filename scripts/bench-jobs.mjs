#!/usr/bin/env node
// `npm run bench:jobs`: the job board API on 100,000 jobs at 16 concurrent requests, beside a
// trivial JSON route of the same server. Goal: p95 under 50 ms for every filter and sort.
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { benchServer, measure, printTable } from './lib/bench.mjs';
import { dataDir, log } from './lib/bootstrap.mjs';

const seconds = Number(process.env.BENCH_SECONDS ?? 5);
const connections = 16;
const server = await benchServer();
try {
	// One of the volume shop's technicians (about 11,000 jobs each), for a filtered later page.
	const client = new pg.Client({ connectionString: server.url });
	await client.connect();
	const { rows: [technician] } = await client.query("SELECT id FROM users WHERE email = 'tech1@northfield-volume.example'");
	await client.end();
	const routes = [
		'/api/ping',
		'/api/jobs',
		'/api/jobs?status=diagnosing',
		'/api/jobs?status=quoted&status=approved&sort=customer&dir=asc',
		'/api/jobs?q=penhallow',
		'/api/jobs?q=harrowgate%20no%20output&sort=unit&dir=asc',
		'/api/jobs?q=penhallow&sort=customer&dir=asc',
		// The hardest shape known: a word whose matches all sort near the far end of the order
		// asked for (the last first name sorted by customer, the last maker sorted by unit).
		'/api/jobs?q=linnea&sort=customer&dir=asc',
		'/api/jobs?q=tamworth&sort=unit&dir=asc',
		'/api/jobs?q=SN00123',
		'/api/jobs?tech=none&sort=promised&dir=asc',
		'/api/jobs?age=30&sort=technician',
		'/api/jobs?age=stale&sort=changed&dir=asc',
		'/api/jobs?sort=number&dir=asc&page=200',
		'/api/jobs?sort=customer&dir=desc&page=2000&per=50',
		'/api/jobs?sort=status&page=2000',
		// One technician's jobs, a later page; a two-letter search (in most jobs); and a deep page of
		// a search matching every job (the start of every serial number).
		`/api/jobs?tech=${technician.id}&sort=customer&dir=asc&page=40`,
		'/api/jobs?q=no',
		'/api/jobs?q=sn0&sort=number&dir=asc&page=2000'
	];
	// One unrecorded second of every route first: compiled code, the pool's connections and their
	// prepared statements are then warm for all routes, not only for those measured last.
	for (const route of routes) {
		await measure({ origin: server.origin, cookie: server.cookie, path: route, connections, seconds: 1, warmUp: 0 });
	}
	const rows = [];
	for (const route of routes) {
		rows.push(await measure({ origin: server.origin, cookie: server.cookie, path: route, connections, seconds }));
	}
	printTable(rows, 50);
	const over = rows.filter((r) => r.route !== '/api/ping' && r.p95 > 50);
	log(over.length ? `${over.length} board queries over the 50 ms p95 goal` : 'every board query under the 50 ms p95 goal');
	// What one person waits for each query over the goal, with nothing else running beside it.
	const alone = [];
	for (const r of over) alone.push(await measure({ origin: server.origin, cookie: server.cookie, path: r.route, connections: 1, seconds }));
	if (alone.length) {
		console.log('\nThe same queries one at a time (1 connection):');
		printTable(alone);
	}
	fs.writeFileSync(path.join(dataDir, 'bench-jobs.json'), JSON.stringify({ at: new Date().toISOString(), connections, seconds, rows, alone }, null, 2));
} finally {
	await server.stop();
}
