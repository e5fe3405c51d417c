// Faults: PostgreSQL restarted while requests run, and an app process killed (SIGKILL) in the
// middle of a burst of quote saves. Both run against a PostgreSQL cluster of their own, so the
// restart never touches the database the other test files use.
//
// Elsewhere: SMTP stopped and started again — tests/integration/mail.test.ts ("keeps messages
// queued while SMTP is down … delivers each once"); the payment service stopped —
// tests/integration/payments.test.ts.
import { spawn } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { dbTask, postgresBinDir, startCluster } from '../../scripts/lib/bootstrap.mjs';
import { closeDb } from '../../src/lib/server/db/index';
import { AuditEvent, Customer, Job, Quote } from '../../src/lib/server/db/models';
import * as quotes from '../../src/lib/server/quotes';
import { startApp, type AppInstance } from '../helpers/app';
import { Client, signedIn } from '../helpers/client';
import { createShop, PASSWORD, type ShopFixture } from '../helpers/fixtures';
import { sampleDraft } from '../helpers/quotes';
import { createJob } from '../helpers/shopdata';

type Cluster = Awaited<ReturnType<typeof startCluster>>;

let cluster: Cluster;
let databaseUrl: string;
let app: AppInstance;
let shop: ShopFixture;
const isRoot = process.getuid?.() === 0;

/** pg_ctl for the faults cluster, as the postgres user when the tests run as root; resolves with its exit code. */
function pgCtl(args: string[]): Promise<number> {
	const bin = path.join(postgresBinDir()!, 'pg_ctl');
	const argv = ['-D', cluster.dir, ...args];
	const [cmd, full] = isRoot ? ['runuser', ['-u', 'postgres', '--', bin, ...argv]] : [bin, argv];
	return new Promise((resolve, reject) => {
		const child = spawn(cmd, full, { stdio: 'ignore' });
		child.once('error', reject);
		child.once('exit', (code) => resolve(code ?? -1));
	});
}

const restartPostgres = () => pgCtl(['-m', 'fast', '-w', '-t', '60', '-l', path.join(cluster.dir, 'server.log'), '-o', `-p ${cluster.port}`, 'restart']);

beforeAll(async () => {
	cluster = await startCluster({ name: 'pg-faults', durable: true });
	databaseUrl = cluster.appUrl('mendwise_faults');
	dbTask('fresh', { DATABASE_URL: databaseUrl, SUPER_DATABASE_URL: cluster.superUrl });
	vi.stubEnv('DATABASE_URL', databaseUrl);
	shop = await createShop('Faults');
	app = await startApp({ DATABASE_URL: databaseUrl, SMTP_URL: '', MAIL_CATCHER_URL: '' });
}, 180_000);

afterAll(async () => {
	await app?.stop();
	await closeDb();
	vi.unstubAllEnvs();
	if (cluster) await pgCtl(['-m', 'fast', '-w', 'stop']);
}, 60_000);

interface Sent {
	what: string;
	startedAt: number;
	endedAt: number;
	status: number;
	ok: boolean;
	text: string;
	name?: string;
}

const STACK = /^\s+at .+:\d+:\d+\)?$|\b\w*Error: /m;

describe('PostgreSQL restarts while requests are running', () => {
	it('the app recovers by itself: every request after recovery succeeds, and nothing acknowledged is lost', async () => {
		const staff = await signedIn(shop.staff.owner.email, PASSWORD, app.url);
		const { job } = await createJob(shop);
		const sent: Sent[] = [];
		let running = true;
		let created = 0;
		const pricing = JSON.stringify({ currency: 'USD', diagnosticFee: '89.00', ...sampleDraft() });

		const kinds: ((c: Client) => Promise<Sent>)[] = [
			async (c) => time('board', () => c.get('/api/jobs?sort=customer'), (r) => r.status === 200),
			async (c) => time('job page', () => c.get(`/jobs/${job.id}`, { accept: 'text/html' }), (r) => r.status === 200),
			async (c) => time('pricing', () => c.postJson('/api/pricing/evaluate', pricing), (r) => r.status === 200),
			async (c) => {
				const name = `Restart Customer ${++created}`;
				const result = await time('create customer', () => c.form('/customers?/create', { name, phone: '', email: '', address: '', notes: '' }), (r) => r.status === 303);
				return { ...result, name };
			}
		];
		async function time(what: string, send: () => ReturnType<Client['get']>, ok: (r: { status: number }) => boolean): Promise<Sent> {
			const startedAt = Date.now();
			try {
				const reply = await send();
				return { what, startedAt, endedAt: Date.now(), status: reply.status, ok: ok(reply), text: reply.text };
			} catch (e) {
				return { what, startedAt, endedAt: Date.now(), status: 0, ok: false, text: String(e) };
			}
		}
		const worker = async (n: number) => {
			for (let i = n; running; i++) sent.push(await kinds[i % kinds.length](staff));
		};

		const workers = Array.from({ length: 6 }, (_, n) => worker(n));
		await new Promise((r) => setTimeout(r, 1_500));
		const restartAt = Date.now();
		expect(await restartPostgres()).toBe(0);
		// Recovered: the health check reaches the database again.
		let recoveredAt = 0;
		while (!recoveredAt) {
			const health = await fetch(`${app.url}/api/health`).catch(() => null);
			if (health?.status === 200) recoveredAt = Date.now();
			else await new Promise((r) => setTimeout(r, 50));
			expect(Date.now() - restartAt).toBeLessThan(30_000);
		}
		// Keep going until plenty of requests have been made after recovery (bounded in time).
		const until = Date.now() + 30_000;
		while (sent.filter((x) => x.startedAt >= recoveredAt).length < 40 && Date.now() < until) await new Promise((r) => setTimeout(r, 100));
		running = false;
		await Promise.all(workers);

		const after = sent.filter((s) => s.startedAt >= recoveredAt);
		const during = sent.filter((s) => s.startedAt < recoveredAt && s.endedAt >= restartAt);
		expect(sent.filter((s) => s.endedAt < restartAt).every((s) => s.ok)).toBe(true);
		expect(after.length).toBeGreaterThan(20);
		expect(after.filter((s) => !s.ok).map((s) => `${s.what} ${s.status} ${s.text.slice(0, 120)}`)).toEqual([]);
		// What failed while the database was away failed plainly: a 5xx page or message, no stack trace.
		for (const s of during.filter((d) => !d.ok)) {
			expect(s.status).toBeGreaterThanOrEqual(500);
			expect(s.text).not.toMatch(STACK);
		}
		// Every customer the app said it created is there, once.
		const acknowledged = sent.filter((s) => s.what === 'create customer' && s.ok).map((s) => s.name!);
		const stored = (await Customer.findAll({ where: { shopId: shop.id }, attributes: ['name'] })).map((c) => c.name);
		for (const name of acknowledged) expect(stored.filter((n) => n === name)).toHaveLength(1);
		expect(new Set(stored).size).toBe(stored.length);
	}, 90_000);
});

describe('an app process killed in the middle of saving quotes', () => {
	it('leaves every quote whole: a draft the engine accepts, its lock version and audit trail in step', async () => {
		const victim = await startApp({ DATABASE_URL: databaseUrl, SMTP_URL: '', MAIL_CATCHER_URL: '' });
		const tech = await signedIn(shop.staff.technician.email, PASSWORD, victim.url);
		const jobs = await Promise.all(Array.from({ length: 6 }, () => createJob(shop)));
		for (const { job } of jobs) await quotes.forJob(shop.id, job.id);

		// A large draft (many lines) keeps each save busy long enough for the kill to land inside one.
		const draftFor = (jobNumber: number, version: number) => {
			const draft = sampleDraft();
			draft.unit.description = `Burst ${jobNumber} #${version}`;
			const lines = draft.options[0].lines as Record<string, unknown>[];
			for (let i = 0; i < 120; i++) lines.push({ kind: 'part', description: `Brush set ${i}`, quantity: '1', unitCost: `${(10 + i / 100).toFixed(2)}` });
			return draft;
		};
		const acknowledged = new Map<string, number>();
		const attempted = new Map<string, number>();
		let killed = false;
		const chain = async (job: Job) => {
			for (let version = 0; !killed; version++) {
				attempted.set(job.id, version + 1);
				const reply = await tech
					.request('POST', `/jobs/${job.id}/quote?/save`, {
						body: new URLSearchParams({ draft: JSON.stringify(draftFor(job.number, version)), lockVersion: String(version) }).toString(),
						headers: { 'content-type': 'application/x-www-form-urlencoded', origin: victim.url, accept: 'application/json' }
					})
					.catch(() => null);
				if (!reply) return;
				const answer = reply.json() as { type: string; data?: string };
				if (answer.type !== 'success') throw new Error(`save ${version} of job ${job.number} was refused: ${reply.text.slice(0, 200)}`);
				acknowledged.set(job.id, version + 1);
			}
		};
		let ended = 0;
		const chains = jobs.map(({ job }) => chain(job).finally(() => ended++));
		// Kill once the saves are well under way (a chain that ended early has failed; its error shows below).
		const until = Date.now() + 30_000;
		while ([...acknowledged.values()].reduce((a, b) => a + b, 0) < 24 && ended === 0 && Date.now() < until) await new Promise((r) => setTimeout(r, 10));
		killed = true;
		victim.process.kill('SIGKILL');
		await Promise.all(chains);
		await new Promise((resolve) => (victim.process.exitCode !== null || victim.process.signalCode ? resolve(null) : victim.process.once('exit', resolve)));

		// A fresh process on the same database.
		const restarted = await startApp({ DATABASE_URL: databaseUrl, SMTP_URL: '', MAIL_CATCHER_URL: '' });
		try {
			const again = await signedIn(shop.staff.technician.email, PASSWORD, restarted.url);
			for (const { job } of jobs) {
				const quote = (await Quote.findOne({ where: { shopId: shop.id, jobId: job.id } }))!;
				const committed = quote.lockVersion;
				// Every acknowledged save is there; nothing beyond what was sent.
				expect(committed).toBeGreaterThanOrEqual(acknowledged.get(job.id) ?? 0);
				expect(committed).toBeLessThanOrEqual(attempted.get(job.id) ?? 0);
				// The stored draft is exactly the last committed save, whole, and the engine accepts it.
				const draft = quote.draft as { unit: { description: string }; options: { lines: unknown[] }[] };
				expect(draft.unit.description).toBe(`Burst ${job.number} #${committed - 1}`);
				expect(draft.options[0].lines).toHaveLength(122);
				expect((await quotes.evaluateDraft(shop.id, job, draft)).ok).toBe(true);
				// One audit record per committed save: the save and its record landed together.
				expect(await AuditEvent.count({ where: { shopId: shop.id, entity: 'job', entityId: job.id, action: 'quote.saved' } })).toBe(committed);
				// The lock version goes on from there on the new process.
				const next = await again.request('POST', `/jobs/${job.id}/quote?/save`, {
					body: new URLSearchParams({ draft: JSON.stringify(draftFor(job.number, committed)), lockVersion: String(committed) }).toString(),
					headers: { 'content-type': 'application/x-www-form-urlencoded', origin: restarted.url, accept: 'application/json' }
				});
				expect(next.json().type).toBe('success');
				const stale = await again.request('POST', `/jobs/${job.id}/quote?/save`, {
					body: new URLSearchParams({ draft: JSON.stringify(draftFor(job.number, committed)), lockVersion: String(committed) }).toString(),
					headers: { 'content-type': 'application/x-www-form-urlencoded', origin: restarted.url, accept: 'application/json' }
				});
				expect(stale.json().status).toBe(409);
			}
		} finally {
			await restarted.stop();
		}
	}, 120_000);
});
