#!/usr/bin/env node
// `npm start`: from a fresh clone to a running shop, then Ctrl+C stops everything it started.
import fs from 'node:fs';
import path from 'node:path';
import {
	buildDir, database, dbTask, ensureDependencies, log, root, run, startChild, waitForHttp
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

	const port = Number(process.env.PORT ?? 3000);
	const host = process.env.HOST ?? '127.0.0.1';
	const origin = process.env.ORIGIN ?? `http://${host}:${port}`;
	const app = startChild('app', process.execPath, [path.join(buildDir, 'index.js')], {
		env: { ...process.env, DATABASE_URL: url, PORT: String(port), HOST: host, ORIGIN: origin, BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT ?? '26M' }
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
	log(`Mendwise is running at ${origin}  (Ctrl+C stops it)`);
} catch (e) {
	console.error(`[mendwise] ${e instanceof Error ? e.message : e}`);
	await shutdown(1);
}
