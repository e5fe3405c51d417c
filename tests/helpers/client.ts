// A small HTTP client with a cookie jar, talking to the built app the test run started.
export const BASE_URL = process.env.MENDWISE_TEST_URL ?? 'http://127.0.0.1:4310';

export interface Reply {
	status: number;
	location: string | null;
	text: string;
	headers: Headers;
	json<T = any>(): T;
}

export class Client {
	cookies = new Map<string, string>();
	constructor(
		readonly base = BASE_URL,
		readonly extraHeaders: Record<string, string> = {}
	) {}

	get cookieHeader(): string {
		return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
	}

	async request(method: string, path: string, init: { body?: BodyInit; headers?: Record<string, string> } = {}): Promise<Reply> {
		const res = await fetch(this.base + path, {
			method,
			redirect: 'manual',
			body: init.body,
			headers: { ...this.extraHeaders, ...(this.cookies.size ? { cookie: this.cookieHeader } : {}), ...init.headers }
		});
		for (const line of res.headers.getSetCookie()) {
			const [pair] = line.split(';');
			const eq = pair.indexOf('=');
			const name = pair.slice(0, eq).trim();
			const value = pair.slice(eq + 1).trim();
			if (value === '' || /max-age=0/i.test(line)) this.cookies.delete(name);
			else this.cookies.set(name, value);
		}
		const text = await res.text();
		return {
			status: res.status,
			location: res.headers.get('location'),
			text,
			headers: res.headers,
			json: () => JSON.parse(text)
		};
	}

	get(path: string, headers?: Record<string, string>) {
		return this.request('GET', path, { headers });
	}

	/** A form post as a browser without JavaScript sends it (same origin unless told otherwise). */
	form(path: string, fields: Record<string, string>, origin = this.base) {
		return this.request('POST', path, {
			body: new URLSearchParams(fields).toString(),
			headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html', origin }
		});
	}

	postJson(path: string, body: unknown, headers: Record<string, string> = {}) {
		return this.request('POST', path, {
			body: typeof body === 'string' ? body : JSON.stringify(body),
			headers: { 'content-type': 'application/json', origin: this.base, ...headers }
		});
	}

	async signIn(email: string, password: string): Promise<Reply> {
		const reply = await this.form('/signin', { email, password });
		if (reply.status !== 303) throw new Error(`sign-in of ${email} failed with ${reply.status}`);
		return reply;
	}
}

export async function signedIn(email: string, password: string, base = BASE_URL): Promise<Client> {
	const client = new Client(base);
	await client.signIn(email, password);
	return client;
}
