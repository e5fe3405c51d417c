import { randomUUID } from 'node:crypto';
import type { Handle, HandleServerError, ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { lucia } from '$lib/server/auth/lucia';
import { closeDb, db } from '$lib/server/db';
import * as outbox from '$lib/server/mail/outbox';

export const init: ServerInit = async () => {
	db();
	// Without SMTP_URL this only warns: e-mail then waits in the outbox.
	const stopMail = outbox.startWorker();
	// Emitted once every request has finished: let the sending loop end, then the pool, so the
	// process exits at once.
	process.once('sveltekit:shutdown', async () => {
		await stopMail();
		await closeDb();
	});
};

const securityHeaders: Handle = async ({ event, resolve }) => {
	const response = await resolve(event);
	response.headers.set('X-Content-Type-Options', 'nosniff');
	response.headers.set('Referrer-Policy', 'same-origin');
	response.headers.set('X-Frame-Options', 'DENY');
	response.headers.set('Permissions-Policy', 'camera=(self), microphone=(), geolocation=()');
	return response;
};

/** Reads the session cookie once per request; routes ask `locals`, never the cookie. */
const authenticate: Handle = async ({ event, resolve }) => {
	const token = event.cookies.get(lucia.sessionCookieName);
	event.locals.user = null;
	event.locals.session = null;
	if (token) {
		const { session, user } = await lucia.validateSession(token);
		if (session?.fresh) {
			const cookie = lucia.createSessionCookie(session.id);
			event.cookies.set(cookie.name, cookie.value, { path: '.', ...cookie.attributes });
		}
		if (!session) {
			const blank = lucia.createBlankSessionCookie();
			event.cookies.set(blank.name, blank.value, { path: '.', ...blank.attributes });
		}
		if (session && user) {
			event.locals.session = session;
			event.locals.user = { id: user.id, shopId: user.shopId, role: user.role, name: user.name, email: user.email };
		}
	}
	return resolve(event);
};

export const handle = sequence(securityHeaders, authenticate);

export const handleError: HandleServerError = ({ error, event, status }) => {
	if (status === 404) return { message: 'There is no page at this address.' };
	const id = randomUUID();
	console.error(`[error ${id}] ${event.request.method} ${event.url.pathname}`, error);
	return { message: 'Something went wrong on our side. Try again; if it keeps happening, give the shop this reference.', id };
};
