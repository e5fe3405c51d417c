// Types for bootstrap.mjs, for the TypeScript tests that start clusters and app processes with it.
import type { ChildProcess, SpawnSyncOptions, SpawnSyncReturns, SpawnOptions } from 'node:child_process';

export const root: string;
export const dataDir: string;
export const tsx: string;
export const buildDir: string;

export function log(message: string): void;
export function run(cmd: string, args: string[], options?: SpawnSyncOptions): SpawnSyncReturns<Buffer>;
export function ensureDependencies(): void;
export function ensureDebianPackages(wanted: { pkg: string; file: string }[]): void;
export function postgresBinDir(): string | null;
export function ensurePostgresInstalled(): void;
export function portFree(port: number): Promise<boolean>;
export function freePort(preferred: number): Promise<number>;

export interface Cluster {
	dir: string;
	password: string;
	port: number;
	superUrl: string;
	appUrl(db: string): string;
	stop(): void;
	restart(): void;
}
export function startCluster(options: { name: string; durable: boolean }): Promise<Cluster>;

export interface Child {
	child: ChildProcess;
	stop(): Promise<void>;
}
export function startChild(label: string, cmd: string, args: string[], options?: SpawnOptions): Child;
export function paymentFakeEnv(port: number): Record<string, string>;
export function waitForHttp(url: string, timeoutMs?: number): Promise<void>;
export function dbTask(command: string, env: Record<string, string | undefined>): void;
export function database(options: { name: string; dbName: string; durable: boolean; urlVariable?: string }): Promise<{
	url: string;
	superUrl: string | undefined;
	cluster: Cluster | null;
}>;
