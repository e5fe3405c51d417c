// Web security as a browser sees it: headers on pages and APIs (a Content-Security-Policy with a
// nonce or hash and frame-ancestors 'none'), the session cookie's attributes, cross-site form
// posts refused, a new session id at every sign-in, keep-alive connections that survive an early
// refusal, and the main pages running in Chromium with no CSP violation.
import http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Customer, Session } from '../../src/lib/server/db/models';
import { startApp, type AppInstance } from '../helpers/app';
import { closeBrowsers, openBrowser } from '../helpers/browser';
import { BASE_URL, Client, signedIn } from '../helpers/client';
import { createShop, PASSWORD, type ShopFixture } from '../helpers/fixtures';
import { buildWorld, type World } from '../helpers/world';

const COOKIE = 'mendwise_session';
let world: World;
let owner: Client;

beforeAll(async () => {
	world = await buildWorld('Security');
	owner = await signedIn(world.shop.staff.owner.email, PASSWORD);
}, 60_000);

afterAll(async () => {
	await closeBrowsers();
});

function directives(header: string | null): Map<string, string[]> {
	const map = new Map<string, string[]>();
	for (const part of (header ?? '').split(';')) {
		const [name, ...values] = part.trim().split(/\s+/);
		if (name) map.set(name, values);
	}
	return map;
}

describe('security headers', () => {
	const pages = () => ['/signin', '/home', '/jobs', `/jobs/${world.jobId}`, `/jobs/${world.jobId}/quote`, '/customers', '/catalog', '/settings', `/q/${world.token}`];

	it('every page carries a strict CSP: scripts only from this site or with the nonce, no framing, no plugins', async () => {
		for (const path of pages()) {
			const reply = await (path.startsWith('/q/') || path === '/signin' ? new Client() : owner).get(path);
			expect(reply.status, path).toBe(200);
			const csp = directives(reply.headers.get('content-security-policy'));
			const scripts = csp.get('script-src') ?? [];
			expect(scripts, path).toContain("'self'");
			expect(scripts.some((s) => /^'(nonce-[\w+/=-]+|sha(256|384|512)-[\w+/=]+)'$/.test(s)), `${path}: ${scripts}`).toBe(true);
			expect(scripts, path).not.toContain("'unsafe-inline'");
			expect(scripts, path).not.toContain("'unsafe-eval'");
			expect(csp.get('frame-ancestors'), path).toEqual(["'none'"]);
			expect(csp.get('object-src'), path).toEqual(["'none'"]);
			expect(csp.get('base-uri'), path).toEqual(["'self'"]);
			expect(csp.get('form-action'), path).toEqual(["'self'"]);
			expect(csp.get('default-src'), path).toEqual(["'self'"]);

			// Every inline script carries the header's nonce; no inline event handlers.
			const nonce = scripts.find((s) => s.startsWith("'nonce-"))?.slice(7, -1);
			for (const tag of reply.text.match(/<script\b[^>]*>/g) ?? []) {
				if (/\bsrc=/.test(tag)) continue;
				expect(tag, path).toContain(`nonce="${nonce}"`);
			}
			expect(reply.text, path).not.toMatch(/<[^>]+\son(click|load|error|submit|mouseover)=/i);
		}
	});

	it('a new nonce for every response', async () => {
		const first = directives((await owner.get('/jobs')).headers.get('content-security-policy')).get('script-src');
		const second = directives((await owner.get('/jobs')).headers.get('content-security-policy')).get('script-src');
		expect(first).not.toEqual(second);
	});

	it('pages, JSON, files and errors all carry nosniff, a referrer policy and no framing', async () => {
		const replies = [
			await owner.get('/jobs'),
			await owner.get('/api/me'),
			await owner.get('/api/jobs'),
			await owner.get('/catalog/parts.csv'),
			await owner.get(`/jobs/${world.jobId}/photos/${world.photoId}`),
			await new Client().get('/api/health'),
			await new Client().get('/api/me'),
			await owner.get('/no-such-page'),
			await new Client().postJson('/api/payments/webhook', '{}')
		];
		for (const reply of replies) {
			expect(reply.headers.get('x-content-type-options')).toBe('nosniff');
			expect(reply.headers.get('referrer-policy')).toBe('same-origin');
			expect(reply.headers.get('x-frame-options')).toBe('DENY');
			expect(reply.headers.get('permissions-policy')).toContain('geolocation=()');
			expect(reply.headers.get('access-control-allow-origin')).toBeNull();
			expect(reply.headers.get('x-powered-by')).toBeNull();
		}
	});

	it('the customer page is not cached or indexed', async () => {
		const reply = await new Client().get(`/q/${world.token}`);
		expect(reply.headers.get('cache-control')).toContain('no-store');
		expect(reply.headers.get('x-robots-tag')).toBe('noindex');
	});
});

describe('the session cookie', () => {
	it('is HttpOnly, SameSite=Lax, site-wide, two weeks, and holds a random token', async () => {
		const reply = await new Client().form('/signin', { email: world.shop.staff.writer.email, password: PASSWORD });
		const cookie = reply.headers.getSetCookie().find((c) => c.startsWith(`${COOKIE}=`))!;
		expect(cookie).toMatch(/;\s*HttpOnly/i);
		expect(cookie).toMatch(/;\s*SameSite=Lax/i);
		expect(cookie).toMatch(/;\s*Path=\//i);
		expect(cookie).toMatch(/;\s*Max-Age=1209600/i);
		expect(cookie).not.toMatch(/;\s*Domain=/i);
		expect(cookie.split(';')[0].split('=')[1]).toMatch(/^[a-z0-9]{40}$/);
	});

	it('is Secure when the app is served over https', async () => {
		const app = await startApp({ ORIGIN: 'https://shop.mendwise.example' });
		try {
			const res = await fetch(`${app.url}/signin`, {
				method: 'POST', redirect: 'manual',
				headers: { 'content-type': 'application/x-www-form-urlencoded', origin: 'https://shop.mendwise.example', accept: 'text/html' },
				body: new URLSearchParams({ email: world.shop.staff.writer.email, password: PASSWORD })
			});
			expect(res.status).toBe(303);
			const cookie = res.headers.getSetCookie().find((c) => c.startsWith(`${COOKIE}=`))!;
			expect(cookie).toMatch(/;\s*Secure/i);
			expect(cookie).toMatch(/;\s*HttpOnly/i);
		} finally {
			await app.stop();
		}
	});

	it('sign-out clears it and ends the session in the database', async () => {
		const client = await signedIn(world.shop.staff.technician.email, PASSWORD);
		const reply = await client.form('/signout', {});
		const cleared = reply.headers.getSetCookie().find((c) => c.startsWith(`${COOKIE}=`))!;
		expect(cleared).toMatch(/Max-Age=0/i);
		expect((await client.get('/api/me')).status).toBe(401);
	});
});

describe('session fixation', () => {
	let shop: ShopFixture;
	beforeAll(async () => {
		shop = await createShop('Fixation');
	});

	it("a cookie planted before sign-in (even a valid session of the attacker's) is replaced", async () => {
		const attacker = await signedIn(shop.staff.technician.email, PASSWORD);
		const planted = attacker.cookies.get(COOKIE)!;
		const victim = new Client();
		victim.cookies.set(COOKIE, planted);
		await victim.signIn(shop.staff.owner.email, PASSWORD);
		const issued = victim.cookies.get(COOKIE)!;
		expect(issued).not.toBe(planted);
		// The planted cookie is still only the attacker's session; it never became the owner's.
		expect((await attacker.get('/api/me')).json().role).toBe('technician');
		expect((await victim.get('/api/me')).json().role).toBe('owner');
	});

	it('sign-up and accepting an invite also start brand-new sessions', async () => {
		const planted = 'a'.repeat(40);
		const signup = new Client();
		signup.cookies.set(COOKIE, planted);
		const email = `fixation.${Date.now()}@shop.example`;
		const reply = await signup.form('/signup', { shopName: 'Fixation Works', name: 'Ada Fixture', email, password: 'a-long-enough-password' });
		expect(reply.status).toBe(303);
		expect(signup.cookies.get(COOKIE)).not.toBe(planted);

		const invitee = new Client();
		invitee.cookies.set(COOKIE, planted);
		const accepted = await invitee.form(`/invite/${world.inviteToken}`, { name: 'Nell Ostrander', password: 'a-long-enough-password' });
		expect(accepted.status).toBe(303);
		const token = invitee.cookies.get(COOKIE)!;
		expect(token).not.toBe(planted);
		expect((await invitee.get('/api/me')).json().email).toBe(world.inviteEmail);
	});

	it('every sign-in stores a new session row; two sign-ins never share one', async () => {
		const before = await Session.count({ where: { userId: shop.staff.manager.id } });
		const one = await signedIn(shop.staff.manager.email, PASSWORD);
		const two = await signedIn(shop.staff.manager.email, PASSWORD);
		expect(one.cookies.get(COOKIE)).not.toBe(two.cookies.get(COOKIE));
		expect(await Session.count({ where: { userId: shop.staff.manager.id } })).toBe(before + 2);
	});
});

describe('cross-site requests', () => {
	const create = { name: 'Cross Site', phone: '', email: '', address: '', notes: '' };

	it('form posts from another origin, a null origin or none at all are refused and change nothing', async () => {
		const before = await Customer.count({ where: { shopId: world.shop.id } });
		const origins = ['http://elsewhere.example', 'null', BASE_URL.replace('127.0.0.1', 'localhost'), BASE_URL.replace('http:', 'https:')];
		for (const origin of origins) {
			const reply = await owner.form('/customers?/create', create, origin);
			expect(reply.status, origin).toBe(403);
			expect(reply.text, origin).toContain('Cross-site POST form submissions are forbidden');
		}
		for (const type of ['application/x-www-form-urlencoded', 'multipart/form-data; boundary=x', 'text/plain']) {
			const reply = await owner.request('POST', '/customers?/create', { body: 'name=Cross', headers: { 'content-type': type } });
			expect(reply.status, `${type} without origin`).toBe(403);
		}
		const body = new FormData();
		body.append('name', 'Cross Site');
		const multipart = await owner.request('POST', '/customers?/create', { body, headers: { origin: 'http://elsewhere.example' } });
		expect(multipart.status).toBe(403);
		expect(await Customer.count({ where: { shopId: world.shop.id } })).toBe(before);
	});

	it('the customer link takes form posts from this site only, like every page', async () => {
		const reply = await new Client().form(`/q/${world.token}?/decline`, { reason: 'Forged' }, 'http://elsewhere.example');
		expect(reply.status).toBe(403);
		expect((await new Client().get(`/q/${world.token}`)).text).not.toContain('Forged');
	});

	it('JSON endpoints grant no cross-origin reads: no CORS headers, and a preflight is not approved', async () => {
		const preflight = await owner.request('OPTIONS', '/api/pricing/evaluate', {
			headers: { origin: 'http://elsewhere.example', 'access-control-request-method': 'POST', 'access-control-request-headers': 'content-type' }
		});
		expect(preflight.headers.get('access-control-allow-origin')).toBeNull();
		expect(preflight.headers.get('access-control-allow-credentials')).toBeNull();
		const reply = await owner.postJson('/api/pricing/evaluate', {}, { origin: 'http://elsewhere.example' });
		expect(reply.headers.get('access-control-allow-origin')).toBeNull();
	});

	it('the payment webhook is the one public JSON door: reached without session or origin, and answered by its signature check', async () => {
		const reply = await new Client().request('POST', '/api/payments/webhook', {
			body: JSON.stringify({ id: 'evt_forged', type: 'checkout.session.completed' }),
			headers: { 'content-type': 'application/json', 'stripe-signature': 't=1,v1=forged' }
		});
		expect(reply.status).toBe(400);
		expect(reply.json().message).toMatch(/\w/);
	});
});

describe('keep-alive connections after an early refusal', () => {
	/** Two requests on one kept-alive connection; the second must not wait for the first's unread body. */
	async function onOneConnection(first: { method: string; path: string; headers: Record<string, string>; body: string }) {
		const agent = new http.Agent({ keepAlive: true, maxSockets: 1 });
		const send = (method: string, path: string, headers: Record<string, string> = {}, body?: string) =>
			new Promise<{ status: number; ms: number; port?: number }>((resolve, reject) => {
				const started = Date.now();
				const req = http.request(BASE_URL + path, { method, agent, headers }, (res) => {
					const port = res.socket?.localPort;
					res.resume();
					res.on('end', () => resolve({ status: res.statusCode!, ms: Date.now() - started, port }));
				});
				req.on('error', reject);
				req.end(body);
			});
		try {
			const refused = await send(first.method, first.path, first.headers, first.body);
			const next = await send('GET', '/api/health');
			return { refused, next };
		} finally {
			agent.destroy();
		}
	}

	const big = 'x=' + 'a'.repeat(400_000);
	const cases = (): { what: string; method: string; path: string; headers: Record<string, string>; body: string; status: number }[] => [
		{ what: 'an anonymous JSON post (401)', method: 'POST', path: '/api/pricing/evaluate', headers: { 'content-type': 'application/json' }, body: big, status: 401 },
		{ what: 'a form post to a missing job (404)', method: 'POST', path: `/jobs/${crypto.randomUUID()}/quote?/save`, headers: { 'content-type': 'application/x-www-form-urlencoded', origin: BASE_URL, cookie: owner.cookieHeader, accept: 'text/html' }, body: big, status: 404 },
		{ what: 'a form post above the role (403)', method: 'POST', path: '/team?/invite', headers: { 'content-type': 'application/x-www-form-urlencoded', origin: BASE_URL, cookie: technicianCookie, accept: 'text/html' }, body: big, status: 403 },
		{ what: 'a post to a GET-only address (405)', method: 'POST', path: '/api/me', headers: { 'content-type': 'application/json' }, body: big, status: 405 }
	];
	let technicianCookie = '';
	beforeAll(async () => {
		technicianCookie = (await signedIn(world.shop.staff.technician.email, PASSWORD)).cookieHeader;
	});

	it('the next request on the same connection is answered at once', async () => {
		for (const c of cases()) {
			const { refused, next } = await onOneConnection(c);
			expect(refused.status, c.what).toBe(c.status);
			expect(next.status, c.what).toBe(200);
			// Without draining, the second request waited for the server's 5 s keep-alive timeout.
			expect(next.ms, c.what).toBeLessThan(2_000);
		}
	});
});

describe('in a real browser', () => {
	it('the main pages and the customer page run with no CSP violation and no script error', async () => {
		const context = await openBrowser();
		const problems: string[] = [];
		const page = await context.newPage();
		page.on('console', (m) => {
			if (/Refused to|Content Security Policy|violates/i.test(m.text()) || m.type() === 'error') problems.push(`${page.url()}: ${m.text()}`);
		});
		page.on('pageerror', (e) => problems.push(`${page.url()}: ${e.message}`));
		await page.addInitScript(() => {
			document.addEventListener('securitypolicyviolation', (e) => console.error(`Refused to load: ${e.violatedDirective} ${e.blockedURI}`));
		});

		await page.goto(`${BASE_URL}/signin`);
		await page.getByLabel('E-mail').fill(world.shop.staff.owner.email);
		await page.getByLabel('Password').fill(PASSWORD);
		await Promise.all([page.waitForURL('**/home'), page.getByRole('button', { name: /sign in/i }).click()]);

		const paths = ['/home', '/jobs', `/jobs/${world.jobId}`, `/jobs/${world.jobId}/quote`, `/jobs/${world.approvedJobId}/actuals`, `/jobs/${world.approvedJobId}/payments`, '/customers', `/customers/${world.customerId}`, `/units/${world.unitId}`, '/catalog', '/specs', `/specs/${world.specId}`, '/settings', '/team', '/payments', '/reports', '/account'];
		for (const path of paths) {
			const response = await page.goto(BASE_URL + path, { waitUntil: 'networkidle' });
			expect(response?.status(), path).toBe(200);
			// Hydrated: client-side navigation works, so the module scripts ran under the policy.
			expect(await page.evaluate(() => document.querySelectorAll('script[nonce]').length), path).toBeGreaterThan(0);
		}
		// A client-side navigation (no full load) also stays within the policy.
		await page.goto(`${BASE_URL}/jobs`, { waitUntil: 'networkidle' });
		await page.locator('a[href="/customers"]').first().click();
		await page.waitForURL('**/customers');

		const customer = await (await openBrowser()).newPage();
		customer.on('console', (m) => {
			if (/Refused to|Content Security Policy|violates/i.test(m.text()) || m.type() === 'error') problems.push(`customer: ${m.text()}`);
		});
		customer.on('pageerror', (e) => problems.push(`customer: ${e.message}`));
		const response = await customer.goto(`${BASE_URL}/q/${world.token}`, { waitUntil: 'networkidle' });
		expect(response?.status()).toBe(200);
		await customer.getByText(/Replace the alternator head/).first().waitFor();

		expect(problems).toEqual([]);
	}, 120_000);
});
