import type { Cookies } from '@sveltejs/kit';
import type { Session } from 'lucia';
import { lucia } from './lucia';

export function setSessionCookie(cookies: Cookies, session: Session): void {
	const cookie = lucia.createSessionCookie(session.id);
	cookies.set(cookie.name, cookie.value, { path: '.', ...cookie.attributes });
}

export function clearSessionCookie(cookies: Cookies): void {
	const blank = lucia.createBlankSessionCookie();
	cookies.set(blank.name, blank.value, { path: '.', ...blank.attributes });
}

/** Only same-site paths may follow a sign-in; anything else goes home. */
export function safeNext(next: string | null): string {
	return next && next.startsWith('/') && !next.startsWith('//') && !next.startsWith('/\\') ? next : '/home';
}
