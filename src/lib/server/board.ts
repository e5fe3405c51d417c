import { JOB_STATUSES, statusRank, type JobStatus } from '../domain';
import { prepared } from './db/prepared';
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
export async function page(shopId: string, query: BoardQuery): Promise<BoardPage> {
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
		return skip >= 500
			? `(SELECT j.* FROM jobs j WHERE j.id IN (SELECT j.id ${filtered}${only} ORDER BY ${order} LIMIT ${limit} OFFSET :skip)) j`
			: `(SELECT j.* ${filtered}${only} ORDER BY ${order} LIMIT ${limit} OFFSET :skip) j`;
	};
	const one = async <T>(sql: string, options?: { reusePlan: boolean }) => (await prepared<T>(sql, values, options))[0];

	const counts = noneYet();
	const counted: readonly JobStatus[] = query.status.length ? query.status : JOB_STATUSES;
	const sumOf = (statuses: readonly JobStatus[]) => statuses.reduce((sum: number, s: JobStatus) => sum + counts[s], 0);

	if (words.length || query.age) {
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
