#!/usr/bin/env node
// `npm start`: from a fresh clone to a running shop, then Ctrl+C stops everything it started.
import fs from 'node:fs';
import path from 'node:path';
import {
	buildDir, dataDir, database, dbTask, ensureDependencies, freePort, log, paymentFakeEnv, root, run, startChild, tsx, waitForHttp
} from './lib/bootstrap.mjs';

const stops = [];
let stopping = false;
async function shutdown(code = 0) {
	if (stopping) return;
	stopping = true;
	log('stopping…');
	for (const stop of stops.reverse()) {
		try {
			await stop();
		} catch (e) {
			console.error(e);
		}
	}
	process.exit(code);
}
process.on('SIGINT', () => shutdown(0));
process.on('SIGTERM', () => shutdown(0));

try {
	ensureDependencies();
	const { url, superUrl, cluster } = await database({ name: 'pg', dbName: 'mendwise', durable: true });
	if (cluster) stops.push(() => cluster.stop());
	dbTask('prepare', { DATABASE_URL: url, ...(superUrl ? { SUPER_DATABASE_URL: superUrl } : {}) });

	if (process.env.MENDWISE_SKIP_BUILD === '1' && fs.existsSync(path.join(buildDir, 'index.js'))) {
		log('using the existing build');
	} else {
		log('building');
		run(path.join(root, 'node_modules', '.bin', 'vite'), ['build', '--logLevel', 'warn']);
	}

	// Without a real SMTP_URL, e-mail goes to the local mail catcher (never to real inboxes).
	let mailEnv = {};
	if (!process.env.SMTP_URL) {
		const smtpPort = await freePort(Number(process.env.MAIL_FAKE_SMTP_PORT ?? 2525));
		const apiPort = await freePort(Number(process.env.MAIL_FAKE_HTTP_PORT ?? 2580));
		const catcher = startChild('mail catcher', tsx, [
			path.join(root, 'scripts', 'mail-fake.ts'), '--smtp-port', String(smtpPort), '--http-port', String(apiPort), '--dir', path.join(dataDir, 'mail')
		]);
		stops.push(() => catcher.stop());
		await Promise.race([
			waitForHttp(`http://127.0.0.1:${apiPort}/`),
			new Promise((_, reject) => catcher.child.once('exit', (code) => reject(new Error(`the mail catcher could not start (exit ${code})`))))
		]);
		mailEnv = { SMTP_URL: `smtp://127.0.0.1:${smtpPort}`, MAIL_CATCHER_URL: `http://127.0.0.1:${apiPort}` };
	}

	const port = Number(process.env.PORT ?? 3000);
	const host = process.env.HOST ?? '127.0.0.1';
	const origin = process.env.ORIGIN ?? `http://${host}:${port}`;

	// Without real Stripe keys, card payments go to the local payment fake (no real money moves).
	let paymentEnv = {};
	if (!process.env.STRIPE_SECRET_KEY) {
		const paymentPort = await freePort(Number(process.env.PAYMENT_FAKE_PORT ?? 2590));
		paymentEnv = paymentFakeEnv(paymentPort);
		const paymentFake = startChild('payment fake', tsx, [
			path.join(root, 'scripts', 'payment-fake.ts'), '--port', String(paymentPort), '--data', path.join(dataDir, 'payment-fake.json')
		], { env: { ...process.env, ...paymentEnv, WEBHOOK_URL: `${origin}/api/payments/webhook` } });
		stops.push(() => paymentFake.stop());
		await Promise.race([
			waitForHttp(`${paymentEnv.PAYMENT_FAKE_URL}/__health`),
			new Promise((_, reject) => paymentFake.child.once('exit', (code) => reject(new Error(`the payment fake could not start (exit ${code})`))))
		]);
	}

	const app = startChild('app', process.execPath, [path.join(buildDir, 'index.js')], {
		env: { ...process.env, ...mailEnv, ...paymentEnv, DATABASE_URL: url, PORT: String(port), HOST: host, ORIGIN: origin, BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT ?? '26M' }
	});
	stops.push(() => app.stop());
	app.child.on('exit', () => shutdown(1));
	await waitForHttp(`${origin}/api/health`);
	const signIns = path.join(process.env.MENDWISE_DATA_DIR ?? path.join(root, '.data'), 'demo-sign-ins.json');
	if (fs.existsSync(signIns)) {
		console.log('\nDemo sign-ins (invented shop "Larkspur Engine & Generator Repair"):');
		for (const s of JSON.parse(fs.readFileSync(signIns, 'utf8'))) {
			console.log(`  ${s.role.padEnd(10)} ${s.email.padEnd(34)} ${s.password}`);
		}
	}
	if (mailEnv.MAIL_CATCHER_URL) log(`e-mail is caught locally, not delivered: read it at ${origin}/dev/mailbox`);
	if (paymentEnv.STRIPE_SECRET_KEY) log(`card payments go to the local payment fake (STRIPE_SECRET_KEY=${paymentEnv.STRIPE_SECRET_KEY}): no real money moves; test card 4242 4242 4242 4242`);
	log(`Mendwise is running at ${origin}  (Ctrl+C stops it)`);
} catch (e) {
	console.error(`[mendwise] ${e instanceof Error ? e.message : e}`);
	await shutdown(1);
}
