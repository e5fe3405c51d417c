// Reads the local mail catcher (scripts/mail-fake.ts) for the development mailbox page. Only
// active when MAIL_CATCHER_URL is set; a shop sees only the messages its own outbox sent.
import { Op } from 'sequelize';
import { OutboxMessage } from '../db/outbox-model';

export interface CaughtAttachment {
	index: number;
	filename: string;
	contentType: string;
	size: number;
}

/** One message as the catcher keeps it (the shape of its JSON API). */
export interface CaughtMessage {
	id: string;
	receivedAt: string;
	/** SMTP envelope: who the client said it was from and to. */
	envelope: { from: string; to: string[] };
	from: string;
	to: string[];
	replyTo: string;
	subject: string;
	messageId: string;
	headers: Record<string, string>;
	text: string;
	html: string;
	/** http(s) links found in the HTML and text bodies, in order, without repeats. */
	links: string[];
	attachments: CaughtAttachment[];
}

export class CatcherUnavailable extends Error {}

/** The catcher's API address, or null outside development (the mailbox page is then a 404). */
export function catcherUrl(): string | null {
	const url = process.env.MAIL_CATCHER_URL?.trim();
	return url ? url.replace(/\/+$/, '') : null;
}

async function call(path: string): Promise<Response> {
	const base = catcherUrl();
	if (!base) throw new CatcherUnavailable('MAIL_CATCHER_URL is not set.');
	try {
		return await fetch(base + path, { signal: AbortSignal.timeout(5_000) });
	} catch (e) {
		throw new CatcherUnavailable(`The local mail catcher at ${base} does not answer (${e instanceof Error ? e.message : e}). Is it running?`);
	}
}

/** The catcher's messages that this shop's outbox sent, newest first. */
export async function listForShop(shopId: string, limit = 200): Promise<CaughtMessage[]> {
	const res = await call(`/messages?limit=${limit}`);
	if (!res.ok) throw new CatcherUnavailable(`The local mail catcher answered ${res.status}.`);
	const { messages } = (await res.json()) as { messages: CaughtMessage[] };
	const ids = [...new Set(messages.map((m) => m.messageId).filter(Boolean))];
	if (ids.length === 0) return [];
	const ours = await OutboxMessage.findAll({ where: { shopId, messageId: { [Op.in]: ids } }, attributes: ['messageId'] });
	const allowed = new Set(ours.map((o) => o.messageId));
	return messages.filter((m) => allowed.has(m.messageId));
}

/** One caught message if this shop's outbox sent it, else null. */
export async function getForShop(shopId: string, id: string): Promise<CaughtMessage | null> {
	if (!/^[\w-]{1,80}$/.test(id)) return null;
	const res = await call(`/messages/${id}`);
	if (res.status === 404) return null;
	if (!res.ok) throw new CatcherUnavailable(`The local mail catcher answered ${res.status}.`);
	const message = (await res.json()) as CaughtMessage;
	const ours = await OutboxMessage.count({ where: { shopId, messageId: message.messageId } });
	return ours > 0 ? message : null;
}

/** The bytes of an attachment of one of this shop's caught messages, or null. */
export async function attachmentForShop(shopId: string, id: string, index: number) {
	const message = await getForShop(shopId, id);
	const meta = message?.attachments[index];
	if (!message || !meta) return null;
	const res = await call(`/messages/${id}/attachments/${index}`);
	if (!res.ok) return null;
	return { filename: meta.filename, contentType: meta.contentType, content: new Uint8Array(await res.arrayBuffer()) };
}
