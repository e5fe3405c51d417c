// Reading the local mail catcher (scripts/mail-fake.ts) from tests.
//
// `npm test` starts one catcher for the whole run and gives its API address to the app and to
// vitest as MAIL_CATCHER_URL; the app sends to it through SMTP_URL. Every function below reads
// that catcher unless given another one's API address (`catcher`).
//
//   listMessages({ to?, catcher? })            → CaughtMessage[], newest first (optionally only to one address)
//   getMessage(id, catcher?)                    → CaughtMessage
//   waitForMessage(to, { subject?, count?, timeoutMs?, catcher? })
//                                               → the newest message to `to` (whose subject matches, when
//                                                 given) once `count` such messages (default 1) have arrived;
//                                                 throws after timeoutMs (default 15 s)
//   linksIn(message)                            → every http(s) link in the HTML and text bodies
//   linkIn(message, pattern)                    → the first link matching a RegExp or containing a string; throws if none
//   pathOf(link)                                → the path and query of a link, for Client.get()
//   attachmentOf(message, indexOrName, catcher?) → { filename, contentType, content: Buffer }
//   startMailCatcher({ smtpPort?, httpPort?, dir? })
//                                               → a private catcher in a child process, for tests that stop
//                                                 and restart SMTP: { smtpUrl, catcherUrl, smtpPort, httpPort,
//                                                 dir, stop(), start() } — start() brings it back on the same
//                                                 ports with the same stored mailbox.
//
// The run's catcher is shared by test files running in parallel: use addresses unique to your test
// (uniqueEmail() from fixtures) and never empty it.
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { CaughtMessage } from '../../src/lib/server/mail/catcher';
import { freePort, root, waitFor } from './app';

export type { CaughtMessage } from '../../src/lib/server/mail/catcher';

export function defaultCatcher(): string {
	const url = process.env.MAIL_CATCHER_URL;
	if (!url) throw new Error('MAIL_CATCHER_URL is not set: run the tests with `npm test`, which starts the local mail catcher.');
	return url.replace(/\/+$/, '');
}

async function getJson<T>(url: string): Promise<T> {
	const res = await fetch(url);
	if (!res.ok) throw new Error(`${url} answered ${res.status}: ${await res.text()}`);
	return (await res.json()) as T;
}

export async function listMessages(options: { to?: string; catcher?: string } = {}): Promise<CaughtMessage[]> {
	const base = options.catcher ?? defaultCatcher();
	const query = new URLSearchParams({ limit: '1000', ...(options.to ? { to: options.to } : {}) });
	return (await getJson<{ messages: CaughtMessage[] }>(`${base}/messages?${query}`)).messages;
}

export function getMessage(id: string, catcher = defaultCatcher()): Promise<CaughtMessage> {
	return getJson<CaughtMessage>(`${catcher}/messages/${encodeURIComponent(id)}`);
}

export async function waitForMessage(
	to: string,
	options: { subject?: string | RegExp; count?: number; timeoutMs?: number; catcher?: string } = {}
): Promise<CaughtMessage> {
	const until = Date.now() + (options.timeoutMs ?? 15_000);
	const count = options.count ?? 1;
	const matches = (m: CaughtMessage) =>
		options.subject === undefined || (typeof options.subject === 'string' ? m.subject.includes(options.subject) : options.subject.test(m.subject));
	let seen: CaughtMessage[] = [];
	while (Date.now() < until) {
		seen = (await listMessages({ to, catcher: options.catcher })).filter(matches);
		if (seen.length >= count) return seen[0];
		await new Promise((r) => setTimeout(r, 200));
	}
	throw new Error(`expected ${count} message(s) to ${to}${options.subject ? ` about ${options.subject}` : ''}, found ${seen.length}`);
}

export function linksIn(message: CaughtMessage): string[] {
	return message.links;
}

export function linkIn(message: CaughtMessage, pattern: RegExp | string): string {
	const link = message.links.find((l) => (typeof pattern === 'string' ? l.includes(pattern) : pattern.test(l)));
	if (!link) throw new Error(`no link matching ${pattern} in "${message.subject}": ${message.links.join(', ') || 'no links'}`);
	return link;
}

export function pathOf(link: string): string {
	const url = new URL(link);
	return url.pathname + url.search;
}

export async function attachmentOf(message: CaughtMessage, which: number | string, catcher = defaultCatcher()) {
	const meta = typeof which === 'number' ? message.attachments[which] : message.attachments.find((a) => a.filename === which);
	if (!meta) throw new Error(`no attachment ${which} in "${message.subject}"`);
	const res = await fetch(`${catcher}/messages/${message.id}/attachments/${meta.index}`);
	if (!res.ok) throw new Error(`attachment ${which} answered ${res.status}`);
	return { filename: meta.filename, contentType: res.headers.get('content-type') ?? '', content: Buffer.from(await res.arrayBuffer()) };
}

export interface PrivateCatcher {
	smtpUrl: string;
	catcherUrl: string;
	smtpPort: number;
	httpPort: number;
	dir: string;
	/** Stops the SMTP server and its API (the mailbox stays on disk). */
	stop(): Promise<void>;
	/** Starts it again on the same ports with the same mailbox. */
	start(): Promise<void>;
}

/** A catcher of the test's own in a child process, to stop and start at will. */
export async function startMailCatcher(options: { smtpPort?: number; httpPort?: number; dir?: string } = {}): Promise<PrivateCatcher> {
	const smtpPort = options.smtpPort ?? (await freePort());
	const httpPort = options.httpPort ?? (await freePort());
	const dir = options.dir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'mendwise-mail-'));
	const catcherUrl = `http://127.0.0.1:${httpPort}`;
	let child: ChildProcess | null = null;

	const start = async () => {
		if (child) return;
		const started = spawn(
			path.join(root, 'node_modules', '.bin', 'tsx'),
			[path.join(root, 'scripts', 'mail-fake.ts'), '--smtp-port', String(smtpPort), '--http-port', String(httpPort), '--dir', dir],
			{ cwd: root, stdio: ['ignore', 'ignore', 'inherit'] }
		);
		child = started;
		const exited = new Promise<never>((_, reject) => started.once('exit', (code) => reject(new Error(`the mail catcher exited (${code})`))));
		exited.catch(() => {});
		await Promise.race([waitFor(`${catcherUrl}/`, 20_000), exited]);
	};
	const stop = async () => {
		const running = child;
		child = null;
		if (!running || running.exitCode !== null) return;
		await new Promise<void>((resolve) => {
			running.once('exit', () => resolve());
			running.kill('SIGTERM');
		});
	};
	await start();
	return { smtpUrl: `smtp://127.0.0.1:${smtpPort}`, catcherUrl, smtpPort, httpPort, dir, stop, start };
}
