#!/usr/bin/env node
// `npm run bench:load`: two app instances (different ports) on one database holding the volume
// shop (100,000 jobs). 50 customers approve 50 different quotes at once, each tapping twice, while
// staff browse the job board and the pricing route is hammered on both instances. Prints requests
// per second, p50 and p99 per route and errors, then checks in the database that every approval
// was recorded exactly once. Loopback only; bounded by LOAD_SECONDS (default 20).
//
//   LOAD_CUSTOMERS=50 LOAD_SECONDS=20 LOAD_CONNECTIONS=8 npm run bench:load
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { benchServer } from './lib/bench.mjs';
import { buildDir, dataDir, freePort, log, startChild, waitForHttp } from './lib/bootstrap.mjs';
import { loadRun, printLoadTable } from './lib/load.mjs';

const customers = Number(process.env.LOAD_CUSTOMERS ?? 50);
const seconds = Number(process.env.LOAD_SECONDS ?? 20);
const connections = Number(process.env.LOAD_CONNECTIONS ?? 8);
if (!(customers > 0 && customers <= 500 && seconds > 0 && seconds <= 300 && connections > 0 && connections <= 64)) {
	console.error('LOAD_CUSTOMERS 1–500, LOAD_SECONDS 1–300 and LOAD_CONNECTIONS 1–64');
	process.exit(2);
}

/** An invented estimate: an alternator head repair, a new unit, or the unit back. */
const draft = {
	unit: { description: 'Harrowgate PG-5500', ageYears: '4', engineHours: '210', lifeYears: '10', lifeHours: '1500', condition: 'good', asIsValue: '60', annualUpkeep: '0' },
	options: [
		{
			label: 'Replace the alternator head', kind: 'repair', creditDiagnosticFee: true,
			lines: [
				{ kind: 'part', description: 'Alternator head assembly, 5.5 kW', quantity: '1', unitCost: '212.40', specialOrder: true },
				{ kind: 'labour', description: 'Replace alternator head', hours: '2.5' }
			]
		},
		{ label: 'New 5.5 kW portable', kind: 'replacement', lines: [{ kind: 'unit', description: 'Harrowgate PG-5500', cost: '640.00', price: '899.00' }], lifeYears: '10', lifeHours: '1500' },
		{ label: 'Decline the repair', kind: 'decline', lines: [{ kind: 'fee', description: 'Diagnostic fee', amount: '89.00', feeType: 'diagnostic' }] }
	]
};

/** A form action as use:enhance sends it; answers SvelteKit's JSON action result. */
async function action(origin, cookie, target, fields) {
	const res = await fetch(origin + target, {
		method: 'POST', redirect: 'manual',
		headers: { cookie, origin, accept: 'application/json', 'content-type': 'application/x-www-form-urlencoded' },
		body: new URLSearchParams(fields)
	});
	const answer = await res.json();
	if (answer.type === 'failure' || answer.type === 'error') throw new Error(`${target} was refused: ${JSON.stringify(answer).slice(0, 300)}`);
	return answer;
}

/** A customer, a unit, a checked-in job and a sent estimate, through the app as the desk makes them. */
async function sentQuote(origin, cookie, n) {
	const customer = await action(origin, cookie, '/customers?/create', { name: `Load Customer ${n}`, phone: '555-0100', email: '', address: '', notes: '' });
	const customerId = customer.location.split('/').pop();
	const unit = await action(origin, cookie, `/customers/${customerId}?/addUnit`, {
		kind: 'portable', maker: 'Harrowgate', model: 'PG-5500', serial: `LOAD-${n}`, runningWatts: '5500', startingWatts: '6875', voltage: '120/240',
		fuel: 'gasoline', engineHours: '210', yearBought: '2022', pricePaid: '899.00', condition: 'good', notes: ''
	});
	const unitId = unit.location.split('/').pop();
	const job = await action(origin, cookie, `/units/${unitId}?/checkIn`, { complaint: 'Runs but no output', diagnosticFee: '89.00', promisedOn: '', technicianId: '' });
	const jobId = job.location.split('/').pop();
	const builder = await fetch(`${origin}/jobs/${jobId}/quote`, { headers: { cookie } });
	if (builder.status !== 200) throw new Error(`the quote builder answered ${builder.status}`);
	await builder.text();
	await action(origin, cookie, `/jobs/${jobId}/quote?/save`, { draft: JSON.stringify(draft), lockVersion: '0' });
	const sent = await action(origin, cookie, `/jobs/${jobId}/quote?/send`, {});
	const token = /\/q\/([\w-]{40,})/.exec(sent.data)?.[1];
	if (!token) throw new Error('the send answer carried no customer link');
	return { jobId, token };
}

const server = await benchServer();
const port = await freePort(4650);
const secondOrigin = `http://127.0.0.1:${port}`;
const second = startChild('second app', process.execPath, [path.join(buildDir, 'index.js')], {
	env: { ...process.env, DATABASE_URL: server.url, PORT: String(port), HOST: '127.0.0.1', ORIGIN: secondOrigin },
	stdio: ['ignore', 'ignore', 'inherit']
});
let failed = false;
try {
	await waitForHttp(`${secondOrigin}/api/health`);
	log(`two instances: ${server.origin} and ${secondOrigin}`);
	// The session made on the first instance, used on the second.
	const me = await fetch(`${secondOrigin}/api/me`, { headers: { cookie: server.cookie } });
	if (me.status !== 200) throw new Error(`a session from the first instance was refused by the second (${me.status})`);

	log(`preparing ${customers} sent estimates`);
	const quotes = [];
	for (let n = 1; n <= customers; n++) quotes.push(await sentQuote(server.origin, server.cookie, n));

	log(`${customers} customers approving while the board and pricing are hammered, ${seconds} s, ${connections} connections per route and instance`);
	const { rows, customers: results } = await loadRun({
		origins: [server.origin, secondOrigin],
		staffCookie: server.cookie,
		tokens: quotes.map((q) => q.token),
		seconds,
		connections,
		pricingBody: JSON.stringify({ currency: 'USD', diagnosticFee: '89.00', ...draft })
	});
	printLoadTable(rows);

	const db = new pg.Client({ connectionString: server.url });
	await db.connect();
	let counts;
	try {
		counts = (
			await db.query(
				`SELECT j.id, j.status, (SELECT count(*) FROM approvals a JOIN quotes q ON q.id = a.quote_id WHERE q.job_id = j.id)::int AS approvals
				   FROM jobs j WHERE j.id = ANY($1::uuid[])`,
				[quotes.map((q) => q.jobId)]
			)
		).rows;
	} finally {
		await db.end();
	}
	const wrong = counts.filter((c) => c.approvals !== 1 || c.status !== 'approved');
	const taps = results.flatMap((r) => r.taps);
	const errors = rows.reduce((sum, r) => sum + r.errors, 0);
	const once = counts.filter((c) => c.approvals === 1).length;
	const none = counts.filter((c) => c.approvals === 0).length;
	const twice = counts.filter((c) => c.approvals > 1).length;
	console.log(
		`\napprovals: ${once} of ${customers} recorded exactly once, ${none} not recorded (both taps refused), ${twice} recorded more than once; ` +
			`taps answered 303: ${taps.filter((t) => t === 303).length} of ${taps.length}; failed requests: ${errors}`
	);
	failed = wrong.length > 0 || counts.length !== customers || taps.some((t) => t !== 303) || errors > 0;
	fs.writeFileSync(path.join(dataDir, 'bench-load.json'), JSON.stringify({ at: new Date().toISOString(), customers, seconds, connections, instances: 2, rows, once, none, twice }, null, 2));
} catch (e) {
	console.error(`[mendwise] ${e instanceof Error ? e.message : e}`);
	failed = true;
} finally {
	await second.stop();
	await server.stop();
}
process.exit(failed ? 1 : 0);
