#!/usr/bin/env node
// `npm run bench:reports`: every report API on the 100,000-job volume shop at 8 concurrent requests,
// beside a trivial JSON route of the same server. Goal: p95 under 150 ms for each report.
import fs from 'node:fs';
import path from 'node:path';
import { benchServer, measure, printTable } from './lib/bench.mjs';
import { dataDir, log } from './lib/bootstrap.mjs';

const seconds = Number(process.env.BENCH_SECONDS ?? 5);
const connections = 8;
const goal = 150;
const REPORTS = ['revenue', 'margin', 'approval', 'outcomes', 'outcomes-by-kind', 'days-to-approval', 'technicians', 'margin-lost'];

const server = await benchServer();
try {
	// A technician and a kind of unit to filter by, read from the API itself.
	const probe = await fetch(`${server.origin}/api/reports/technicians`, { headers: { cookie: server.cookie } });
	if (!probe.ok) throw new Error(`the report API answered ${probe.status}; is the volume shop loaded?`);
	const technician = (await probe.json()).rows.find((row) => row.technicianId)?.technicianId;
	const today = new Date();
	const day = (d) => d.toISOString().slice(0, 10);
	const yearAgo = day(new Date(Date.UTC(today.getUTCFullYear() - 1, today.getUTCMonth(), today.getUTCDate())));
	const eighteenMonths = day(new Date(Date.UTC(today.getUTCFullYear(), today.getUTCMonth() - 18, 1)));
	const routes = ['/api/ping'];
	for (const name of REPORTS) {
		routes.push(`/api/reports/${name}`); // the page's default: twelve months to today
	}
	for (const name of ['margin', 'technicians', 'days-to-approval']) {
		routes.push(`/api/reports/${name}?from=${eighteenMonths}&to=${day(today)}`); // all of the history
		routes.push(`/api/reports/${name}?from=${yearAgo}&to=${day(today)}&technician=${technician}&kind=portable`); // mid-month start, both filters
	}
	const rows = [];
	for (const route of routes) {
		rows.push(await measure({ origin: server.origin, cookie: server.cookie, path: route, connections, seconds }));
	}
	printTable(rows, goal);
	const over = rows.filter((r) => r.route !== '/api/ping' && r.p95 > goal);
	const failed = rows.filter((r) => r.errors + r.non2xx > 0);
	log(over.length ? `${over.length} report queries over the ${goal} ms p95 goal` : `every report query under the ${goal} ms p95 goal`);
	if (failed.length) log(`${failed.length} routes answered with errors`);
	fs.writeFileSync(path.join(dataDir, 'bench-reports.json'), JSON.stringify({ at: new Date().toISOString(), connections, seconds, rows }, null, 2));
} finally {
	await server.stop();
}
