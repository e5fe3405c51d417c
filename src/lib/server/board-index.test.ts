import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { JOB_STATUSES, statusRank, type JobStatus } from '../domain';
import { SORT_KEYS, type BoardQuery } from '../board-query';
import { BoardIndex, codePointKey, type IndexedJob } from './board-index';

// Code point order is the order of UTF-8 bytes (RFC 3629, section 1: "the byte-value lexicographic
// sorting order of UTF-8 strings is the same as if ordered by character numbers"), which is how
// PostgreSQL sorts under the C collations. Reference: compare the strings' code points one by one.
const byCodePoints = (a: string, b: string) => {
	const x = [...a].map((c) => c.codePointAt(0)!);
	const y = [...b].map((c) => c.codePointAt(0)!);
	for (let i = 0; i < Math.min(x.length, y.length); i++) if (x[i] !== y[i]) return x[i] - y[i];
	return x.length - y.length;
};

describe('codePointKey', () => {
	it('makes JavaScript string order code point order', () => {
		// U+1D49C (a surrogate pair in UTF-16) sorts after U+FF21 by code point, before it by code unit.
		expect('𝒜' < '\uff21').toBe(true);
		expect(codePointKey('𝒜')! < codePointKey('\uff21')!).toBe(false);
		fc.assert(
			fc.property(fc.string({ unit: 'binary' }), fc.string({ unit: 'binary' }), (a, b) => {
				const keyed = codePointKey(a)! < codePointKey(b)! ? -1 : codePointKey(a) === codePointKey(b) ? 0 : 1;
				expect(keyed).toBe(Math.sign(byCodePoints(a, b)));
			})
		);
	});

	it('leaves plain text as it is', () => {
		expect(codePointKey('Orla Penhallow')).toBe('Orla Penhallow');
		expect(codePointKey(null)).toBe(null);
	});
});

const NOW_US = Date.UTC(2026, 11, 2) * 1000;
const DAY_US = 86_400_000_000;
const WORDS = ['orla', 'penhallow', 'no', 'output', 'surge', 'kestrel', 'sn-01', 'sn-02', 'ada', 'émile'];

const job = fc.record({
	id: fc.uuid(),
	number: fc.integer({ min: 1, max: 1_000_000 }),
	status: fc.constantFrom(...JOB_STATUSES),
	tech: fc.constantFrom(null, 'a0000000-0000-4000-8000-000000000001', 'a0000000-0000-4000-8000-000000000002'),
	customer: fc.constantFrom('Ada Quell', 'ada quell', 'Émile Roux', '𝒜sh Vale', '\uff21sh Vale', ''),
	unit: fc.constantFrom('Kestrel K2', 'Harrowgate', ''),
	promised: fc.constantFrom(null, '2026-12-01', '2026-12-09'),
	openedDays: fc.integer({ min: 0, max: 40 }),
	changedDays: fc.integer({ min: 0, max: 40 }),
	words: fc.subarray(WORDS)
});

function toJob(j: { id: string; number: number; status: JobStatus; tech: string | null; customer: string; unit: string; promised: string | null; openedDays: number; changedDays: number; words: string[] }, xid: string): IndexedJob {
	return {
		id: j.id, number: j.number, status: j.status, rank: statusRank(j.status), tech: j.tech,
		customer: j.customer, unit: j.unit, techName: j.tech ? (j.tech.endsWith('1') ? 'Rowan' : 'Kit') : null, promised: j.promised,
		opened: String(NOW_US - j.openedDays * DAY_US - j.number), changed: String(NOW_US - j.changedDays * DAY_US),
		text: `#${j.number} ${j.customer.toLowerCase()} ${j.words.join(' ')}`, xid
	};
}

/** What the board asks, worked out the plain way: filter every job, sort them all, slice. */
function plainly(jobs: IndexedJob[], query: BoardQuery, words: string[]) {
	const value = (j: IndexedJob): string | number | null =>
		({ number: j.number, customer: j.customer, unit: j.unit, status: j.rank, technician: j.techName, promised: j.promised, changed: Number(j.changed), opened: Number(j.opened) })[query.sort];
	const matches = jobs.filter(
		(j) =>
			words.every((w) => j.text.includes(w)) &&
			(query.tech === 'none' ? j.tech === null : !query.tech || j.tech === query.tech) &&
			(query.age === 'stale' ? Number(j.changed) < NOW_US - 14 * DAY_US && j.status !== 'picked_up' : !query.age || Number(j.opened) >= NOW_US - Number(query.age) * DAY_US)
	);
	const counts = Object.fromEntries(JOB_STATUSES.map((s) => [s, matches.filter((j) => j.status === s).length]));
	const selected = matches.filter((j) => !query.status.length || query.status.includes(j.status));
	selected.sort((a, b) => {
		const [x, y] = [value(a), value(b)];
		const c = x === y ? 0 : x === null ? 1 : y === null ? -1 : typeof x === 'string' ? byCodePoints(x, y as string) : x - (y as number);
		return c || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);
	});
	if (query.dir === 'desc') selected.reverse();
	const offset = (query.page - 1) * query.per;
	return { counts, total: selected.length, ids: selected.slice(offset, offset + query.per).map((j) => j.id) };
}

const queryOf = fc.record({
	q: fc.subarray(WORDS, { maxLength: 2 }).map((w) => w.join(' ')),
	status: fc.subarray([...JOB_STATUSES], { maxLength: 2 }),
	tech: fc.constantFrom('', 'none', 'a0000000-0000-4000-8000-000000000001'),
	age: fc.constantFrom('' as const, '2' as const, '30' as const, 'stale' as const),
	sort: fc.constantFrom(...SORT_KEYS),
	dir: fc.constantFrom('asc' as const, 'desc' as const),
	page: fc.integer({ min: 1, max: 4 }),
	per: fc.constantFrom(10, 25)
});

const unique = (jobs: ReturnType<typeof toJob>[]) => [...new Map(jobs.map((j) => [j.id, j])).values()];

describe('BoardIndex', () => {
	it('answers every search, filter, sort and page as filtering and sorting every job would', () => {
		fc.assert(
			fc.property(fc.array(job, { maxLength: 60 }), queryOf, (made, query) => {
				const jobs = unique(made.map((j) => toJob(j, '1')));
				const words = query.q.split(' ').filter(Boolean);
				const index = new BoardIndex(jobs);
				expect(index.select(query, words, NOW_US)).toEqual(plainly(jobs, query, words));
			}),
			{ numRuns: 300 }
		);
	});

	it('answers the same through word and status bits when matches are too many to look at one by one', () => {
		fc.assert(
			fc.property(fc.array(job, { maxLength: 60 }), queryOf, (made, query) => {
				const jobs = unique(made.map((j) => toJob(j, '1')));
				const words = query.q.split(' ').filter(Boolean);
				// A limit of 4 jobs sends nearly every search down the path a large shop takes.
				const found = new BoardIndex(jobs, { workLimit: 4 }).select(query, words, NOW_US);
				if (found) expect(found).toEqual(plainly(jobs, query, words));
				// Left to the SQL only with a technician or age filter, or deep in chosen statuses.
				else expect(Boolean(query.tech || query.age || (!words.length && query.status.length))).toBe(true);
			}),
			{ numRuns: 300 }
		);
	});

	it('brought up to date change by change, it answers as one built from the final jobs', () => {
		fc.assert(
			fc.property(
				fc.array(job, { minLength: 1, maxLength: 40 }),
				fc.array(fc.record({ at: fc.nat(), replace: job, remove: fc.boolean() }), { maxLength: 30 }),
				queryOf,
				fc.constantFrom(4, 40_000),
				(made, changes, query, workLimit) => {
					let jobs = unique(made.map((j) => toJob(j, '1')));
					const index = new BoardIndex(jobs, { workLimit });
					const words = query.q.split(' ').filter(Boolean);
					// Asked once before the changes: what a search builds on first use (a short word's
					// bits) must then follow them.
					index.select(query, words, NOW_US);
					changes.forEach((change, n) => {
						const target = jobs[change.at % jobs.length];
						if (!target) return;
						if (change.remove) {
							jobs = jobs.filter((j) => j !== target);
							index.apply([], [target.id]);
						} else {
							const next = toJob({ ...change.replace, id: target.id, number: target.number }, String(n + 2));
							jobs = jobs.map((j) => (j === target ? next : j));
							index.apply([next], []);
						}
					});
					expect(index.size).toBe(jobs.length);
					const found = index.select(query, words, NOW_US);
					expect(found).toEqual(new BoardIndex(jobs, { workLimit }).select(query, words, NOW_US));
					// The work a search counts is summed over its words: with room for every job once per word, the index answers.
					if (workLimit > jobs.length * Math.max(1, words.length)) expect(found).not.toBeNull();
					if (found) expect(found).toEqual(plainly(jobs, query, words));
				}
			),
			{ numRuns: 200 }
		);
	});

	it('answers one query after another on the same index as it would each alone', () => {
		fc.assert(
			fc.property(fc.array(job, { maxLength: 60 }), fc.array(queryOf, { minLength: 2, maxLength: 6 }), fc.boolean(), (made, queries, nearWrap) => {
				const jobs = unique(made.map((j) => toJob(j, '1')));
				const index = new BoardIndex(jobs);
				// The working arrays are reused with rising generation numbers, started afresh before they pass what 32 bits hold.
				if (nearWrap) (index as unknown as { scratch: { generation: number } }).scratch.generation = 0x7fff_fffd;
				for (const query of queries) {
					const words = query.q.split(' ').filter(Boolean);
					expect(index.select(query, words, NOW_US)).toEqual(plainly(jobs, query, words));
				}
			}),
			{ numRuns: 150 }
		);
	});

	it('keeps word and status bits right as jobs move, change their words and go', () => {
		const make = (i: number, status: JobStatus, words: string[], xid: string) =>
			toJob({ id: `00000000-0000-4000-8000-${String(i).padStart(12, '0')}`, number: i + 1, status, tech: null, customer: `C${i % 5}`, unit: 'U', promised: null, openedDays: 1, changedDays: 1, words }, xid);
		let jobs = Array.from({ length: 30 }, (_, i) => make(i, 'diagnosing', i % 3 ? ['output'] : ['surge'], '1'));
		const index = new BoardIndex(jobs, { workLimit: 4 });
		const query: BoardQuery = { q: 'output', status: [], tech: '', age: '', sort: 'customer', dir: 'asc', page: 1, per: 10 };
		const check = (q: string) => expect(index.select({ ...query, q }, q.split(' '), NOW_US)).toEqual(plainly(jobs, { ...query, q }, q.split(' ')));
		['output', 'ou', 'su'].forEach(check); // their bits are made now, and must follow what comes
		const moved = jobs.slice(0, 12).map((j, i) => make(i, i % 2 ? 'quoted' : 'ready', i % 4 ? ['output'] : ['surge'], '2'));
		index.apply(moved, [jobs[20].id, jobs[21].id]);
		jobs = [...moved, ...jobs.slice(12).filter((j) => j.id !== jobs[20].id && j.id !== jobs[21].id)];
		['output', 'ou', 'su'].forEach(check);
	});

	it('finds a part of more words than it lists through its bits, beside a rare word', () => {
		// Thirty serial numbers share 'sn-0': more words than the limit of 10 lets it list.
		const jobs = Array.from({ length: 30 }, (_, i) =>
			toJob({ id: `00000000-0000-4000-8000-${String(i).padStart(12, '0')}`, number: i + 1, status: JOB_STATUSES[i % 8], tech: null, customer: `C${i % 4}`, unit: 'U', promised: null, openedDays: 1, changedDays: 1, words: [`sn-${String(i).padStart(4, '0')}`, ...(i % 9 === 0 ? ['kestrel'] : [])] }, '1')
		);
		const index = new BoardIndex(jobs, { workLimit: 10 });
		for (const q of ['kestrel sn-0', 'sn-00 kestrel', 'sn-0', 'sn-001 sn-0']) {
			const query: BoardQuery = { q, status: [], tech: '', age: '', sort: 'customer', dir: 'asc', page: 1, per: 25 };
			const found = index.select(query, q.split(' '), NOW_US);
			expect(found).toEqual(plainly(jobs, query, q.split(' ')));
			expect(found!.total).toBeGreaterThan(0);
		}
	});

	it('reads later pages of chosen statuses and of one technician block by block, as jobs move and a technician joins', () => {
		const techs = [null, 'a0000000-0000-4000-8000-000000000001', 'a0000000-0000-4000-8000-000000000002'];
		const make = (i: number, status: JobStatus, tech: string | null, xid: string) =>
			toJob({ id: `00000000-0000-4000-8000-${String(i).padStart(12, '0')}`, number: ((i * 7919) % 2003) + 1, status, tech, customer: `C${i % 41}`, unit: `U${i % 13}`, promised: null, openedDays: i % 40, changedDays: i % 17, words: [] }, xid);
		let jobs = Array.from({ length: 2000 }, (_, i) => make(i, JOB_STATUSES[(i * 3) % 8], techs[i % 3], '1'));
		const index = new BoardIndex(jobs);
		const check = () => {
			for (const sort of SORT_KEYS) {
				for (const [dir, page] of [['asc', 9], ['desc', 30], ['asc', 61]] as const) {
					for (const filter of [{ status: ['ready' as const, 'quoted' as const] }, { tech: techs[1]! }, { tech: 'none', status: ['picked_up' as const] }, { tech: techs[2]!, status: ['diagnosing' as const] }]) {
						const query: BoardQuery = { q: '', status: [], tech: '', age: '', sort, dir, page, per: 10, ...filter };
						expect(index.select(query, [], NOW_US)).toEqual(plainly(jobs, query, []));
					}
				}
			}
		};
		check();
		// A few jobs move (one by one) and then many (every order sorted again), some to a new technician.
		for (const [from, to, xid] of [[0, 40, '2'], [100, 400, '3']] as const) {
			const moved = jobs.slice(from, to).map((j, k) => make(from + k, JOB_STATUSES[k % 8], k % 5 ? techs[k % 3] : 'a0000000-0000-4000-8000-000000000003', xid));
			index.apply(moved, []);
			jobs = jobs.map((j) => moved.find((m) => m.id === j.id) ?? j);
			check();
		}
	});

	it('skips a job already held as written by the same transaction, and takes many changes at once', () => {
		const jobs = Array.from({ length: 100 }, (_, i) =>
			toJob({ id: `00000000-0000-4000-8000-${String(i).padStart(12, '0')}`, number: i + 1, status: 'checked_in', tech: null, customer: `C${i}`, unit: 'U', promised: null, openedDays: i % 30, changedDays: 1, words: ['orla'] }, '5')
		);
		const index = new BoardIndex(jobs);
		expect(index.apply([jobs[3]], [])).toBe(false);
		const version = index.version;
		const moved = jobs.map((j) => ({ ...j, status: 'ready' as const, rank: statusRank('ready'), xid: '6' }));
		expect(index.apply(moved, [])).toBe(true); // more than a few: every order is sorted again
		expect(index.version).toBe(version + 1);
		const query: BoardQuery = { q: 'orla', status: ['ready'], tech: '', age: '', sort: 'customer', dir: 'asc', page: 1, per: 25 };
		expect(index.select(query, ['orla'], NOW_US)).toEqual(plainly(moved, query, ['orla']));
	});

	it('finds words held by thousands of jobs, and one- and two-letter words, through their bits, as they change and the index grows', () => {
		const make = (i: number, words: string[], xid = '1') =>
			toJob({ id: `00000000-0000-4000-8000-${String(i).padStart(12, '0')}`, number: i + 1, status: JOB_STATUSES[i % 8], tech: null, customer: `C${i % 97}`, unit: 'U', promised: null, openedDays: i % 30, changedDays: 1, words }, xid);
		const wordsOf = (i: number) => [...(i % 3 ? ['output'] : []), ...(i % 50 === 0 ? ['kestrel'] : []), ...(i % 7 === 0 ? ['surge'] : [])];
		let jobs = Array.from({ length: 3300 }, (_, i) => make(i, wordsOf(i)));
		const index = new BoardIndex(jobs);
		const check = (q: string) => {
			const query: BoardQuery = { q, status: [], tech: '', age: '', sort: 'customer', dir: 'asc', page: 2, per: 10 };
			expect(index.select(query, q.split(' '), NOW_US)).toEqual(plainly(jobs, query, q.split(' ')));
		};
		const searches = ['kestrel output', 'output kestrel surge', 'surge output', 'output', 'ke', 'ou su', 'su output'];
		for (const q of searches) check(q);
		// Past a thousand matches the page is found through marks in reused arrays (see the test above).
		(index as unknown as { scratch: { generation: number } }).scratch.generation = 0x7fff_fffd;
		for (const q of searches) check(q);
		// 'output' leaves some jobs, new jobs bring it past the first capacity, and the bits follow.
		const changed = jobs.slice(0, 600).map((j, i) => make(i, i % 2 ? [] : wordsOf(i), '2'));
		const added = Array.from({ length: 1500 }, (_, k) => make(3300 + k, wordsOf(3300 + k), '3'));
		index.apply([...changed, ...added], []);
		jobs = [...changed, ...jobs.slice(600), ...added];
		for (const q of searches) check(q);
	});

	it('reads a later page of a rare status however far along the order its jobs lie', () => {
		// 45,000 jobs, the last 60 by number ready: page 2 of the ready ones passes 44,940 others first.
		const jobs = Array.from({ length: 45_000 }, (_, i) =>
			toJob({ id: `00000000-0000-4000-8000-${String(i).padStart(12, '0')}`, number: i + 1, status: i >= 44_940 ? 'ready' : 'picked_up', tech: null, customer: 'C', unit: 'U', promised: null, openedDays: 1, changedDays: 1, words: [] }, '1')
		);
		const index = new BoardIndex(jobs);
		const query: BoardQuery = { q: '', status: ['ready'], tech: '', age: '', sort: 'number', dir: 'asc', page: 2, per: 25 };
		expect(index.select(query, [], NOW_US)).toEqual(plainly(jobs, query, []));
		expect(index.select(query, [], NOW_US)?.ids[0]).toBe(jobs[44_965].id);
	});

	it('counts a search found in more jobs than it looks at one by one through bits, and leaves it to the SQL with a technician or age filter', () => {
		// 'output' in 48,000 of 60,000 jobs: more than the 40,000 a search looks at one by one.
		const jobs = Array.from({ length: 60_000 }, (_, i) =>
			toJob({ id: `00000000-0000-4000-8000-${String(i).padStart(12, '0')}`, number: i + 1, status: i % 3 ? 'checked_in' : 'ready', tech: null, customer: `C${i % 7}`, unit: 'U', promised: null, openedDays: 1, changedDays: 1, words: i % 5 ? ['output'] : [] }, '1')
		);
		const index = new BoardIndex(jobs);
		const query: BoardQuery = { q: 'output', status: [], tech: '', age: '', sort: 'customer', dir: 'asc', page: 1, per: 25 };
		for (const asked of [query, { ...query, page: 1000, dir: 'desc' as const }, { ...query, q: 'no', status: ['ready' as const], page: 300 }, { ...query, q: 'ou 3', sort: 'number' as const }]) {
			const words = asked.q.split(' ');
			expect(index.select(asked, words, NOW_US)).toEqual(plainly(jobs, asked, words));
		}
		expect(index.select(query, ['output'], NOW_US)?.total).toBe(48_000);
		expect(index.select({ ...query, tech: 'none' }, ['output'], NOW_US)).toBeNull();
		expect(index.select({ ...query, age: '30' }, ['output'], NOW_US)).toBeNull();
		expect(index.select({ ...query, q: '#40001' }, ['#40001'], NOW_US)?.total).toBe(1);
	});
});
