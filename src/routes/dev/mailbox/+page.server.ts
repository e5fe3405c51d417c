import { error } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';
import { requireUser } from '$lib/server/auth/guard';
import * as catcher from '$lib/server/mail/catcher';

export const load: PageServerLoad = async ({ url }) => {
	const user = requireUser();
	if (!catcher.catcherUrl()) error(404, 'There is no page at this address.');
	let messages: catcher.CaughtMessage[];
	try {
		messages = await catcher.listForShop(user.shopId);
	} catch (e) {
		if (e instanceof catcher.CatcherUnavailable) return { unavailable: e.message, messages: [], selected: null };
		throw e;
	}
	const wanted = url.searchParams.get('id');
	const selected = messages.find((m) => m.id === wanted) ?? messages[0] ?? null;
	return {
		unavailable: null,
		messages: messages.map((m) => ({ id: m.id, subject: m.subject, to: m.to.join(', '), receivedAt: m.receivedAt, attachments: m.attachments.length })),
		selected: selected && {
			id: selected.id,
			subject: selected.subject,
			from: selected.from,
			to: selected.to.join(', '),
			replyTo: selected.replyTo,
			receivedAt: selected.receivedAt,
			messageId: selected.messageId,
			text: selected.text,
			html: selected.html,
			links: selected.links,
			attachments: selected.attachments
		}
	};
};
