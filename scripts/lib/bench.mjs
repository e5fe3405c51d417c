// Shared by the HTTP benchmarks: a server on its own database with the volume loaded, a signed-in
// cookie, and an autocannon run that records every latency so p50/p95 are exact.
import fs from 'node:fs';
import path from 'node:path';
import {
	buildDir, database, dbTask, ensureDependencies, freePort, log, root, run, startChild, tsx, waitForHttp
} from './bootstrap.mjs';
import { percentile } from './load.mjs';

export async function benchServer({ extraEnv = {} } = {}) {
	ensureDependencies();
	const { url, superUrl, cluster } = await database({ name: 'pg-bench', dbName: 'mendwise_bench', durable: false, urlVariable: 'BENCH_DATABASE_URL' });
	dbTask('migrate', { DATABASE_URL: url, ...(superUrl ? { SUPER_DATABASE_URL: superUrl } : {}) });
	run(tsx, [path.join(root, 'scripts', 'seed-volume.ts')], { env: { ...process.env, DATABASE_URL: url } });
	if (!(process.env.MENDWISE_SKIP_BUILD === '1' && fs.existsSync(path.join(buildDir, 'index.js')))) {
		log('building');
		run(path.join(root, 'node_modules', '.bin', 'vite'), ['build', '--logLevel', 'error']);
	}
	const port = await freePort(4600);
	const origin = `http://127.0.0.1:${port}`;
	const app = startChild('app', process.execPath, [path.join(buildDir, 'index.js')], {
		env: { ...process.env, DATABASE_URL: url, PORT: String(port), HOST: '127.0.0.1', ORIGIN: origin, ...extraEnv },
		stdio: ['ignore', 'ignore', 'inherit']
	});
	await waitForHttp(`${origin}/api/health`);
	const dataDir = process.env.MENDWISE_DATA_DIR ?? path.join(root, '.data');
	const credentials = JSON.parse(fs.readFileSync(path.join(dataDir, 'volume-sign-in.json'), 'utf8'));
	const signIn = await fetch(`${origin}/signin`, {
		method: 'POST', redirect: 'manual',
		headers: { 'content-type': 'application/x-www-form-urlencoded', origin, accept: 'text/html' },
		body: new URLSearchParams(credentials)
	});
	const cookie = signIn.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
	if (signIn.status !== 303 || !cookie) throw new Error(`benchmark sign-in failed (${signIn.status})`);
	return {
		origin, cookie, url,
		async stop() {
			await app.stop();
			cluster?.stop();
		}
	};
}

/**
 * Runs one route at `connections` concurrent requests for `seconds`; exact p50/p95/p99. A second
 * of the same load first, not recorded, so compilation and fresh pool connections do not count.
 */
export async function measure({ origin, cookie, path: route, connections, seconds, method = 'GET', body, headers = {}, warmUp = 1 }) {
	const { default: autocannon } = await import('autocannon');
	if (warmUp > 0) await autocannon({ url: origin + route, connections, duration: warmUp, method, body, headers: { cookie, ...headers } });
	const latencies = [];
	let errors = 0;
	let non2xx = 0;
	const instance = autocannon({
		url: origin + route, connections, duration: seconds, method, body,
		headers: { cookie, ...headers }
	});
	instance.on('response', (_client, status, _bytes, time) => {
		latencies.push(time);
		if (status >= 400) non2xx++;
	});
	instance.on('reqError', () => errors++);
	const result = await new Promise((resolve, reject) => instance.once('done', resolve).once('error', reject));
	latencies.sort((a, b) => a - b);
	return {
		route,
		requests: latencies.length,
		rps: Math.round(latencies.length / seconds),
		p50: +percentile(latencies, 50).toFixed(1),
		p95: +percentile(latencies, 95).toFixed(1),
		p99: +percentile(latencies, 99).toFixed(1),
		errors: errors + result.errors + result.timeouts,
		non2xx
	};
}

export function printTable(rows, goalMs) {
	console.log(`\n${'route'.padEnd(72)} ${'req/s'.padStart(7)} ${'p50 ms'.padStart(7)} ${'p95 ms'.padStart(7)} ${'p99 ms'.padStart(7)} errors`);
	for (const r of rows) {
		const flag = goalMs && r.p95 > goalMs ? '  over goal' : '';
		console.log(`${r.route.slice(0, 72).padEnd(72)} ${String(r.rps).padStart(7)} ${String(r.p50).padStart(7)} ${String(r.p95).padStart(7)} ${String(r.p99).padStart(7)} ${r.errors + r.non2xx}${flag}`);
	}
}
