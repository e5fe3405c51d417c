// E-mail through the durable outbox. The invite test uses the run's app and mail catcher. The
// outage and concurrency tests need SMTP they can stop and no other worker on their rows, so they
// run on a database of their own, with two app instances (two workers) and a private catcher.
import { randomBytes, randomUUID } from 'node:crypto';
import fs from 'node:fs';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { closeDb } from '../../src/lib/server/db/index';
import { migrate } from '../../src/lib/server/db/migrator';
import { OutboxMessage } from '../../src/lib/server/db/outbox-model';
import * as outbox from '../../src/lib/server/mail/outbox';
import * as templates from '../../src/lib/server/mail/templates';
import { createTransport } from '../../src/lib/server/mail/transport';
import { startApp, type AppInstance } from '../helpers/app';
import { Client, signedIn } from '../helpers/client';
import { createShop, uniqueEmail, type ShopFixture } from '../helpers/fixtures';
import {
	attachmentOf, linkIn, listMessages, pathOf, startMailCatcher, waitForMessage, type PrivateCatcher
} from '../helpers/mailbox';
import { createJob } from '../helpers/shopdata';

const runDatabase = process.env.DATABASE_URL!;
const superUrl = process.env.SUPER_DATABASE_URL;
const ownName = `mendwise_mail_${randomUUID().slice(0, 8)}`;
const ownDatabase = (() => {
	const url = new URL(runDatabase);
	url.pathname = `/${ownName}`;
	return url.toString();
})();

let catcher: PrivateCatcher;
let withCatcher: AppInstance;
let withoutCatcher: AppInstance;
let shop: ShopFixture;
let otherShop: ShopFixture;

async function admin<T>(work: (client: pg.Client) => Promise<T>): Promise<T> {
	if (!superUrl) throw new Error('These tests make a database of their own: run them with `npm test`, which sets SUPER_DATABASE_URL.');
	const client = new pg.Client({ connectionString: superUrl });
	await client.connect();
	try {
		return await work(client);
	} finally {
		await client.end();
	}
}

async function until<T>(what: string, check: () => Promise<T | false | null | undefined>, timeoutMs = 30_000): Promise<T> {
	const deadline = Date.now() + timeoutMs;
	for (;;) {
		const value = await check();
		if (value) return value;
		if (Date.now() > deadline) throw new Error(`timed out waiting until ${what}`);
		await new Promise((r) => setTimeout(r, 200));
	}
}

const plainMessage = (to: string, subject: string) => ({ to, subject, text: `${subject}\n\nPlain text body.`, html: `<p>${subject}</p>` });

beforeAll(async () => {
	await admin(async (client) => {
		// Left behind by an interrupted run of this file.
		const stale = await client.query("SELECT datname FROM pg_database WHERE datname LIKE 'mendwise\\_mail\\_%'");
		for (const { datname } of stale.rows) await client.query(`DROP DATABASE IF EXISTS "${datname}" WITH (FORCE)`);
		const role = decodeURIComponent(new URL(runDatabase).username);
		await client.query(`CREATE DATABASE "${ownName}" OWNER "${role}"`);
	});
	vi.stubEnv('DATABASE_URL', ownDatabase);
	await migrate();
	[shop, otherShop] = await Promise.all([createShop('Mail'), createShop('Other mail')]);
	catcher = await startMailCatcher();
	[withCatcher, withoutCatcher] = await Promise.all([
		startApp({ DATABASE_URL: ownDatabase, SMTP_URL: catcher.smtpUrl, MAIL_CATCHER_URL: catcher.catcherUrl }),
		startApp({ DATABASE_URL: ownDatabase, SMTP_URL: catcher.smtpUrl, MAIL_CATCHER_URL: '' })
	]);
});

afterAll(async () => {
	await Promise.all([withCatcher?.stop(), withoutCatcher?.stop(), catcher?.stop()]);
	if (catcher) fs.rmSync(catcher.dir, { recursive: true, force: true });
	await closeDb();
	vi.unstubAllEnvs();
	await admin((client) => client.query(`DROP DATABASE IF EXISTS "${ownName}" WITH (FORCE)`)).catch(() => {});
});

describe('staff invite e-mail (the run app and its mail catcher)', () => {
	it('arrives in the catcher with a link that creates the account', async () => {
		const founder = uniqueEmail('founder');
		const owner = new Client();
		expect((await owner.form('/signup', { shopName: 'Fenwick Generator Works', name: 'Ada Fenwick', email: founder, password: 'a-strong-password' })).status).toBe(303);
		const invited = uniqueEmail('invited');
		const page = await owner.form('/team?/invite', { email: invited, role: 'technician' });
		expect(page.status).toBe(200);
		expect(page.text).toContain('We e-mailed the invite to');

		const message = await waitForMessage(invited);
		expect(message.subject).toBe('Ada Fenwick invited you to join Fenwick Generator Works on Mendwise');
		expect(message.text).toContain('as a technician');
		expect(message.html).toContain('Accept the invite');
		expect(message.replyTo).toBe('');
		const link = linkIn(message, '/invite/');
		expect(page.text).toContain(link);

		const visitor = new Client();
		expect((await visitor.get(pathOf(link))).text).toContain(invited);
		expect((await visitor.form(pathOf(link), { name: 'Bram Ostler', password: 'long-enough-password' })).status).toBe(303);
		expect((await visitor.get('/api/me')).json()).toMatchObject({ email: invited, role: 'technician' });
	});
});

describe('the outbox on its own database, two app instances and a catcher the test controls', () => {
	it('delivers a message with its attachment intact and records the send', async () => {
		const to = uniqueEmail('customer');
		const pdf = Buffer.concat([Buffer.from('%PDF-1.7\n'), randomBytes(150_000)]);
		const mail = templates.quoteSent({
			shop: { name: shop.name, phone: '555-0140', email: 'desk@shop.example', address: '12 Quarry Road' },
			customerName: 'Tamsin Yarrow', jobNumber: 1001, unitLabel: 'Harrowgate PG-5500', link: 'https://mendwise.example/q/abc',
			options: [{ label: 'Rewind the stator', total: '$412.50', recommended: true }]
		});
		const { id, messageId } = await outbox.enqueue(
			{ to, ...mail, attachments: [{ filename: 'quote-1001.pdf', contentType: 'application/pdf', content: pdf }] },
			{ shopId: shop.id, kind: 'quote_sent' }
		);

		const message = await waitForMessage(to, { catcher: catcher.catcherUrl });
		expect(message.messageId).toBe(messageId);
		expect(message.subject).toBe(`Your estimate for job #1001 from ${shop.name}`);
		expect(message.replyTo).toBe('desk@shop.example');
		expect(message.headers['auto-submitted']).toBe('auto-generated');
		expect(message.text).toContain(templates.SAFETY_CAUTION);
		expect(message.attachments).toEqual([{ index: 0, filename: 'quote-1001.pdf', contentType: 'application/pdf', size: pdf.length }]);
		const attachment = await attachmentOf(message, 'quote-1001.pdf', catcher.catcherUrl);
		expect(attachment.content.equals(pdf)).toBe(true);

		const row = await until('the send is recorded', async () => {
			const found = await OutboxMessage.findByPk(id);
			return found?.status === 'sent' && found;
		});
		expect(row.attempts).toBe(1);
		expect(row.sentAt).toBeInstanceOf(Date);
		expect(row.smtpResponse).toContain(message.id);
	});

	it('keeps messages queued while SMTP is down, shows the failure on the job, and delivers each once when it is back', async () => {
		const { job } = await createJob(shop);
		const tag = randomUUID().slice(0, 8);
		const recipients = Array.from({ length: 6 }, (_, i) => `outage.${tag}.${i}@shop.example`);
		await catcher.stop();
		try {
			const ids: string[] = [];
			for (const [i, to] of recipients.entries()) {
				const queued = await outbox.enqueue(plainMessage(to, `Outage ${tag} #${i}`), { shopId: shop.id, jobId: i < 2 ? job.id : null, kind: 'quote_sent' });
				ids.push(queued.id);
			}
			const rows = await until('every message has failed an attempt', async () => {
				const found = await OutboxMessage.findAll({ where: { id: ids } });
				return found.every((r) => r.status === 'queued' && r.attempts >= 1 && r.lastError) && found;
			});
			for (const row of rows) {
				expect(row.lastError).toContain('ECONNREFUSED');
				expect(row.lastErrorCode).toBe('ESOCKET');
				// Backed off: the first retry waits 5 s ± 20%.
				expect(row.nextAttemptAt.getTime() - row.updatedAt.getTime()).toBeGreaterThanOrEqual(3_900);
				expect(row.sentAt).toBeNull();
			}
			// The two were queued within moments of each other, perhaps within the same millisecond:
			// the job lists both, in the same order every time it is read.
			const onJob = await outbox.statusFor(shop.id, job.id);
			expect(onJob.map((m) => m.to).sort()).toEqual(recipients.slice(0, 2));
			expect((await outbox.statusFor(shop.id, job.id)).map((m) => m.id)).toEqual(onJob.map((m) => m.id));
			const first = onJob.find((m) => m.to === recipients[0])!;
			expect(first).toMatchObject({ kind: 'quote_sent', subject: `Outage ${tag} #0`, sentAt: null });
			// A retry may be under way at this very moment; either way nothing was sent.
			expect(['queued', 'sending']).toContain(first.status);
			expect(first.attempts).toBeGreaterThanOrEqual(1);
			expect(first.lastError).toContain('ECONNREFUSED');
			expect(await outbox.statusFor(otherShop.id, job.id)).toEqual([]);
		} finally {
			await catcher.start();
		}

		await until('every message is sent', async () => (await OutboxMessage.count({ where: { toAddress: recipients, status: 'sent' } })) === recipients.length, 40_000);
		for (const to of recipients) {
			expect(await listMessages({ to, catcher: catcher.catcherUrl })).toHaveLength(1);
		}
		const onJob = await outbox.statusFor(shop.id, job.id);
		expect(onJob.map((m) => m.status)).toEqual(['sent', 'sent']);
		expect(onJob[0].sentAt).toBeInstanceOf(Date);
	}, 90_000);

	it('never sends a message twice when several workers share the database', async () => {
		const tag = randomUUID().slice(0, 8);
		const recipients = Array.from({ length: 40 }, (_, i) => `batch.${tag}.${i}@shop.example`);
		// One transaction, one wake-up: both app instances and two workers in this process race for the rows.
		const { db } = await import('../../src/lib/server/db/index');
		await db().transaction(async (transaction) => {
			for (const [i, to] of recipients.entries()) {
				await outbox.enqueue(plainMessage(to, `Batch ${tag} #${i}`), { shopId: shop.id, kind: 'staff_invite' }, transaction);
			}
		});
		const mailers = [createTransport(catcher.smtpUrl), createTransport(catcher.smtpUrl)];
		try {
			const reports = await Promise.all(mailers.map((mailer) => outbox.deliverDue({ mailer })));
			expect(reports.every((r) => r.failed === 0 && !r.unreachable)).toBe(true);
		} finally {
			for (const mailer of mailers) mailer.close();
		}
		await until('every message is sent', async () => (await OutboxMessage.count({ where: { toAddress: recipients, status: 'sent' } })) === recipients.length);

		const caught = (await listMessages({ catcher: catcher.catcherUrl })).filter((m) => m.subject.startsWith(`Batch ${tag} `));
		expect(caught).toHaveLength(recipients.length);
		expect(new Set(caught.map((m) => m.subject)).size).toBe(recipients.length);
		const rows = await OutboxMessage.findAll({ where: { toAddress: recipients } });
		expect(rows.every((r) => r.attempts === 1)).toBe(true);
	}, 60_000);

	it('marks a refused recipient failed at once, visible on the job, and lets the shop queue it again', async () => {
		const { job } = await createJob(shop);
		const to = `reject.${randomUUID().slice(0, 8)}@shop.example`;
		const { id } = await outbox.enqueue(plainMessage(to, 'Refused'), { shopId: shop.id, jobId: job.id, kind: 'approval_confirmation' });
		const [status] = await until('the message has failed', async () => {
			const found = await outbox.statusFor(shop.id, job.id);
			return found[0]?.status === 'failed' && found;
		});
		expect(status).toMatchObject({ id, status: 'failed', attempts: 1, to, nextAttemptAt: null });
		expect(status.lastError).toContain('550');

		expect(await outbox.retry(otherShop.id, id)).toBe(false);
		expect((await OutboxMessage.findByPk(id))!.status).toBe('failed');
		expect(await outbox.retry(shop.id, id)).toBe(true);
		await until('it has failed again', async () => {
			const row = await OutboxMessage.findByPk(id);
			return row?.status === 'failed' && row.attempts === 1;
		});
		expect(await listMessages({ to, catcher: catcher.catcherUrl })).toEqual([]);
	});

	it('refuses to queue a message without a valid recipient, with an unsafe attachment name or about another shop’s job', async () => {
		const before = await OutboxMessage.count();
		await expect(outbox.enqueue(plainMessage('not-an-address', 'x'), { shopId: shop.id, kind: 'quote_sent' })).rejects.toThrow('not a valid e-mail address');
		await expect(
			outbox.enqueue(
				{ ...plainMessage(uniqueEmail(), 'x'), attachments: [{ filename: '../etc/passwd', contentType: 'text/plain', content: Buffer.from('x') }] },
				{ shopId: shop.id, kind: 'quote_sent' }
			)
		).rejects.toThrow('not a plain file name');
		const { job } = await createJob(otherShop);
		await expect(outbox.enqueue(plainMessage(uniqueEmail(), 'x'), { shopId: shop.id, jobId: job.id, kind: 'quote_sent' })).rejects.toThrow('another shop');
		expect(await OutboxMessage.count()).toBe(before);
	});

	it('keeps sending after every database connection of the app instances is cut', async () => {
		await admin((client) =>
			client.query('SELECT pg_terminate_backend(pid) FROM pg_stat_activity WHERE datname = $1 AND pid <> pg_backend_pid()', [ownName])
		);
		// This process's pooled connections were cut too; the first query after may fail once.
		const to = uniqueEmail('after-cut');
		await until('the message is queued', async () => {
			try {
				return await outbox.enqueue(plainMessage(to, 'After the cut'), { shopId: shop.id, kind: 'staff_invite' });
			} catch {
				return null;
			}
		});
		await waitForMessage(to, { catcher: catcher.catcherUrl, timeoutMs: 25_000 });
	}, 60_000);
});

describe('the development mailbox page', () => {
	it('lists only the shop’s own caught messages, with downloadable attachments', async () => {
		const to = uniqueEmail('mailbox');
		const content = Buffer.from('%PDF-1.4\nsigned quote\n');
		await outbox.enqueue(
			{ ...plainMessage(to, 'Mailbox page check'), html: '<p>See <a href="https://mendwise.example/q/xyz">your quote</a></p>', attachments: [{ filename: 'signed.pdf', contentType: 'application/pdf', content }] },
			{ shopId: shop.id, kind: 'approval_confirmation' }
		);
		const message = await waitForMessage(to, { catcher: catcher.catcherUrl });

		const technician = await signedIn(shop.staff.technician.email, shop.staff.technician.password, withCatcher.url);
		const page = await technician.get(`/dev/mailbox?id=${message.id}`);
		expect(page.status).toBe(200);
		expect(page.text).toContain('Local mail catcher — development only. This is not real mail.');
		expect(page.text).toContain('Mailbox page check');
		expect(page.text).toContain('sandbox="allow-popups allow-popups-to-escape-sandbox"');
		expect(page.text).toContain('href="https://mendwise.example/q/xyz"');
		const download = await technician.get(`/dev/mailbox/${message.id}/attachments/0`);
		expect(download.status).toBe(200);
		expect(download.headers.get('content-disposition')).toBe('attachment; filename="signed.pdf"');
		expect(download.text).toBe(content.toString());

		const stranger = await signedIn(otherShop.staff.owner.email, otherShop.staff.owner.password, withCatcher.url);
		const theirs = await stranger.get(`/dev/mailbox?id=${message.id}`);
		expect(theirs.status).toBe(200);
		expect(theirs.text).not.toContain('Mailbox page check');
		expect((await stranger.get(`/dev/mailbox/${message.id}/attachments/0`)).status).toBe(404);
	});

	it('requires sign-in, and does not exist without MAIL_CATCHER_URL', async () => {
		const anonymous = await new Client(withCatcher.url).get('/dev/mailbox');
		expect(anonymous.status).toBe(303);
		expect(anonymous.location).toBe('/signin?next=%2Fdev%2Fmailbox');
		expect((await new Client(withCatcher.url).get('/dev/mailbox/x/attachments/0')).status).toBe(303);

		const owner = await signedIn(shop.staff.owner.email, shop.staff.owner.password, withoutCatcher.url);
		const missing = await owner.get('/dev/mailbox');
		expect(missing.status).toBe(404);
		expect(missing.text).toContain('There is no page at this address.');
		expect((await owner.get('/dev/mailbox/x/attachments/0')).status).toBe(404);
	});
});
