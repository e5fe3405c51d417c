// The route tree read from src/routes, so the sweeps of hostile input and foreign ids notice a new
// route, action or method the day it is added.
import fs from 'node:fs';
import path from 'node:path';
import { root } from './app';

export interface RouteFolder {
	/** As SvelteKit names it: "/jobs/[id]/quote" (route groups left out). */
	id: string;
	dir: string;
	files: string[];
}

export function routeTree(): RouteFolder[] {
	const base = path.join(root, 'src', 'routes');
	const found: RouteFolder[] = [];
	const walk = (dir: string) => {
		const entries = fs.readdirSync(dir, { withFileTypes: true });
		const files = entries.filter((e) => e.isFile() && /^\+(page|server)/.test(e.name)).map((e) => e.name);
		if (files.length) {
			const rel = path.relative(base, dir).split(path.sep).filter((s) => s && !/^\(.*\)$/.test(s));
			found.push({ id: '/' + rel.join('/'), dir, files });
		}
		for (const e of entries) if (e.isDirectory()) walk(path.join(dir, e.name));
	};
	walk(base);
	return found;
}

/** Action names of a route's +page.server.ts, read from its source ("default" for a default action). */
export function actionsOf(dir: string): string[] {
	const file = path.join(dir, '+page.server.ts');
	if (!fs.existsSync(file)) return [];
	const source = fs.readFileSync(file, 'utf8');
	const at = source.indexOf('export const actions');
	if (at < 0) return [];
	return [...source.slice(at).matchAll(/^\t(\w+): (?:async|drainingBody)/gm)].map((m) => m[1]);
}

/** Methods a route's +server.ts exports. */
export function methodsOf(dir: string): string[] {
	const file = path.join(dir, '+server.ts');
	if (!fs.existsSync(file)) return [];
	return [...fs.readFileSync(file, 'utf8').matchAll(/export const (GET|POST|PUT|PATCH|DELETE)\b/g)].map((m) => m[1]);
}

/** The route a concrete address belongs to: static segments win over parameters, as in SvelteKit. */
export function routeOf(address: string, tree = routeTree()): string | null {
	const segments = address.split('?')[0].split('/').filter(Boolean);
	let best: { id: string; score: number } | null = null;
	for (const route of tree) {
		const parts = route.id.split('/').filter(Boolean);
		if (parts.length !== segments.length) continue;
		let score = 0;
		const fits = parts.every((part, i) => {
			if (part === segments[i]) return (score += 2), true;
			const pattern = new RegExp('^' + part.replace(/[.*+?^${}()|\\]/g, '\\$&').replace(/\\?\[(\w+)\\?\]/g, '[^/]+') + '$');
			return pattern.test(segments[i]) && (score += 1);
		});
		if (fits && (!best || score > best.score)) best = { id: route.id, score };
	}
	return best?.id ?? null;
}
