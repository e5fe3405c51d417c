import { randomUUID } from 'node:crypto';
import { error, type Handle, type HandleServerError, type ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { lucia } from '$lib/server/auth/lucia';
import { closeDb, db } from '$lib/server/db';
import * as outbox from '$lib/server/mail/outbox';
import { answering } from '$lib/server/answering';

/** Requests being answered, for shutting down (below). */
const requests = answering();

export const init: ServerInit = async () => {
	db();
	// Without SMTP_URL this only warns: e-mail then waits in the outbox.
	const stopMail = outbox.startWorker();
	// Emitted once every connection has closed. A request whose client went away may still be
	// running: let it finish (10 s at most), then the sending loop, then the pool, so the process
	// exits at once and no request finds the pool closed.
	process.once('sveltekit:shutdown', async () => {
		await requests.settled(10_000);
		await stopMail();
		await closeDb();
	});
};

const countRequests: Handle = ({ event, resolve }) => requests.count(async () => resolve(event));

/**
 * Refuses unreadable bodies with a 400 (below), and reads and drops a body the route answered
 * without reading (a 401, 403 or 404 before the form is parsed): the Node adapter pauses an
 * unread body, and the next request on the same keep-alive connection would wait until the server
 * gives up on it. The answer goes out at once; the rest of the upload is read in the background,
 * never past BODY_SIZE_LIMIT.
 */
const guardBody: Handle = async ({ event, resolve }) => {
	readableOr400(event.request);
	try {
		return await resolve(event);
	} finally {
		const body = event.request.body;
		if (body && !event.request.bodyUsed && !body.locked) void discard(body);
	}
};

/**
 * A body that says it is a form (or JSON) but cannot be read as one — a text/plain post, a
 * multipart body with a wrong boundary — is the sender's mistake: a 400 with a message, not a 500.
 * The size limit keeps its own 413.
 */
function readableOr400(request: Request): void {
	const formData = request.formData.bind(request);
	const readJson = request.json.bind(request);
	const refuse = (e: unknown, what: string): never => {
		if (e && typeof e === 'object' && 'status' in e && typeof e.status === 'number' && e.status < 500) throw e;
		error(400, `The ${what} could not be read. Send it again from the page.`);
	};
	Object.defineProperties(request, {
		formData: { value: () => formData().then(withoutNul, (e) => refuse(e, 'form')) },
		json: { value: () => readJson().catch((e) => refuse(e, 'JSON body')) }
	});
}

/** PostgreSQL stores no NUL character (in text or JSON): a form holding one is refused whole. */
function withoutNul(form: FormData): FormData {
	for (const [, value] of form) {
		if (typeof value === 'string' && value.includes('\u0000')) {
			error(400, 'The form holds a character that cannot be saved (a NUL). Remove it and send the form again.');
		}
	}
	return form;
}

async function discard(body: ReadableStream<Uint8Array>): Promise<void> {
	try {
		const reader = body.getReader();
		while (!(await reader.read()).done);
	} catch {
		// The client went away or the body passed the size limit: nothing more arrives.
	}
}

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

export const handle = sequence(countRequests, guardBody, securityHeaders, authenticate);

/** Refusals SvelteKit makes itself before a route runs, in the product's words. */
const REFUSALS: Record<number, string> = {
	405: 'This address does not take that kind of request.',
	413: 'What was sent is larger than this address accepts.',
	415: 'Send this as a form or as JSON, as the page does.'
};

export const handleError: HandleServerError = ({ error, event, status, message }) => {
	if (status === 404) return { message: 'There is no page at this address.' };
	// The sender's mistake, not ours: no stack trace in the log, no reference to quote.
	if (status < 500) return { message: REFUSALS[status] ?? message };
	const id = randomUUID();
	console.error(`[error ${id}] ${event.request.method} ${event.url.pathname}`, error);
	return { message: 'Something went wrong on our side. Try again; if it keeps happening, give the shop this reference.', id };
};
