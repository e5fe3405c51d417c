// The SMTP connection: nodemailer, pooled, configured from SMTP_URL. The same code talks to the
// local mail catcher in development and to the real relay in production.
import nodemailer, { type Transporter } from 'nodemailer';

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '::1', '[::1]']);

/** SMTP_URL, or null when e-mail is not configured (messages then wait in the outbox). */
export function smtpUrl(): string | null {
	const url = process.env.SMTP_URL?.trim();
	return url ? url : null;
}

/** The From address of every message; each shop's name is shown as the sender's name. */
export function fromAddress(): string {
	const configured = process.env.MAIL_FROM?.trim();
	if (configured) {
		const angle = /<([^>]+)>/.exec(configured);
		return angle ? angle[1] : configured;
	}
	return 'no-reply@mendwise.localhost';
}

/** The right-hand side of our Message-IDs. */
export function messageIdDomain(): string {
	return fromAddress().split('@')[1] || 'mendwise.localhost';
}

/** A pooled transport for `url`. Loopback servers (the mail catcher) are spoken to in plain text. */
export function createTransport(url: string): Transporter {
	const parsed = new URL(url);
	if (parsed.protocol !== 'smtp:' && parsed.protocol !== 'smtps:') {
		throw new Error(`SMTP_URL must start with smtp:// or smtps:// (got ${parsed.protocol}//…)`);
	}
	const loopback = LOOPBACK.has(parsed.hostname);
	return nodemailer.createTransport({
		url,
		pool: true,
		maxConnections: 3,
		maxMessages: 100,
		// The outbox does the retrying; the pool only retries a message once when an idle
		// connection it picked turns out to be closed.
		maxRequeues: 1,
		connectionTimeout: 10_000,
		greetingTimeout: 10_000,
		socketTimeout: 60_000,
		ignoreTLS: loopback,
		// Attachments are always buffers we made: never let a message read files or fetch URLs.
		disableFileAccess: true,
		disableUrlAccess: true
	});
}

let shared: Transporter | null = null;

/** This process's transport for SMTP_URL, made on first use. */
export function transport(): Transporter {
	const url = smtpUrl();
	if (!url) throw new Error('SMTP_URL is not set: e-mail stays queued in the outbox.');
	shared ??= createTransport(url);
	return shared;
}

export function closeTransport(): void {
	shared?.close();
	shared = null;
}

/** The host and port of an SMTP URL without its credentials, for log lines. */
export function describeSmtp(url: string): string {
	const parsed = new URL(url);
	return `${parsed.protocol}//${parsed.hostname}${parsed.port ? ':' + parsed.port : ''}`;
}
