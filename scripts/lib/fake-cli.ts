// The command-line tail the local fakes share: flags, the loud banner, stopping on a signal, and
// running only when started as a program (tests import the same modules and start them in-process).
import path from 'node:path';
import { pathToFileURL } from 'node:url';

/** The value after `--name` on the command line. */
export function argument(name: string): string | undefined {
	const index = process.argv.indexOf(`--${name}`);
	return index >= 0 ? process.argv[index + 1] : undefined;
}

/** The banner a fake opens with, so nobody takes it for the real service. */
export function announce(lines: string[]): void {
	const rule = '='.repeat(72);
	console.log([rule, ...lines.map((line) => `  ${line}`), rule].join('\n'));
}

/** Stops the service once on SIGINT or SIGTERM, then exits. */
export function stopOnSignal(stop: () => Promise<void>): void {
	let stopping = false;
	const once = async () => {
		if (stopping) return;
		stopping = true;
		await stop();
		process.exit(0);
	};
	process.on('SIGINT', once);
	process.on('SIGTERM', once);
}

/** Runs `main` when the module at `moduleUrl` is the program that was started. */
export function runAsMain(moduleUrl: string, name: string, main: () => Promise<void>): void {
	if (!process.argv[1] || moduleUrl !== pathToFileURL(path.resolve(process.argv[1])).href) return;
	main().catch((err) => {
		console.error(`[${name}] could not start: ${err instanceof Error ? err.message : err}`);
		process.exit(1);
	});
}
