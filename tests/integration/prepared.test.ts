import pg from 'pg';
import { describe, expect, it } from 'vitest';
import { databaseUrl } from '../../src/lib/server/db';
import { PREPARED_PER_CONNECTION, positional, prepared } from '../../src/lib/server/db/prepared';

describe('prepared statements', () => {
	it('turns :name placeholders into numbered parameters and leaves casts alone', () => {
		expect(positional('SELECT :a::int + :b, :a, x::text FROM t WHERE y = ANY(:list::text[])', { a: 1, b: 2, list: ['p'] })).toEqual({
			text: 'SELECT $1::int + $2, $1, x::text FROM t WHERE y = ANY($3::text[])',
			params: [1, 2, ['p']]
		});
		expect(() => positional('SELECT :missing', {})).toThrow(/no value for :missing/);
	});

	it('sends values as data, never as SQL', async () => {
		const hostile = "x' OR '1'='1";
		const rows = await prepared<{ same: boolean; text: string }>('SELECT :v::text = :v::text AS same, :v::text AS text', { v: hostile });
		expect(rows).toEqual([{ same: true, text: hostile }]);
		expect(await prepared('SELECT 1 FROM jobs WHERE complaint = :v', { v: hostile })).toEqual([]);
	});

	it('reusePlan: false runs the statement unnamed, planned for its values, and keeps nothing on the connection', async () => {
		const text = `SELECT :n::int * 2 AS twice, 'planned each time' AS marker`;
		for (const n of [1, 2, 3, 4, 5, 6, 7]) {
			expect(await prepared<{ twice: number }>(text, { n }, { reusePlan: false })).toEqual([{ twice: 2 * n, marker: 'planned each time' }]);
		}
		// The marker goes as a value, so this statement's own text does not match itself.
		const count = 'SELECT count(*)::int AS n FROM pg_prepared_statements WHERE strpos(statement, :marker) > 0';
		expect((await prepared<{ n: number }>(count, { marker: 'planned each time' }))[0].n).toBe(0);
		await prepared(text, { n: 1 });
		expect((await prepared<{ n: number }>(count, { marker: 'planned each time' }))[0].n).toBe(1);
	});

	it('a connection keeps a bounded number of prepared statements and still runs the rest', async () => {
		for (let i = 0; i < PREPARED_PER_CONNECTION + 20; i++) {
			const [row] = await prepared<{ n: number }>(`SELECT :n::int + ${i} AS n`, { n: 1 });
			expect(row.n).toBe(1 + i);
		}
		// This file's reads run one at a time on one pooled connection.
		const [{ kept }] = await prepared<{ kept: number }>('SELECT count(*)::int AS kept FROM pg_prepared_statements', {});
		expect(kept).toBeGreaterThan(PREPARED_PER_CONNECTION / 2);
		expect(kept).toBeLessThanOrEqual(PREPARED_PER_CONNECTION);
	});

	it('a statement whose connection the database drops mid-way runs again on a fresh connection', async () => {
		const marker = `retry-${Date.now()}`;
		const running = prepared<{ pid: number; tag: string }>('SELECT pg_backend_pid() AS pid, :tag::text AS tag FROM pg_sleep(0.5)', { tag: marker });
		const admin = new pg.Client({ connectionString: databaseUrl() });
		await admin.connect();
		let killed: number | undefined;
		try {
			for (let tries = 0; tries < 50 && !killed; tries++) {
				const { rows } = await admin.query<{ pid: number }>(
					"SELECT pid FROM pg_stat_activity WHERE state = 'active' AND query LIKE '%pg_sleep(0.5)%' AND pid <> pg_backend_pid()"
				);
				if (rows.length) {
					killed = rows[0].pid;
					await admin.query('SELECT pg_terminate_backend($1)', [killed]);
				} else await new Promise((resolve) => setTimeout(resolve, 20));
			}
		} finally {
			await admin.end();
		}
		expect(killed).toBeDefined();
		const [row] = await running;
		expect(row.tag).toBe(marker);
		expect(row.pid).not.toBe(killed);
	});
});
