import { createHash } from 'node:crypto';
import type pg from 'pg';
import { RETRYABLE, db, sqlLog } from '.';

/**
 * Runs a read-only statement as a named prepared statement on a connection of the shared pool.
 * PostgreSQL parses and analyses it once per connection (and keeps a generic plan when that is
 * no dearer than planning each time), which on the hot paths costs more than running it.
 *
 * `sql` takes `:name` placeholders filled from `values`, sent as parameters, never spliced in. The
 * text should vary only with the shape of a request, not its values; even so a connection keeps at
 * most PREPARED_PER_CONNECTION statements, and past that runs new texts unprepared.
 *
 * `reusePlan: false` runs the statement unnamed, so PostgreSQL plans it for these very values each
 * time: for a statement whose best plan depends on them (a search for a rare serial number wants
 * the trigram index; one for a word in half the jobs wants to walk the sort order).
 */
export const PREPARED_PER_CONNECTION = 200;
const preparedOn = new WeakMap<object, Set<string>>();

export async function prepared<T>(sql: string, values: Record<string, unknown>, { reusePlan = true } = {}): Promise<T[]> {
	const { text, params } = positional(sql, values);
	const { name } = compiled(sql);
	const sequelize = db();
	const connections = sequelize.connectionManager;
	const log = sqlLog();
	if (log) log(`Executing (${reusePlan ? `prepared ${name}` : 'planned for its values'}): ${text} ${JSON.stringify(params)}`);
	for (let attempt = 1; ; attempt++) {
		let client: (pg.Client & { _invalid?: boolean }) | undefined;
		try {
			client = (await connections.getConnection({ type: 'read' })) as unknown as pg.Client & { _invalid?: boolean };
			let names = preparedOn.get(client);
			if (!names) preparedOn.set(client, (names = new Set()));
			const keep = reusePlan && (names.has(name) || names.size < PREPARED_PER_CONNECTION);
			const result = await client.query<T & pg.QueryResultRow>(keep ? { name, text, values: params } : { text, values: params });
			if (keep) names.add(name);
			return result.rows;
		} catch (error) {
			// As the pool's own queries do: a connection lost to a database restart (or a read that
			// lost a deadlock) is dropped and the statement runs again on a fresh connection.
			const retry = RETRYABLE.some((pattern) => pattern.test(`${(error as Error).message} ${(error as { code?: string }).code ?? ''}`));
			if (retry && client) client._invalid = true;
			if (!retry || attempt >= 3) throw error;
			await new Promise((resolve) => setTimeout(resolve, 100 * attempt));
		} finally {
			if (client) connections.releaseConnection(client as never);
		}
	}
}

/** `:name` placeholders to `$1`, `$2`… (the same name, the same number); `::type` casts are left alone. */
export function positional(sql: string, values: Record<string, unknown>): { text: string; params: unknown[] } {
	const { text, keys } = compiled(sql);
	const params = keys.map((key) => {
		if (!(key in values)) throw new Error(`no value for :${key}`);
		return values[key];
	});
	return { text, params };
}

/** The numbered text, its placeholders in order and its statement name, worked out once per text. */
const compiledTexts = new Map<string, { text: string; keys: string[]; name: string }>();
function compiled(sql: string) {
	let found = compiledTexts.get(sql);
	if (!found) {
		const keys: string[] = [];
		const text = sql.replace(/(?<![:\w]):([a-zA-Z_]\w*)/g, (_match, key: string) => {
			const n = keys.indexOf(key) + 1 || keys.push(key);
			return `$${n}`;
		});
		found = { text, keys, name: 'm' + createHash('sha1').update(text).digest('base64url').slice(0, 20) };
		// Texts vary only with a request's shape; the bound is a guard, not a working size.
		if (compiledTexts.size >= 1000) compiledTexts.clear();
		compiledTexts.set(sql, found);
	}
	return found;
}
