import { JOB_STATUSES, statusRank, type JobStatus } from '../domain';
import { prepared } from './db/prepared';
import { BoardIndex, CODE_POINT_COLLATIONS, FIELDS, type IndexedJob } from './board-index';
import { COUNT_LIMIT, type BoardPage, type BoardQuery, type BoardRow, type SortKey } from '../board-query';
export { parseBoardQuery, toSearchParams } from '../board-query';

export const SORTS: Record<SortKey, string> = {
	number: 'j.number',
	customer: 'j.customer_name',
	unit: 'j.unit_label',
	status: 'j.status_rank', // the path a job takes through the shop (migration 0014), not the alphabet
	technician: 'j.technician_name',
	promised: 'j.promised_on',
	changed: 'j.status_changed_at',
	opened: 'j.created_at'
};

const NO_TECHNICIAN = '00000000-0000-0000-0000-000000000000';

/**
 * One page of the job board plus counts per status, all in SQL on indexed, denormalised columns.
 * Counts under status and technician filters come from `job_status_counts` (kept by triggers);
 * with a search or age filter they are counted over at most COUNT_LIMIT + 1 matching jobs, and
 * beyond that the board says "more than". Statement texts depend only on the shape of the request
 * (which filters, which sort, page size); the values go as parameters. Each is prepared once per
 * connection, except a search's, which is planned for its words every time.
 */
export async function page(shopId: string, query: BoardQuery, { useIndex = true } = {}): Promise<BoardPage> {
	const where: string[] = ['j.shop_id = :shopId'];
	const offset = (query.page - 1) * query.per;
	const values: Record<string, unknown> = { shopId, offset };
	const words = query.q.toLowerCase().split(/\s+/).filter(Boolean).slice(0, 5);
	words.forEach((word, i) => {
		where.push(`j.search_text LIKE :w${i}`);
		values[`w${i}`] = `%${word.replace(/[\\%_]/g, (m) => '\\' + m)}%`;
	});
	if (query.tech === 'none') where.push('j.technician_id IS NULL');
	else if (query.tech) {
		where.push('j.technician_id = :tech');
		values.tech = query.tech;
	}
	if (query.age === 'stale') where.push("j.status_changed_at < now() - interval '14 days' AND j.status <> 'picked_up'");
	else if (query.age) {
		where.push('j.created_at >= now() - make_interval(days => :days::int)');
		values.days = Number(query.age);
	}
	if (query.status.length) values.statuses = query.status;
	const statusFilter = query.status.length ? ' AND j.status = ANY(:statuses::text[])' : '';
	const filtered = `FROM jobs j WHERE ${where.join(' AND ')}`;
	const orderBy = (ascending: boolean, key = SORTS[query.sort]) => {
		const direction = ascending ? 'ASC' : 'DESC';
		return key === SORTS.number || key === 'j.id'
			? `${key} ${direction}` // unique within a shop
			: `${key} ${direction} ${ascending ? 'NULLS LAST' : 'NULLS FIRST'}, j.id ${direction}`;
	};
	const pageOf = (source: string, order: string) =>
		`SELECT ${COLUMNS} FROM ${source} JOIN units u ON u.id = j.unit_id ORDER BY ${order}`;
	// A walk along the sort key's index. Deep in, it reads only ids (from the index alone where it
	// can) and then the page's rows, so skipped rows cost an index entry each, not a table row.
	const walk = (order: string, limit: number, skip: number, only = statusFilter) => {
		values.skip = skip;
		// No OFFSET at all for the first rows: with one given as a parameter PostgreSQL planned
		// each request afresh, its estimate for an unknown offset being dearer than for 0.
		const from = skip > 0 ? ' OFFSET :skip' : '';
		return skip >= 500
			? `(SELECT j.* FROM jobs j WHERE j.id IN (SELECT j.id ${filtered}${only} ORDER BY ${order} LIMIT ${limit}${from})) j`
			: `(SELECT j.* ${filtered}${only} ORDER BY ${order} LIMIT ${limit}${from}) j`;
	};
	const one = async <T>(sql: string, options?: { reusePlan: boolean }) => (await prepared<T>(sql, values, options))[0];

	const counts = noneYet();
	const counted: readonly JobStatus[] = query.status.length ? query.status : JOB_STATUSES;
	const sumOf = (statuses: readonly JobStatus[]) => statuses.reduce((sum: number, s: JobStatus) => sum + counts[s], 0);

	if (words.length || query.age) {
		// A search or age filter is answered from the shop's board index when one is held (below);
		// without one, in SQL.
		const fromIndex = useIndex ? await indexed(shopId, query, words) : null;
		if (fromIndex) return fromIndex;
		// The first matches in the sort order — enough to hold the page and one job past the count
		// limit — with their statuses, in one statement: they are every match when no more than
		// COUNT_LIMIT come back, and then they count per status and hold the page. The sort indexes
		// carry every column a filter reads (migration 0011), so PostgreSQL may walk one and keep
		// the matches from index entries alone, or find a rare word through the trigram index and
		// sort what it finds; which is cheaper depends on the words, so a search is planned for its
		// own values each time.
		const order = orderBy(query.dir === 'asc');
		const need = query.per + 1;
		values.reach = Math.max(COUNT_LIMIT + 1, offset + need);
		const kept = [...new Set(['j.id', 'j.status', SORTS[query.sort]])].join(', ');
		const firstMatches = async (only: string) => {
			const found = await one<{ counts: Partial<Record<JobStatus, number>> | null; page: BoardRow[] | null }>(
				`WITH m AS MATERIALIZED (SELECT ${kept} ${filtered}${only} ORDER BY ${order} LIMIT :reach)
				 SELECT (SELECT json_object_agg(status, n) FROM (SELECT status, count(*)::int AS n FROM m GROUP BY status) c) AS counts,
				        (SELECT json_agg(p) FROM (${pageOf(`(SELECT j.* FROM jobs j WHERE j.id IN (
				          SELECT j.id FROM m j WHERE true${statusFilter} ORDER BY ${order} LIMIT ${need} OFFSET :offset)) j`, order)}) p) AS page`,
				{ reusePlan: words.length === 0 }
			);
			const perStatus = found.counts ?? {};
			return { counts: perStatus, matched: Object.values(perStatus).reduce((sum: number, n) => sum + (n ?? 0), 0), page: found.page ?? [] };
		};
		const all = await firstMatches('');
		Object.assign(counts, all.counts);
		if (all.matched <= COUNT_LIMIT) return answer(query, all.page, sumOf(counted), true, counts);
		if (!query.status.length) return answer(query, all.page, null, false, counts);
		// Too many to count across all statuses; those selected may still come under the limit.
		const selected = await firstMatches(statusFilter);
		return answer(query, selected.page, selected.matched <= COUNT_LIMIT ? selected.matched : null, false, counts);
	}

	// A later page of all jobs, or of some statuses or one technician's, is read along the index's
	// order at the cost of the first; the SQL below skips index entries to reach it.
	if (offset > 0 && useIndex) {
		const fromIndex = await indexed(shopId, query, words);
		if (fromIndex) return fromIndex;
	}
	values.techKey = query.tech === 'none' ? NO_TECHNICIAN : query.tech;
	const countsOf = countsSql(Boolean(query.tech));
	if (offset === 0) {
		// The first page needs no total to be read: counts and rows in one statement.
		const order = orderBy(query.dir === 'asc');
		const found = await one<{ counts: Partial<Record<JobStatus, number>> | null; page: BoardRow[] | null }>(
			`SELECT (${countsOf}) AS counts, (SELECT json_agg(p) FROM (${pageOf(walk(order, query.per, 0), order)}) p) AS page`
		);
		Object.assign(counts, found.counts);
		return answer(query, found.page ?? [], sumOf(counted), true, counts);
	}
	const kept = (await one<{ counts: Partial<Record<JobStatus, number>> | null }>(`SELECT (${countsOf}) AS counts`)).counts ?? {};
	Object.assign(counts, kept);
	const total = sumOf(counted);
	const take = Math.max(0, Math.min(query.per, total - offset));
	if (take === 0) return answer(query, [], total, true, counts);
	// Sorted by status, the counts say which status the page falls in; when it lies within one, the
	// walk goes along that status's jobs alone.
	if (query.sort === 'status') {
		const laidOut = JOB_STATUSES.filter((s) => counted.includes(s));
		if (query.dir === 'desc') laidOut.reverse();
		let before = 0;
		for (const status of laidOut) {
			if (offset >= before + counts[status]) {
				before += counts[status];
				continue;
			}
			if (offset + take <= before + counts[status]) {
				values.within = statusRank(status);
				return answer(query, await readPage(offset - before, counts[status], 'j.id', ' AND j.status_rank = :within'), total, true, counts);
			}
			break;
		}
	}
	return answer(query, await readPage(offset, total, SORTS[query.sort], statusFilter), total, true, counts);

	/**
	 * `take` rows from `skip` along `key` (then id) among `of` jobs. Past the middle they are read
	 * from the far end in the opposite order and turned round: the last page costs what the first does.
	 */
	async function readPage(skip: number, of: number, key: string, only: string): Promise<BoardRow[]> {
		const fromEnd = skip > of / 2;
		const order = orderBy((query.dir === 'asc') !== fromEnd, key);
		const rows = await prepared<BoardRow>(pageOf(walk(order, take, fromEnd ? of - skip - take : skip, only), order), values);
		return fromEnd ? rows.reverse() : rows;
	}
}

/*
 * The board index (`board-index.ts`) answers searches, age filters and later pages in memory, one
 * per shop, built from PostgreSQL on the shop's first such request and brought up to date on every request: the
 * statement that reads the page's rows also reads every job written (and every deletion) since the
 * oldest transaction that was still running when the index last caught up, with the snapshot it
 * read them in. A shop's index is held while the jobs of all held indexes stay under
 * MENDWISE_BOARD_INDEX_JOBS (0 turns the index off); the least recently used go first.
 */
const INDEX_JOBS = Number(process.env.MENDWISE_BOARD_INDEX_JOBS ?? 200_000);
/** A shop with up to this many jobs has its index built while its first search waits (a few hundred ms at most); a bigger one is built beside the SQL answer. */
const BUILD_WHILE_WAITING = 20_000;
/** More jobs written at once than this and the index is dropped, to be built afresh after RETRY_AFTER_MS. */
const CHANGES_AT_ONCE = 2000;

interface Held {
	index?: BoardIndex;
	building?: Promise<void>;
	/** Jobs written by transactions from this one on may be newer than the index (xid8 as text). */
	since?: string;
	/** The snapshot the index last caught up to: later snapshots have a higher xmax, or the same with fewer transactions running. */
	xmax?: bigint;
	running?: number;
	usedAt: number;
	/** No index is tried for the shop before this time (ms): one could not be built, or the shop has too many jobs. */
	notBefore?: number;
}
/** How long a shop without an index waits before one is tried again. */
const RETRY_AFTER_MS = 60_000;
const held = new Map<string, Held>();
let codePointOrder: Promise<boolean> | undefined;

interface Snapshot { xmin: string; xmax: string; running: number }
const SNAPSHOT = `pg_snapshot_xmin(x.s)::text AS xmin, pg_snapshot_xmax(x.s)::text AS xmax,
	(SELECT count(*)::int FROM pg_snapshot_xip(x.s)) AS running`;

async function indexFor(shopId: string): Promise<BoardIndex | null> {
	if (!(INDEX_JOBS > 0)) return null;
	let entry = held.get(shopId);
	if (!entry) held.set(shopId, (entry = { usedAt: Date.now() }));
	entry.usedAt = Date.now();
	if (entry.index) return entry.index;
	if (!entry.building && !(Date.now() < (entry.notBefore ?? 0))) {
		const jobs = Object.values(await statusCounts(shopId)).reduce((sum, n) => sum + n, 0);
		if (entry.building) return null; // another request started it meanwhile
		if (jobs > INDEX_JOBS) {
			entry.notBefore = Date.now() + RETRY_AFTER_MS;
			return null;
		}
		const building = (entry.building = build(shopId, entry).finally(() => {
			if (entry.building === building) entry.building = undefined;
		}));
		if (jobs <= BUILD_WHILE_WAITING) await building;
	}
	return entry.index ?? null;
}

async function build(shopId: string, entry: Held): Promise<void> {
	try {
		codePointOrder ??= prepared<{ collation: string }>('SELECT datcollate AS collation FROM pg_database WHERE datname = current_database()', {}).then(
			([row]) => CODE_POINT_COLLATIONS.includes(row.collation),
			(error) => {
				codePointOrder = undefined;
				throw error;
			}
		);
		if (!(await codePointOrder)) {
			entry.notBefore = Number.POSITIVE_INFINITY; // the index keeps code point order; the database sorts otherwise
			return;
		}
		const [found] = await prepared<Snapshot & { jobs: IndexedJob[] | null }>(
			`SELECT ${SNAPSHOT}, (SELECT json_agg(j) FROM (SELECT ${FIELDS} FROM jobs j WHERE j.shop_id = :shopId) j) AS jobs
			   FROM (SELECT pg_current_snapshot() AS s) x`,
			{ shopId },
			{ reusePlan: false }
		);
		const index = await BoardIndex.load(found.jobs ?? []);
		if (held.get(shopId) !== entry) return; // forgotten while it was built
		Object.assign(entry, { index, since: found.xmin, xmax: BigInt(found.xmax), running: found.running });
		// Keep within the bound, dropping the indexes used longest ago.
		let total = [...held.values()].reduce((sum, e) => sum + (e.index?.size ?? 0), 0);
		for (const [shop, other] of [...held].sort((a, b) => a[1].usedAt - b[1].usedAt)) {
			if (total <= INDEX_JOBS) break;
			if (other === entry || !other.index) continue;
			total -= other.index.size;
			held.delete(shop);
		}
	} catch (error) {
		entry.notBefore = Date.now() + RETRY_AFTER_MS;
		console.error('board index: could not be built; the board answers in SQL for a minute', error);
	}
}

/**
 * A search, age filter or later page answered from the shop's index: the page's ids are chosen in memory, then
 * one statement reads their rows together with whatever changed since the index last caught up.
 * If something had changed, the page is chosen again. Null when no index is held (answer in SQL).
 */
async function indexed(shopId: string, query: BoardQuery, words: string[]): Promise<BoardPage | null> {
	const index = await indexFor(shopId);
	const entry = held.get(shopId);
	if (!index || !entry) return null;
	for (let attempt = 0; attempt < 3; attempt++) {
		const version = index.version;
		const chosen = index.select(query, words, Date.now() * 1000);
		if (!chosen) return null;
		const [found] = await prepared<Snapshot & { changed: IndexedJob[] | null; deleted: string[] | null; page: BoardRow[] | null }>(
			// Ordered by writer so that even a plan kept for any values walks the index (a few rows).
			// A writer past the snapshot's xmax cannot be live: it came with a restore from another
			// cluster, and the build read that row already. The point changes are read from is a
			// sub-select, so PostgreSQL estimates the same for any value and keeps one plan (given
			// as a plain parameter, it planned each request afresh: 0.4 ms of its 0.8).
			`SELECT ${SNAPSHOT},
			        (SELECT json_agg(d) FROM (SELECT ${FIELDS} FROM jobs j
			          WHERE j.shop_id = :shopId AND j.written_by >= (SELECT :since::xid8) AND j.written_by < pg_snapshot_xmax(x.s)
			          ORDER BY j.written_by LIMIT ${CHANGES_AT_ONCE + 1}) d) AS changed,
			        (SELECT json_agg(job_id) FROM job_deletions
			          WHERE shop_id = :shopId AND deleted_by >= (SELECT :since::xid8) AND deleted_by < pg_snapshot_xmax(x.s)) AS deleted,
			        (SELECT json_agg(p) FROM (SELECT ${COLUMNS} FROM jobs j JOIN units u ON u.id = j.unit_id
			          WHERE j.shop_id = :shopId AND j.id = ANY(:ids::uuid[])) p) AS page
			   FROM (SELECT pg_current_snapshot() AS s) x`,
			{ shopId, since: entry.since, ids: chosen.ids }
		);
		if (held.get(shopId) !== entry || entry.index !== index) return null;
		const xmax = BigInt(found.xmax);
		if (xmax > entry.xmax! || (xmax === entry.xmax && found.running < entry.running!)) {
			// A later snapshot than the index's: what it shows changed is applied (an earlier one's
			// rows, read by a request that overtook this one's, could be older than the index).
			if ((found.changed?.length ?? 0) > CHANGES_AT_ONCE) {
				// A bulk change, or a long transaction holding back the point changes are read from:
				// answer in SQL for a while, then build the index afresh.
				held.set(shopId, { usedAt: Date.now(), notBefore: Date.now() + RETRY_AFTER_MS });
				return null;
			}
			index.apply(found.changed ?? [], found.deleted ?? []);
			Object.assign(entry, { since: found.xmin, xmax, running: found.running });
		}
		if (index.version !== version) continue;
		const byId = new Map((found.page ?? []).map((row) => [row.id, row]));
		const rows = chosen.ids.map((id) => byId.get(id)).filter((row): row is BoardRow => row !== undefined);
		if (rows.length !== chosen.ids.length) {
			held.delete(shopId); // a job the index holds is not there: start again from PostgreSQL
			return null;
		}
		return answer(query, rows, chosen.total, true, chosen.counts);
	}
	return null;
}

/** Jobs per status, from `job_status_counts` (kept by triggers). */
const countsSql = (byTechnician: boolean) => `SELECT json_object_agg(status, n) FROM (SELECT status, sum(n)::int AS n FROM job_status_counts
	  WHERE shop_id = :shopId${byTechnician ? ' AND technician_key = :techKey' : ''} GROUP BY status) c`;

const noneYet = () => Object.fromEntries(JOB_STATUSES.map((s) => [s, 0])) as Record<JobStatus, number>;

/** How many of the shop's jobs are in each status, without reading a page of them. */
export async function statusCounts(shopId: string): Promise<Record<JobStatus, number>> {
	const [row] = await prepared<{ counts: Partial<Record<JobStatus, number>> | null }>(`SELECT (${countsSql(false)}) AS counts`, { shopId });
	return Object.assign(noneYet(), row.counts);
}

const COLUMNS = `j.id, j.number, j.status, left(j.complaint, 160) AS complaint, j.customer_name AS customer,
	j.unit_label AS unit, u.kind, u.serial, j.technician_name AS technician,
	to_char(j.promised_on, 'YYYY-MM-DD') AS "promisedOn", j.created_at AS "openedAt", j.status_changed_at AS "changedAt"`;

/** `rows` may hold one row past the page when the total is unknown: it only says another page follows. */
function answer(query: BoardQuery, rows: BoardRow[], total: number | null, exact: boolean, counts: Record<JobStatus, number>): BoardPage {
	return {
		rows: rows.slice(0, query.per).map((r) => ({ ...r, openedAt: new Date(r.openedAt).toISOString(), changedAt: new Date(r.changedAt).toISOString() })),
		total,
		exact,
		counts,
		query,
		pages: total === null ? null : Math.max(1, Math.ceil(total / query.per)),
		hasNext: total === null ? rows.length > query.per : query.page * query.per < total
	};
}
