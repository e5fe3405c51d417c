// Starts another instance of the built app (same database) for tests that need their own settings.
import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';

export const root = path.resolve(import.meta.dirname, '..', '..');

export function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const server = net.createServer();
		server.once('error', reject);
		server.listen(0, '127.0.0.1', () => {
			const { port } = server.address() as net.AddressInfo;
			server.close(() => resolve(port));
		});
	});
}

export async function waitFor(url: string, timeoutMs = 30_000): Promise<void> {
	const until = Date.now() + timeoutMs;
	while (Date.now() < until) {
		try {
			const res = await fetch(url);
			if (res.status < 500) return;
		} catch {
			// starting
		}
		await new Promise((r) => setTimeout(r, 100));
	}
	throw new Error(`${url} did not come up`);
}

export interface AppInstance {
	url: string;
	process: ChildProcess;
	stop(): Promise<void>;
}

export async function startApp(env: Record<string, string> = {}): Promise<AppInstance> {
	const port = await freePort();
	const url = `http://127.0.0.1:${port}`;
	const child = spawn(process.execPath, [path.resolve(root, process.env.MENDWISE_BUILD_DIR ?? 'build', 'index.js')], {
		env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: url, ...env },
		stdio: ['ignore', 'ignore', 'inherit']
	});
	await waitFor(`${url}/api/health`);
	return {
		url,
		process: child,
		stop: () =>
			new Promise((resolve) => {
				if (child.exitCode !== null) return resolve();
				child.once('exit', () => resolve());
				child.kill('SIGTERM');
			})
	};
}
