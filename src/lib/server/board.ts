import { QueryTypes } from 'sequelize';
import { JOB_STATUSES, type JobStatus } from '../domain';
import { db } from './db';
import type { BoardPage, BoardQuery, BoardRow, SortKey } from '../board-query';
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

/** One page of the job board plus counts per status, all in SQL on indexed, denormalised columns. */
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

	const statusFilter = query.status.length ? ' AND j.status IN (:statuses)' : '';
	if (query.status.length) replacements.statuses = query.status;
	const direction = query.dir === 'asc' ? 'ASC' : 'DESC';
	const nulls = direction === 'ASC' ? 'NULLS LAST' : 'NULLS FIRST';
	const offset = (query.page - 1) * query.per;

	const [rows, countRows] = await Promise.all([
		db().query<BoardRow>(
			`SELECT j.id, j.number, j.status, left(j.complaint, 160) AS complaint, j.customer_name AS customer,
			        j.unit_label AS unit, u.kind, u.serial, j.technician_name AS technician,
			        to_char(j.promised_on, 'YYYY-MM-DD') AS "promisedOn", j.created_at AS "openedAt", j.status_changed_at AS "changedAt"
			   FROM jobs j JOIN units u ON u.id = j.unit_id
			  WHERE ${where.join(' AND ')}${statusFilter}
			  ORDER BY ${SORTS[query.sort]} ${direction} ${nulls}, j.id ${direction}
			  LIMIT ${query.per} OFFSET ${offset}`,
			{ replacements, type: QueryTypes.SELECT }
		),
		db().query<{ status: JobStatus; n: number }>(
			`SELECT j.status, count(*)::int AS n FROM jobs j WHERE ${where.join(' AND ')} GROUP BY j.status`,
			{ replacements, type: QueryTypes.SELECT }
		)
	]);
	const counts = Object.fromEntries(JOB_STATUSES.map((s) => [s, 0])) as Record<JobStatus, number>;
	for (const row of countRows) counts[row.status] = row.n;
	const counted: readonly JobStatus[] = query.status.length ? query.status : JOB_STATUSES;
	const total = counted.reduce((sum: number, s: JobStatus) => sum + counts[s], 0);
	return {
		rows: rows.map((r) => ({ ...r, openedAt: new Date(r.openedAt).toISOString(), changedAt: new Date(r.changedAt).toISOString() })),
		total,
		counts,
		query,
		pages: Math.max(1, Math.ceil(total / query.per))
	};
}
