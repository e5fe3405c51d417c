import { QueryTypes } from 'sequelize';
import { JOB_STATUSES, type JobStatus } from '../domain';
import { db } from './db';
import { COUNT_LIMIT, type BoardPage, type BoardQuery, type BoardRow, type SortKey } from '../board-query';
export { parseBoardQuery, toSearchParams } from '../board-query';

export const SORTS: Record<SortKey, string> = {
	number: 'j.number',
	customer: 'j.customer_name',
	unit: 'j.unit_label',
	status: 'j.status',
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
 * beyond that the board says "more than".
 */
export async function page(shopId: string, query: BoardQuery): Promise<BoardPage> {
	const where: string[] = ['j.shop_id = :shopId'];
	const replacements: Record<string, unknown> = { shopId };
	const words = query.q.toLowerCase().split(/\s+/).filter(Boolean).slice(0, 5);
	words.forEach((word, i) => {
		where.push(`j.search_text LIKE :w${i}`);
		replacements[`w${i}`] = `%${word.replace(/[\\%_]/g, (m) => '\\' + m)}%`;
	});
	if (query.tech === 'none') where.push('j.technician_id IS NULL');
	else if (query.tech) {
		where.push('j.technician_id = :tech');
		replacements.tech = query.tech;
	}
	if (query.age === 'stale') where.push("j.status_changed_at < now() - interval '14 days' AND j.status <> 'picked_up'");
	else if (query.age) where.push(`j.created_at >= now() - make_interval(days => ${Number(query.age)})`);
	if (query.status.length) replacements.statuses = query.status;
	const statusFilter = query.status.length ? ' AND j.status IN (:statuses)' : '';
	const filtered = `FROM jobs j WHERE ${where.join(' AND ')}`;
	const offset = (query.page - 1) * query.per;
	const orderBy = (ascending: boolean) => {
		const direction = ascending ? 'ASC' : 'DESC';
		return query.sort === 'number'
			? `j.number ${direction}` // unique within a shop
			: `${SORTS[query.sort]} ${direction} ${ascending ? 'NULLS LAST' : 'NULLS FIRST'}, j.id ${direction}`;
	};
	const pageOf = (source: string, order: string, window: string) =>
		`SELECT ${COLUMNS} FROM ${source} JOIN units u ON u.id = j.unit_id ORDER BY ${order} ${window}`;
	// A walk along the sort key's index. Deep in, it reads only ids (from the index alone where it
	// can) and then the page's rows, so skipped rows cost an index entry each, not a table row; near
	// the start the plainer query plans faster.
	const walk = (order: string, limit: number, skip: number) =>
		skip < 500
			? `(SELECT j.* ${filtered}${statusFilter} ORDER BY ${order} LIMIT ${limit} OFFSET ${skip}) j`
			: `(SELECT j.* FROM jobs j WHERE j.id IN (SELECT j.id ${filtered}${statusFilter} ORDER BY ${order} LIMIT ${limit} OFFSET ${skip})) j`;
	// The first COUNT_LIMIT + 1 jobs of `source`, counted per status, and in the same statement the
	// page sorted out of them — which is the page when they are all the matches there are.
	const firstMatches = async (source: string) => {
		const [found] = await db().query<{ counts: Partial<Record<JobStatus, number>> | null; page: BoardRow[] | null }>(
			`WITH m AS MATERIALIZED (SELECT j.id, j.status ${source} LIMIT ${COUNT_LIMIT + 1})
			 SELECT (SELECT json_object_agg(status, n) FROM (SELECT status, count(*)::int AS n FROM m GROUP BY status) c) AS counts,
			        (SELECT json_agg(p) FROM (${pageOf(`(SELECT j.* FROM jobs j WHERE j.id IN (SELECT id FROM m)${statusFilter}) j`, orderBy(query.dir === 'asc'), `LIMIT ${query.per} OFFSET ${offset}`)}) p
			          WHERE (SELECT count(*) FROM m) <= ${COUNT_LIMIT}) AS page`,
			{ replacements, type: QueryTypes.SELECT }
		);
		const perStatus = found.counts ?? {};
		return { counts: perStatus, matched: Object.values(perStatus).reduce((sum: number, n) => sum + (n ?? 0), 0), page: found.page ?? [] };
	};

	const counts = Object.fromEntries(JOB_STATUSES.map((s) => [s, 0])) as Record<JobStatus, number>;
	const counted: readonly JobStatus[] = query.status.length ? query.status : JOB_STATUSES;
	const sumOf = (statuses: readonly JobStatus[]) => statuses.reduce((sum: number, s: JobStatus) => sum + counts[s], 0);

	if (words.length || query.age) {
		// Every match counted up to the limit: the answer in one trip when they are all there are.
		const all = await firstMatches(filtered);
		Object.assign(counts, all.counts);
		if (all.matched <= COUNT_LIMIT) return answer(query, all.page, sumOf(counted), true, counts);
		// Too many to count; the status filter alone may still bring the total under the limit.
		if (query.status.length) {
			const selected = await firstMatches(filtered + statusFilter);
			if (selected.matched <= COUNT_LIMIT) return answer(query, selected.page, selected.matched, false, counts);
		}
		// Many matches: a walk along the sort key's index, one row past the page to know whether another follows.
		const order = orderBy(query.dir === 'asc');
		const rows = await db().query<BoardRow>(
			pageOf(walk(order, query.per + 1, offset), order, ''),
			{ replacements, type: QueryTypes.SELECT }
		);
		return answer(query, rows, null, false, counts);
	}

	const countRows = await db().query<{ status: JobStatus; n: number }>(
		`SELECT status, sum(n)::int AS n FROM job_status_counts
		  WHERE shop_id = :shopId${query.tech ? ' AND technician_key = :techKey' : ''} GROUP BY status`,
		{ replacements: { shopId, techKey: query.tech === 'none' ? NO_TECHNICIAN : query.tech }, type: QueryTypes.SELECT }
	);
	for (const row of countRows) counts[row.status] = row.n;
	const total = sumOf(counted);
	// Past the middle, the page is read from the far end in the opposite order and turned round: the
	// last page costs what the first does.
	const take = Math.max(0, Math.min(query.per, total - offset));
	const fromEnd = offset > total / 2;
	const order = orderBy((query.dir === 'asc') !== fromEnd);
	const rows = take === 0 ? [] : await db().query<BoardRow>(
		pageOf(walk(order, take, fromEnd ? total - offset - take : offset), order, ''),
		{ replacements, type: QueryTypes.SELECT }
	);
	return answer(query, fromEnd ? rows.reverse() : rows, total, true, counts);
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
