#!/usr/bin/env node
// `npm test`: the same bootstrap as `npm start` against a fresh test database, then every test
// (unit, integration against PostgreSQL and the built app, browser). Ends with "N passed, N failed".
import fs from 'node:fs';
import path from 'node:path';
import {
	dataDir, buildDir, database, dbTask, ensureDebianPackages, ensureDependencies, freePort, log, root, run,
	startChild, waitForHttp
} from './lib/bootstrap.mjs';

const stops = [];
async function stopAll() {
	for (const stop of stops.reverse()) await stop();
}
process.on('SIGINT', async () => (await stopAll(), process.exit(130)));

let exitCode = 1;
try {
	ensureDependencies();
	ensureDebianPackages([
		{ pkg: 'chromium', file: '/usr/bin/chromium' },
		{ pkg: 'poppler-utils', file: '/usr/bin/pdftotext' }
	]);
	// DATABASE_URL is never used here: the test run drops and recreates its database.
	const { url, superUrl, cluster } = await database({
		name: 'pg-test', dbName: 'mendwise_test', durable: false, urlVariable: 'TEST_DATABASE_URL'
	});
	if (cluster) stops.push(() => cluster.stop());
	dbTask(superUrl ? 'fresh' : 'migrate', { DATABASE_URL: url, ...(superUrl ? { SUPER_DATABASE_URL: superUrl } : {}) });

	log('building');
	run(path.join(root, 'node_modules', '.bin', 'vite'), ['build', '--logLevel', 'error']);

	const port = await freePort(Number(process.env.TEST_PORT ?? 4310));
	const origin = `http://127.0.0.1:${port}`;
	const appEnv = { ...process.env, DATABASE_URL: url, PORT: String(port), HOST: '127.0.0.1', ORIGIN: origin, BODY_SIZE_LIMIT: '26M' };
	const app = startChild('app', process.execPath, [path.join(buildDir, 'index.js')], {
		env: appEnv, stdio: ['ignore', 'ignore', 'inherit']
	});
	stops.push(() => app.stop());
	await waitForHttp(`${origin}/api/health`);

	const report = path.join(dataDir, 'test-report.json');
	fs.rmSync(report, { force: true });
	const vitest = path.join(root, 'node_modules', '.bin', 'vitest');
	const testEnv = {
		...process.env,
		DATABASE_URL: url,
		MENDWISE_TEST_URL: origin,
		...(superUrl ? { SUPER_DATABASE_URL: superUrl } : {}),
		...(cluster ? { PG_TEST_CLUSTER: path.join(dataDir, 'pg-test.json') } : {})
	};
	const args = ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${report}`, ...process.argv.slice(2)];
	const { spawnSync } = await import('node:child_process');
	const result = spawnSync(vitest, args, { cwd: root, stdio: 'inherit', env: testEnv });
	exitCode = result.status ?? 1;

	if (fs.existsSync(report)) {
		const summary = JSON.parse(fs.readFileSync(report, 'utf8'));
		const skipped = summary.numPendingTests + summary.numTodoTests;
		console.log(`\n${summary.numPassedTests} passed, ${summary.numFailedTests} failed${skipped ? `, ${skipped} skipped` : ''}`);
		if (summary.numFailedTests > 0 || summary.numTotalTests === 0) exitCode = exitCode || 1;
	} else {
		console.log('\n0 passed, 1 failed');
		exitCode = exitCode || 1;
	}
} catch (e) {
	console.error(`[mendwise] ${e instanceof Error ? e.message : e}`);
	console.log('\n0 passed, 1 failed');
	exitCode = 1;
} finally {
	await stopAll();
}
process.exit(exitCode);
