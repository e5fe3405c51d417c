// The local mail catcher for development and tests: a real SMTP server on 127.0.0.1 that keeps
// every message it receives (in memory and as .eml + .json files, so the mailbox survives a
// restart) and shows them through a small JSON API. Nothing is ever relayed to a real inbox.
//
//   tsx scripts/mail-fake.ts [--smtp-port 2525] [--http-port 2580] [--dir .data/mail]
//
// API (loopback only):
//   GET    /messages[?to=address&limit=n]     newest first: { messages: CaughtMessage[] }
//   GET    /messages/:id                      one CaughtMessage
//   GET    /messages/:id/raw                  the message as received (message/rfc822)
//   GET    /messages/:id/attachments/:n       the n-th attachment (0-based), with its content type
//   DELETE /messages                          empties the mailbox; DELETE /messages/:id removes one
//
// Recipients whose address starts with "reject" are refused with 550 and those starting with
// "defer" with 451, to try failed and retried sends.
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { simpleParser, type AddressObject, type ParsedMail } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { CaughtMessage } from '../src/lib/server/mail/catcher';
import { announce, argument, runAsMain, stopOnSignal } from './lib/fake-cli';

export type { CaughtAttachment, CaughtMessage } from '../src/lib/server/mail/catcher';

export interface MailCatcher {
	smtpPort: number;
	httpPort: number;
	smtpUrl: string;
	apiUrl: string;
	stop(): Promise<void>;
}

export interface CatcherOptions {
	dir: string;
	host?: string;
	smtpPort?: number;
	httpPort?: number;
	log?: (line: string) => void;
}

const MAX_MESSAGE_BYTES = 30 * 1024 * 1024;

function addresses(field: AddressObject | AddressObject[] | undefined): string[] {
	if (!field) return [];
	return (Array.isArray(field) ? field : [field]).flatMap((f) => f.value.map((v) => v.address ?? '').filter(Boolean));
}

function decodeEntities(value: string): string {
	return value.replace(/&amp;/g, '&').replace(/&#39;/g, "'").replace(/&quot;/g, '"').replace(/&lt;/g, '<').replace(/&gt;/g, '>');
}

export function extractLinks(html: string, text: string): string[] {
	const found: string[] = [];
	for (const match of html.matchAll(/href\s*=\s*(?:"([^"]*)"|'([^']*)')/gi)) found.push(decodeEntities(match[1] ?? match[2] ?? ''));
	for (const match of text.matchAll(/https?:\/\/[^\s<>"')\]]+/g)) found.push(match[0].replace(/[.,;:!?]+$/, ''));
	return [...new Set(found.filter((link) => /^https?:\/\//i.test(link)))];
}

function summarise(id: string, parsed: ParsedMail, envelope: CaughtMessage['envelope'], receivedAt: Date): CaughtMessage {
	const html = typeof parsed.html === 'string' ? parsed.html : '';
	const text = parsed.text ?? '';
	const headers: Record<string, string> = {};
	for (const line of parsed.headerLines) {
		const value = line.line.slice(line.line.indexOf(':') + 1).trim();
		headers[line.key] = headers[line.key] ? `${headers[line.key]}, ${value}` : value;
	}
	return {
		id,
		receivedAt: receivedAt.toISOString(),
		envelope,
		from: addresses(parsed.from)[0] ?? envelope.from,
		to: addresses(parsed.to),
		replyTo: addresses(parsed.replyTo)[0] ?? '',
		subject: parsed.subject ?? '',
		messageId: parsed.messageId ?? '',
		headers,
		text,
		html,
		links: extractLinks(html, text),
		attachments: parsed.attachments.map((a, index) => ({
			index,
			filename: a.filename ?? `attachment-${index + 1}`,
			contentType: a.contentType,
			size: a.size
		}))
	};
}

function writeAtomically(file: string, data: string | Buffer) {
	const temp = `${file}.${process.pid}.tmp`;
	fs.writeFileSync(temp, data);
	fs.renameSync(temp, file);
}

class Mailbox {
	private messages: CaughtMessage[] = [];
	private sequence = 0;

	constructor(private readonly dir: string) {
		fs.mkdirSync(dir, { recursive: true });
		for (const name of fs.readdirSync(dir)) {
			if (!name.endsWith('.json')) continue;
			try {
				this.messages.push(JSON.parse(fs.readFileSync(path.join(dir, name), 'utf8')));
			} catch {
				// A half-written file from a crash: the .eml is still there to look at by hand.
			}
		}
		this.messages.sort((a, b) => a.id.localeCompare(b.id));
	}

	nextId(): string {
		this.sequence = (this.sequence + 1) % 1000;
		return `${Date.now().toString().padStart(14, '0')}-${String(this.sequence).padStart(3, '0')}-${randomBytes(3).toString('hex')}`;
	}

	add(message: CaughtMessage, raw: Buffer) {
		writeAtomically(path.join(this.dir, `${message.id}.eml`), raw);
		writeAtomically(path.join(this.dir, `${message.id}.json`), JSON.stringify(message, null, 2));
		this.messages.push(message);
	}

	list(to?: string): CaughtMessage[] {
		const wanted = to?.toLowerCase();
		const all = wanted
			? this.messages.filter((m) => [...m.to, ...m.envelope.to].some((a) => a.toLowerCase() === wanted))
			: this.messages;
		return [...all].reverse();
	}

	get(id: string): CaughtMessage | undefined {
		return this.messages.find((m) => m.id === id);
	}

	raw(id: string): Buffer | null {
		if (!this.get(id)) return null;
		return fs.readFileSync(path.join(this.dir, `${id}.eml`));
	}

	remove(id?: string): number {
		const doomed = id ? this.messages.filter((m) => m.id === id) : this.messages;
		for (const m of doomed) {
			fs.rmSync(path.join(this.dir, `${m.id}.eml`), { force: true });
			fs.rmSync(path.join(this.dir, `${m.id}.json`), { force: true });
		}
		const count = doomed.length;
		this.messages = id ? this.messages.filter((m) => m.id !== id) : [];
		return count;
	}
}

function refusal(code: number, message: string): Error & { responseCode: number } {
	return Object.assign(new Error(message), { responseCode: code });
}

function sendJson(res: http.ServerResponse, status: number, body: unknown) {
	const text = JSON.stringify(body);
	res.writeHead(status, { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' });
	res.end(text);
}

function listen(server: { listen: (port: number, host: string, cb: () => void) => unknown; once: (e: 'error', cb: (err: Error) => void) => unknown }, port: number, host: string) {
	return new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(port, host, () => resolve());
	});
}

/** Starts the SMTP server and its JSON API; port 0 picks free ports. */
export async function startMailCatcher(options: CatcherOptions): Promise<MailCatcher> {
	const host = options.host ?? '127.0.0.1';
	const log = options.log ?? (() => {});
	const mailbox = new Mailbox(options.dir);

	const smtp = new SMTPServer({
		name: 'mail-catcher.localhost',
		banner: 'Local mail catcher: nothing is delivered to real inboxes',
		authOptional: true,
		disabledCommands: ['STARTTLS'],
		size: MAX_MESSAGE_BYTES,
		closeTimeout: 500,
		logger: false,
		onAuth(_auth, _session, callback) {
			callback(null, { user: 'local' });
		},
		onRcptTo(address, _session, callback) {
			const local = address.address.toLowerCase();
			if (local.startsWith('reject')) return callback(refusal(550, `5.1.1 <${address.address}>: mailbox unavailable (the local mail catcher refuses "reject…" addresses)`));
			if (local.startsWith('defer')) return callback(refusal(451, `4.3.0 <${address.address}>: try again later (the local mail catcher defers "defer…" addresses)`));
			callback();
		},
		onData(stream, session, callback) {
			const chunks: Buffer[] = [];
			stream.on('data', (chunk: Buffer) => chunks.push(chunk));
			stream.on('error', (err: Error) => callback(err));
			stream.on('end', async () => {
				if (stream.sizeExceeded) return callback(refusal(552, 'Message exceeds the size limit of the local mail catcher'));
				const raw = Buffer.concat(chunks);
				try {
					const parsed = await simpleParser(raw);
					const envelope = {
						from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
						to: session.envelope.rcptTo.map((r) => r.address)
					};
					const message = summarise(mailbox.nextId(), parsed, envelope, new Date());
					mailbox.add(message, raw);
					log(`[mail catcher] caught "${message.subject}" for ${envelope.to.join(', ')}`);
					callback(null, `Caught as ${message.id}`);
				} catch (err) {
					callback(refusal(451, `Could not store the message: ${err instanceof Error ? err.message : err}`));
				}
			});
		}
	});
	smtp.on('error', (err: Error) => log(`[mail catcher] SMTP error: ${err.message}`));

	const api = http.createServer(async (req, res) => {
		try {
			const url = new URL(req.url ?? '/', 'http://catcher.localhost');
			const parts = url.pathname.split('/').filter(Boolean);
			if (parts[0] !== 'messages') {
				if (parts.length === 0 && req.method === 'GET') {
					return sendJson(res, 200, { catcher: 'LOCAL MAIL CATCHER — nothing is delivered to real inboxes', smtp: smtpUrl, messages: mailbox.list().length });
				}
				return sendJson(res, 404, { message: 'Not found' });
			}
			const message = parts[1] ? mailbox.get(parts[1]) : undefined;
			if (req.method === 'DELETE') {
				if (parts.length === 1) return sendJson(res, 200, { deleted: mailbox.remove() });
				if (parts.length === 2 && message) return sendJson(res, 200, { deleted: mailbox.remove(message.id) });
				return sendJson(res, 404, { message: 'No such message' });
			}
			if (req.method !== 'GET') return sendJson(res, 405, { message: 'Use GET or DELETE' });
			if (parts.length === 1) {
				const limit = Math.min(Math.max(Number(url.searchParams.get('limit') ?? 200) || 200, 1), 1000);
				return sendJson(res, 200, { messages: mailbox.list(url.searchParams.get('to') ?? undefined).slice(0, limit) });
			}
			if (!message) return sendJson(res, 404, { message: 'No such message' });
			if (parts.length === 2) return sendJson(res, 200, message);
			if (parts.length === 3 && parts[2] === 'raw') {
				res.writeHead(200, { 'content-type': 'message/rfc822', 'content-disposition': `attachment; filename="${message.id}.eml"` });
				return res.end(mailbox.raw(message.id));
			}
			if (parts.length === 4 && parts[2] === 'attachments' && /^\d+$/.test(parts[3])) {
				const parsed = await simpleParser(mailbox.raw(message.id)!);
				const attachment = parsed.attachments[Number(parts[3])];
				if (!attachment) return sendJson(res, 404, { message: 'No such attachment' });
				const filename = (attachment.filename ?? `attachment-${Number(parts[3]) + 1}`).replace(/["\\\r\n]/g, '_');
				res.writeHead(200, {
					'content-type': attachment.contentType,
					'content-length': String(attachment.content.length),
					'content-disposition': `attachment; filename="${filename}"`
				});
				return res.end(attachment.content);
			}
			return sendJson(res, 404, { message: 'Not found' });
		} catch (err) {
			sendJson(res, 500, { message: err instanceof Error ? err.message : String(err) });
		}
	});

	await listen(smtp.server, options.smtpPort ?? 0, host);
	try {
		await listen(api, options.httpPort ?? 0, host);
	} catch (err) {
		await new Promise<void>((resolve) => smtp.close(() => resolve()));
		throw err;
	}
	const smtpPort = (smtp.server.address() as AddressInfo).port;
	const httpPort = (api.address() as AddressInfo).port;
	const smtpUrl = `smtp://${host}:${smtpPort}`;
	return {
		smtpPort,
		httpPort,
		smtpUrl,
		apiUrl: `http://${host}:${httpPort}`,
		stop: () =>
			Promise.all([
				new Promise<void>((resolve) => smtp.close(() => resolve())),
				new Promise<void>((resolve) => {
					api.close(() => resolve());
					api.closeAllConnections();
				})
			]).then(() => undefined)
	};
}

async function main() {
	const dir = path.resolve(argument('dir') ?? process.env.MAIL_FAKE_DIR ?? path.join(process.env.MENDWISE_DATA_DIR ?? '.data', 'mail'));
	const catcher = await startMailCatcher({
		dir,
		smtpPort: Number(argument('smtp-port') ?? process.env.MAIL_FAKE_SMTP_PORT ?? 2525),
		httpPort: Number(argument('http-port') ?? process.env.MAIL_FAKE_HTTP_PORT ?? 2580),
		log: (line) => console.log(line)
	});
	announce([
		'LOCAL MAIL CATCHER — nothing is delivered to real inboxes',
		`SMTP ${catcher.smtpUrl}    API ${catcher.apiUrl}/messages`,
		`Messages are kept in ${dir}`,
		'Read them at /dev/mailbox in the app (MAIL_CATCHER_URL must point at the API).',
		'Recipients starting with "reject" are refused (550), "defer" deferred (451).'
	]);
	stopOnSignal(() => catcher.stop());
}

runAsMain(import.meta.url, 'mail catcher', main);
