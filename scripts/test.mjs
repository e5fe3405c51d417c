#!/usr/bin/env node
// `npm test`: the same bootstrap as `npm start` against a fresh test database, then every test
// (unit, integration against PostgreSQL and the built app, browser). Ends with "N passed, N failed".
import fs from 'node:fs';
import path from 'node:path';
import {
	dataDir, buildDir, database, dbTask, ensureDebianPackages, ensureDependencies, freePort, log, paymentFakeEnv, root, run,
	startChild, tsx, waitForHttp
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

	// Tests always mail the local catcher, whatever SMTP_URL the shell has. Ports start at a random
	// point so parallel test runs do not reach for the same ones.
	const mailDir = path.join(dataDir, 'mail-test');
	fs.rmSync(mailDir, { recursive: true, force: true });
	const smtpPort = await freePort(20000 + Math.floor(Math.random() * 20000));
	const mailApiPort = await freePort(smtpPort + 1);
	const catcher = startChild('mail catcher', tsx, [
		path.join(root, 'scripts', 'mail-fake.ts'), '--smtp-port', String(smtpPort), '--http-port', String(mailApiPort), '--dir', mailDir
	], { stdio: ['ignore', 'ignore', 'inherit'] });
	stops.push(() => catcher.stop());
	await Promise.race([
		waitForHttp(`http://127.0.0.1:${mailApiPort}/`),
		new Promise((_, reject) => catcher.child.once('exit', (code) => reject(new Error(`the mail catcher could not start (exit ${code})`))))
	]);
	const mailEnv = { SMTP_URL: `smtp://127.0.0.1:${smtpPort}`, MAIL_CATCHER_URL: `http://127.0.0.1:${mailApiPort}` };

	// A random start keeps parallel runs from racing for the same port.
	const port = await freePort(Number(process.env.TEST_PORT ?? 4310 + Math.floor(Math.random() * 2000)));
	const origin = `http://127.0.0.1:${port}`;

	// Card payments always go to the local payment fake, whatever Stripe keys the shell has. It
	// needs the app's webhook address, so it starts once the app's port is chosen.
	const paymentPort = await freePort(port + 1);
	const paymentEnv = paymentFakeEnv(paymentPort);
	const paymentData = path.join(dataDir, 'payment-fake-test.json');
	fs.rmSync(paymentData, { force: true });
	const paymentFake = startChild('payment fake', tsx, [path.join(root, 'scripts', 'payment-fake.ts'), '--port', String(paymentPort), '--data', paymentData], {
		env: { ...process.env, ...paymentEnv, WEBHOOK_URL: `${origin}/api/payments/webhook` }, stdio: ['ignore', 'ignore', 'inherit']
	});
	stops.push(() => paymentFake.stop());
	await Promise.race([
		waitForHttp(`${paymentEnv.PAYMENT_FAKE_URL}/__health`),
		new Promise((_, reject) => paymentFake.child.once('exit', (code) => reject(new Error(`the payment fake could not start (exit ${code})`))))
	]);

	const appEnv = { ...process.env, ...mailEnv, ...paymentEnv, DATABASE_URL: url, PORT: String(port), HOST: '127.0.0.1', ORIGIN: origin, BODY_SIZE_LIMIT: '26M' };
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
		...mailEnv,
		...paymentEnv,
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
