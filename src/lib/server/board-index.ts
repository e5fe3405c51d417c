import { JOB_STATUSES, type JobStatus } from '../domain';
import type { BoardQuery, SortKey } from '../board-query';

/**
 * The job board's search and age filters, and its later pages, over one shop's jobs, in memory:
 * the words of every job's search text point to its jobs, and each sort key keeps the jobs in its
 * order. A search then costs in proportion to the jobs it matches, wherever they fall in the order
 * asked for, and counts them all exactly; a page deep in the whole list costs what the first
 * does. PostgreSQL stays the record: this is built from it, brought up to date from it on every
 * request (see `board.ts`), and only chooses which job ids make the page; the rows shown are read
 * from PostgreSQL.
 *
 * The answers are those of the SQL the board runs without it: a job matches when its search text
 * (lower case, as stored) contains every word of the search as typed, lowered; the orders are
 * PostgreSQL's for a database that sorts text by code point (C or C.UTF-8, checked before one is
 * built), nulls last, then id. A test compares the two on the same jobs.
 */

/** One job as read from PostgreSQL (see FIELDS). Times are microseconds since 1970 as text. */
export interface IndexedJob {
	id: string;
	number: number;
	status: JobStatus;
	rank: number;
	tech: string | null;
	customer: string | null;
	unit: string | null;
	techName: string | null;
	promised: string | null;
	opened: string;
	changed: string;
	text: string;
	xid: string | null;
}

/** The columns of `IndexedJob`, read from `jobs j`. */
export const FIELDS = `j.id, j.number, j.status, j.status_rank AS rank, j.technician_id AS tech, j.customer_name AS customer,
	j.unit_label AS unit, j.technician_name AS "techName", to_char(j.promised_on, 'YYYY-MM-DD') AS promised,
	(extract(epoch FROM j.created_at) * 1000000)::bigint::text AS opened,
	(extract(epoch FROM j.status_changed_at) * 1000000)::bigint::text AS changed,
	j.search_text AS text, j.written_by::text AS xid`;

/** Database collations whose text order is code point order, the order this index keeps. */
export const CODE_POINT_COLLATIONS = ['C', 'POSIX', 'C.UTF-8', 'C.utf8', 'ucs_basic'];

const SORTED: readonly SortKey[] = ['number', 'customer', 'unit', 'status', 'technician', 'promised', 'changed', 'opened'];
const STATUS = new Map(JOB_STATUSES.map((s, i) => [s, i]));
const DAY_US = 86_400_000_000;
/** Places in an order per block of the page scan; up to FEW selected jobs are sorted instead of scanned for. */
const BLOCK = 256;
const FEW = 1024;
/** The most jobs a search may have to look at (see `select`). */
const WORK_LIMIT = 40_000;
/** Words held by this many jobs or more are also kept as one bit per job. */
const FREQUENT = 2048;
/** How many typed words keep their bits (12.5 KB each per 100,000 jobs). */
const WORDS_KEPT = 64;
/** More changed jobs than this at once re-sort every order instead of moving jobs one by one. */
const RESORT_ABOVE = 64;

/**
 * JavaScript compares strings by UTF-16 code unit, which differs from code point order only between
 * a surrogate (an astral character) and U+E000–U+FFFF. Such strings are kept with those two ranges
 * swapped so that `<` gives code point order; others are kept as they are.
 */
export function codePointKey(value: string | null): string | null {
	if (value === null || !/[\ud800-\uffff]/.test(value)) return value;
	let out = '';
	for (let i = 0; i < value.length; i++) {
		const c = value.charCodeAt(i);
		out += String.fromCharCode(c < 0xd800 ? c : c >= 0xe000 ? c - 0x800 : c + 0x2000);
	}
	return out;
}

/** Counts kept by status index, as the board's counts by status name. */
const byStatus = (n: Int32Array) => Object.fromEntries(JOB_STATUSES.map((s, i) => [s, n[i]])) as Record<JobStatus, number>;

const words = (text: string) => [...new Set(text.split(/\s+/).filter(Boolean))];

/** One bit per slot: whether a slot's bit is set, and setting or clearing it. */
const hasBit = (bits: Uint32Array, slot: number) => ((bits[slot >>> 5] >>> (slot & 31)) & 1) === 1;
const setBit = (bits: Uint32Array, slot: number) => void (bits[slot >>> 5] |= 1 << (slot & 31));
const clearBit = (bits: Uint32Array, slot: number) => void (bits[slot >>> 5] &= ~(1 << (slot & 31)));

/** The number of bits set in a 32-bit word. */
function ones(word: number): number {
	word -= (word >>> 1) & 0x55555555;
	word = (word & 0x33333333) + ((word >>> 2) & 0x33333333);
	return Math.imul((word + (word >>> 4)) & 0x0f0f0f0f, 0x01010101) >>> 24;
}

/** In a list of `length` places whose first ones are `before` and the rest not, how many are (a binary search). */
function countBefore(length: number, before: (place: number) => boolean): number {
	let lo = 0;
	let hi = length;
	while (lo < hi) {
		const mid = (lo + hi) >>> 1;
		if (before(mid)) lo = mid + 1;
		else hi = mid;
	}
	return lo;
}

/** How many values of an ascending list are below `bound` (where `bound` would go in it). */
const below = (sorted: number[], bound: number) => countBefore(sorted.length, (i) => sorted[i] < bound);

/** What `select` answers: counts per status, the total under the status filter, the page's job ids. */
type Selected = { counts: Record<JobStatus, number>; total: number; ids: string[] };

/** How to read a page along an order (see `BoardIndex.span`). */
interface Span {
	take: number;
	fromEnd: boolean;
	forward: boolean;
	skip: number;
	order: number[];
}

export class BoardIndex {
	/** Bumped on every change, so a page chosen before a change can tell it is out of date. */
	version = 0;
	/** Live jobs. */
	size = 0;

	private slotOf = new Map<string, number>();
	private ids: string[] = [];
	private xids: (string | null)[] = [];
	private texts: string[] = [];
	/** Technicians (null: none) numbered in the order first met, and each slot's number. */
	private techNumbers = new Map<string | null, number>();
	private techNo = new Uint16Array(0);
	/**
	 * For each order, per block of BLOCK places, how many of its jobs each technician holds in each
	 * status (index: block × groups + technician × statuses + status): a walk for a later page of
	 * chosen statuses or of one technician skips whole blocks by these counts.
	 */
	private blockCounts: Record<SortKey, Int32Array> = Object.fromEntries(SORTED.map((k) => [k, new Int32Array(0)])) as never;
	private keys: Record<SortKey, (string | number | null)[]> = Object.fromEntries(SORTED.map((k) => [k, []])) as never;
	private orders: Record<SortKey, number[]> = Object.fromEntries(SORTED.map((k) => [k, []])) as never;
	// Per slot, in typed arrays so a scan over every job stays a tight loop.
	private alive = new Uint8Array(0);
	private status = new Uint8Array(0);
	private opened = new Float64Array(0);
	private changed = new Float64Array(0);
	private ranks: Record<SortKey, Int32Array> = Object.fromEntries(SORTED.map((k) => [k, new Int32Array(0)])) as never;
	/** Live jobs per technician (by number) and status. */
	private techTotals: Int32Array[] = [];
	/** Per status, its live jobs' opening and change times in ascending order: how many fall before a time is one binary search. */
	private timesOf: Record<'opened' | 'changed', number[][]> = { opened: JOB_STATUSES.map(() => []), changed: JOB_STATUSES.map(() => []) };
	/** Word → the live jobs whose search text holds it; three letters → the words that hold them. */
	private postings = new Map<string, number[]>();
	private byTrigram = new Map<string, string[]>();
	/** For words held by at least FREQUENT jobs, the same as one bit per slot: asking whether a job holds one is then cheap. */
	private frequent = new Map<string, Uint32Array>();
	/**
	 * For words as typed in a search that are one or two letters (found inside any word, so not
	 * listed above) or found in too many jobs to list them one by one: one bit per job whose text
	 * holds them, read once from every text on first use and kept up to date, the WORDS_KEPT used
	 * last. With one bit per job for each status as well, such a search is counted a machine word
	 * (32 jobs) at a time.
	 */
	private wordBits = new Map<string, Uint32Array>();
	private statusBits: Uint32Array[] = JOB_STATUSES.map(() => new Uint32Array(0));
	private scratch = { generation: 0, marks: new Int32Array(0), standing: new Int32Array(0), blocks: new Int32Array(0), candidates: new Int32Array(0) };

	/** The most jobs a search may look at one by one (WORK_LIMIT; smaller in tests, to take every path). */
	private workLimit: number;

	constructor(jobs: IndexedJob[] = [], { workLimit = WORK_LIMIT } = {}) {
		this.workLimit = workLimit;
		for (const job of jobs) this.put(job);
		for (const key of SORTED) this.resort(key);
		this.retime();
	}

	/** The same as `new BoardIndex(jobs)`, letting other requests run every thousand jobs and between orders. */
	static async load(jobs: IndexedJob[]): Promise<BoardIndex> {
		const index = new BoardIndex();
		const pause = () => new Promise((resolve) => setImmediate(resolve));
		for (let i = 0; i < jobs.length; i += 1000) {
			for (const job of jobs.slice(i, i + 1000)) index.put(job);
			await pause();
		}
		for (const key of SORTED) {
			index.resort(key);
			await pause();
		}
		index.retime();
		return index;
	}

	/**
	 * Applies what changed since the last call: new and rewritten jobs (a job whose recorded writer
	 * is the one already held is skipped) and deleted ones. Returns whether anything changed.
	 */
	apply(changed: IndexedJob[], deleted: string[]): boolean {
		const moved: number[] = [];
		for (const id of deleted) {
			const slot = this.slotOf.get(id);
			if (slot === undefined || !this.alive[slot]) continue;
			this.unlink(slot);
			this.alive[slot] = 0;
			this.size--;
			moved.push(slot);
		}
		const fresh = changed.filter((job) => {
			const slot = this.slotOf.get(job.id);
			return slot === undefined || !this.alive[slot] || this.xids[slot] !== job.xid;
		});
		if (!moved.length && !fresh.length) return false;
		const many = moved.length + fresh.length > RESORT_ABOVE;
		if (!many) for (const slot of moved) this.takeOut(slot);
		for (const job of fresh) {
			const known = this.slotOf.get(job.id);
			if (!many && known !== undefined && this.alive[known]) this.takeOut(known);
			const slot = this.put(job);
			if (!many) this.insertInOrders(slot);
		}
		for (const key of SORTED) {
			if (many) this.resort(key);
			else this.rerank(key);
		}
		if (many) this.retime();
		this.version++;
		return true;
	}

	/**
	 * Counts per status of every job matching the search and age filters, the total under the status
	 * filter, and the page's job ids. Matches few enough to look at one by one (WORK_LIMIT) are
	 * found through the word lists; more, through each word's bits (`pageByBits`). Null when a
	 * technician or age filter comes with more than that: so many matches lie close together in
	 * any order, where the SQL's walk along the sort index finds a page soonest.
	 */
	select(query: BoardQuery, searchWords: string[], nowUs: number): Selected | null {
		const perStatus = new Int32Array(JOB_STATUSES.length);
		const wanted = new Uint8Array(JOB_STATUSES.length).fill(query.status.length ? 0 : 1);
		for (const s of query.status) wanted[STATUS.get(s)!] = 1;
		const since = query.age && query.age !== 'stale' ? nowUs - Number(query.age) * DAY_US : -Infinity;
		const stale = query.age === 'stale';
		const staleBefore = nowUs - 14 * DAY_US;
		const pickedUp = STATUS.get('picked_up')!;
		const tech = query.tech;
		const long = searchWords.filter((w) => w.length >= 3);
		const short = searchWords.filter((w) => w.length < 3);
		if (!searchWords.length && !query.age) return tech ? this.pageOfTechnician(query, wanted, tech) : this.pageOfAll(query, wanted);
		const { alive, status, opened, changed, texts, techNo } = this;
		// A technician the index has not met holds no jobs: no slot's number is -1.
		const techWanted = tech ? (this.techNumbers.get(tech === 'none' ? null : tech) ?? -1) : -1;
		const n = this.ids.length;
		const rank = this.ranks[query.sort];
		// Where each selected job stands in the order asked for, and which blocks of BLOCK places hold
		// one (marked with this call's generation, see `scratch`): the page is found by scanning
		// these from the nearer end. A few selected jobs are also listed, and then sorted instead.
		const { marks, standing, blocks, candidates, generation } = this.scratchFor(searchWords.length);
		const few: number[] = [];
		let total = 0;

		const byAge = since > -Infinity;
		// For a live job (the lists and orders hold only those): count it, and place it when selected.
		let shortSets: Uint32Array[] = [];
		const keep = (slot: number) => {
			if (byAge && opened[slot] < since) return;
			if (stale && !(changed[slot] < staleBefore && status[slot] !== pickedUp)) return;
			if (tech && techNo[slot] !== techWanted) return;
			for (let w = 0; w < shortSets.length; w++) if (!hasBit(shortSets[w], slot)) return;
			const state = status[slot];
			perStatus[state]++;
			if (wanted[state]) {
				const place = rank[slot];
				standing[place] = generation;
				blocks[(place / BLOCK) | 0] = generation;
				if (++total <= FEW) few.push(place);
			}
		};
		// Each word as the index's words containing it, the rarest first; a part of too many words to
		// list them (the start of every serial number) is found through its bits instead.
		const found = long
			.map((word) => {
				const tokens = this.wordsContaining(word);
				return { word, tokens, size: tokens ? tokens.reduce((sum, token) => sum + this.postings.get(token)!.length, 0) : Infinity };
			})
			.sort((a, b) => a.size - b.size);
		const window = !found.length && !short.length && (byAge || stale) ? this.ageWindow(since, stale, staleBefore) : null;
		if (window && !tech) {
			// Every job in the window is looked at; or, when the jobs kept lie thick enough along
			// the order asked for, the page is read along it and the counts come from the times.
			const byTime = this.pageByTime(query, wanted, stale, stale ? staleBefore : since, window.to - window.from);
			if (byTime) return byTime;
		}
		const work = found.length ? found.reduce((sum, f) => sum + Math.min(f.size, found[0].size), 0) : window ? window.to - window.from : this.size;
		if (work > this.workLimit) return tech || byAge || stale ? null : this.pageByBits(query, wanted, searchWords);
		shortSets = short.map((word) => this.bitsOf(word));
		if (found.length) {
			// The rarest word's jobs, then kept only where each other word is found too: by its bits
			// when it is a common word, by walking its jobs when they are few, otherwise by reading
			// each remaining job's text. A job still in after word i holds `generation + i` in `marks`;
			// the candidates are narrowed in place.
			let count = 0;
			for (const token of found[0].tokens!) {
				for (const slot of this.postings.get(token)!) {
					if (marks[slot] === generation) continue;
					marks[slot] = generation;
					candidates[count++] = slot;
				}
			}
			for (let i = 1; i < found.length && count; i++) {
				const { word, tokens, size } = found[i];
				const stamp = generation + i;
				const sets = tokens ? tokens.map((token) => this.frequent.get(token)) : [this.bitsOf(word)];
				let test: (slot: number) => boolean;
				if (sets.every(Boolean)) {
					test = (slot) => sets.some((bits) => hasBit(bits!, slot));
				} else if (size <= count * 4) {
					for (const token of tokens!) for (const slot of this.postings.get(token)!) if (marks[slot] === stamp - 1) marks[slot] = stamp;
					test = (slot) => marks[slot] === stamp;
				} else {
					test = (slot) => texts[slot].includes(word);
				}
				let kept = 0;
				for (let c = 0; c < count; c++) {
					const slot = candidates[c];
					if (!test(slot)) continue;
					marks[slot] = stamp;
					candidates[kept++] = slot;
				}
				count = kept;
			}
			for (let c = 0; c < count; c++) keep(candidates[c]);
		} else if (window) {
			for (let i = window.from; i < window.to; i++) keep(window.by[i]);
		} else {
			for (let slot = 0; slot < n; slot++) if (alive[slot]) keep(slot);
		}
		// The page: from the nearer end of the selection, skip to it and take it.
		return this.pageFrom(query, wanted, perStatus, ({ take, forward, order, skip }) => {
			const page: number[] = [];
			if (total <= FEW) {
				// A typed array sorts numbers natively, several times faster than a comparison function.
				const places = Int32Array.from(few).sort();
				if (!forward) places.reverse();
				for (const place of places.subarray(skip, skip + take)) page.push(order[place]);
				return page;
			}
			const lastBlock = Math.ceil(n / BLOCK) - 1;
			for (let b = forward ? 0 : lastBlock; page.length < take && b >= 0 && b <= lastBlock; b += forward ? 1 : -1) {
				if (blocks[b] !== generation) continue;
				const first = b * BLOCK;
				const last = Math.min(first + BLOCK, n) - 1;
				for (let i = forward ? first : last; page.length < take && i >= first && i <= last; i += forward ? 1 : -1) {
					if (standing[i] !== generation) continue;
					if (skip > 0) skip--;
					else page.push(order[i]);
				}
			}
			return page;
		});
	}

	/**
	 * The page of the jobs counted in `perStatus` that are in a wanted status, with those counts:
	 * `read` finds it along the order asked for from the end nearer the page (see `span`), and it
	 * is turned round when read from the far end. Null when `read` gives up.
	 */
	private pageFrom(query: BoardQuery, wanted: Uint8Array, perStatus: Int32Array, read: (way: Span, total: number) => number[] | null): Selected | null {
		const total = perStatus.reduce((sum, count, s) => sum + (wanted[s] ? count : 0), 0);
		const way = this.span(query, total);
		const page = read(way, total);
		if (!page) return null;
		if (way.fromEnd) page.reverse();
		return { counts: byStatus(perStatus), total, ids: page.map((slot) => this.ids[slot]) };
	}

	/**
	 * The working arrays of `select`, kept from call to call (a select runs start to end without
	 * yielding): allocating and zeroing them for each request made more garbage than anything else
	 * a request does. Instead of clearing them, each call takes new generation numbers, one per
	 * word searched for, and an entry counts only when it holds one of this call's.
	 */
	private scratchFor(words: number) {
		const scratch = this.scratch;
		const capacity = this.alive.length;
		if (scratch.marks.length < capacity || scratch.generation > 0x7fff_0000) {
			Object.assign(scratch, {
				generation: 0,
				marks: new Int32Array(capacity),
				standing: new Int32Array(capacity),
				blocks: new Int32Array(Math.ceil(capacity / BLOCK)),
				candidates: new Int32Array(capacity)
			});
		}
		const generation = scratch.generation + 1;
		scratch.generation = generation + words;
		return { ...scratch, generation };
	}

	/**
	 * A page of all the shop's jobs, or of those in some statuses: any page costs what the first
	 * does, read along the order from its nearer end (with statuses chosen, as far as the page).
	 */
	private pageOfAll(query: BoardQuery, wanted: Uint8Array) {
		const { status } = this;
		const totals = new Int32Array(JOB_STATUSES.length);
		for (const counts of this.techTotals) for (let s = 0; s < totals.length; s++) totals[s] += counts[s];
		return this.pageFrom(query, wanted, totals, ({ take, forward, order, skip }) => {
			if (query.status.length) return this.walkBlocks(query.sort, forward, skip, take, wanted, null, (slot) => wanted[status[slot]] === 1);
			const first = forward ? skip : order.length - skip - take;
			const page = order.slice(first, first + take);
			return forward ? page : page.reverse();
		});
	}

	/**
	 * Along the order of `key` from its start (`forward`) or end, skips `skip` jobs in the `wanted`
	 * statuses (of one technician's, by number, or of all) and takes `take`: whole blocks of places
	 * are skipped by their counts, and only the blocks the page lies in are read, testing each job
	 * with `kept`.
	 */
	private walkBlocks(key: SortKey, forward: boolean, skip: number, take: number, wanted: Uint8Array, techNo: number | null, kept: (slot: number) => boolean): number[] {
		const order = this.orders[key];
		const counts = this.blockCounts[key];
		const statuses = JOB_STATUSES.length;
		const groups = this.techNumbers.size * statuses;
		const counted: number[] = [];
		for (let t = 0; t < this.techNumbers.size; t++) {
			if (techNo !== null && t !== techNo) continue;
			for (let s = 0; s < statuses; s++) if (wanted[s]) counted.push(t * statuses + s);
		}
		const page: number[] = [];
		const lastBlock = Math.ceil(order.length / BLOCK) - 1;
		for (let b = forward ? 0 : lastBlock; page.length < take && b >= 0 && b <= lastBlock; b += forward ? 1 : -1) {
			let inBlock = 0;
			for (const group of counted) inBlock += counts[b * groups + group];
			if (skip >= inBlock) {
				skip -= inBlock;
				continue;
			}
			const first = b * BLOCK;
			const last = Math.min(first + BLOCK, order.length) - 1;
			for (let i = forward ? first : last; page.length < take && i >= first && i <= last; i += forward ? 1 : -1) {
				if (!kept(order[i])) continue;
				if (skip > 0) skip--;
				else page.push(order[i]);
			}
		}
		return page;
	}

	/**
	 * A page of one technician's jobs (or of those with none), in some statuses or all: counted from
	 * the totals kept per technician and read along the order from the page's nearer end.
	 */
	private pageOfTechnician(query: BoardQuery, wanted: Uint8Array, tech: string) {
		const key = tech === 'none' ? null : tech;
		const number = this.techNumbers.get(key);
		const perStatus = number === undefined ? new Int32Array(JOB_STATUSES.length) : this.techTotals[number];
		const { status, techNo } = this;
		return this.pageFrom(query, wanted, perStatus, ({ take, forward, skip }) =>
			number === undefined ? [] : this.walkBlocks(query.sort, forward, skip, take, wanted, number, (slot) => wanted[status[slot]] === 1 && techNo[slot] === number)
		);
	}

	/**
	 * Jobs opened since `bound`, or left in their status since before it (`stale`, picked-up jobs
	 * aside), with no search or technician: counted per status from each status's sorted times, and
	 * the page read along the order asked for, testing each job, from the page's nearer end. Taken
	 * when that walk is expected to look at fewer jobs than the `window` of jobs in the time range
	 * (with the jobs kept spread evenly along the order); given up for the window after four times
	 * the expected walk, or when the window is too big to look at, after WORK_LIMIT places. Null then.
	 */
	private pageByTime(query: BoardQuery, wanted: Uint8Array, stale: boolean, bound: number, window: number) {
		const pickedUp = STATUS.get('picked_up')!;
		const perStatus = new Int32Array(JOB_STATUSES.length);
		this.timesOf[stale ? 'changed' : 'opened'].forEach((sorted, s) => {
			const before = below(sorted, bound);
			perStatus[s] = stale ? (s === pickedUp ? 0 : before) : sorted.length - before;
		});
		const { status } = this;
		const times = stale ? this.changed : this.opened;
		const kept = stale
			? (slot: number) => wanted[status[slot]] === 1 && times[slot] < bound && status[slot] !== pickedUp
			: (slot: number) => wanted[status[slot]] === 1 && times[slot] >= bound;
		return this.pageFrom(query, wanted, perStatus, ({ take, forward, order, skip }, total) => {
			const expected = total ? ((skip + take + 1) * this.size) / total : this.size;
			if (expected >= window) return null;
			const limit = this.workLimit;
			return this.walk(order, forward, skip, take, window > limit ? limit : Math.min(limit, 4 * expected + BLOCK), kept);
		});
	}

	/**
	 * A search whose words are found in too many jobs to look at them one by one (and no technician
	 * or age filter): each word's bits (see `wordBits`) taken together, counted per status 32 jobs
	 * at a time against each status's bits, and the page read along the order asked for from its
	 * nearer end, testing each job's bit. The first search for such a word reads every job's text
	 * once (tens of milliseconds on 100,000 jobs); later ones take well under a millisecond.
	 */
	private pageByBits(query: BoardQuery, wanted: Uint8Array, searchWords: string[]) {
		const sets = searchWords.map((word) => this.bitsOf(word));
		const matched = sets[0].slice();
		for (const bits of sets.slice(1)) for (let i = 0; i < matched.length; i++) matched[i] &= bits[i];
		const perStatus = new Int32Array(JOB_STATUSES.length);
		this.statusBits.forEach((bits, s) => {
			let count = 0;
			for (let i = 0; i < matched.length; i++) count += ones(matched[i] & bits[i]);
			perStatus[s] = count;
		});
		const { status } = this;
		return this.pageFrom(query, wanted, perStatus, ({ take, forward, order, skip }) =>
			this.walk(order, forward, skip, take, order.length, (slot) => wanted[status[slot]] === 1 && hasBit(matched, slot))
		);
	}

	/** Along `order` from its start (`forward`) or end, skips `skip` jobs that pass `kept` and takes `take`; null past `limit` places. */
	private walk(order: number[], forward: boolean, skip: number, take: number, limit: number, kept: (slot: number) => boolean): number[] | null {
		const page: number[] = [];
		let looked = 0;
		for (let i = forward ? 0 : order.length - 1; page.length < take && i >= 0 && i < order.length; i += forward ? 1 : -1) {
			if (++looked > limit) return null;
			if (!kept(order[i])) continue;
			if (skip > 0) skip--;
			else page.push(order[i]);
		}
		return page;
	}

	/**
	 * How to reach a page of `total` selected jobs: read along the order from the end nearer the
	 * page (`forward` from the start, else from the end), skip `skip` selected jobs, take `take`,
	 * and turn them round when read `fromEnd`.
	 */
	private span(query: BoardQuery, total: number): Span {
		const offset = (query.page - 1) * query.per;
		const take = Math.max(0, Math.min(query.per, total - offset));
		const fromEnd = offset > total / 2;
		return { take, fromEnd, forward: (query.dir === 'asc') !== fromEnd, skip: fromEnd ? total - offset - take : offset, order: this.orders[query.sort] };
	}

	/**
	 * Jobs opened since `since`, or (stale) left in their status since before `staleBefore`: one end
	 * of the order by opening or by change, as that order and the places `from` up to `to`.
	 */
	private ageWindow(since: number, stale: boolean, staleBefore: number) {
		const by = stale ? this.orders.changed : this.orders.opened;
		const times = stale ? this.changed : this.opened;
		const bound = stale ? staleBefore : since;
		const split = countBefore(by.length, (i) => times[by[i]] < bound);
		return stale ? { by, from: 0, to: split } : { by, from: split, to: by.length };
	}

	/** The live words of the index that contain `word` (three letters or more); null when more words than the work limit might. */
	private wordsContaining(word: string): string[] | null {
		let rarest: string[] | undefined;
		for (let i = 0; i + 3 <= word.length; i++) {
			const list = this.byTrigram.get(word.slice(i, i + 3));
			if (!list) return [];
			if (!rarest || list.length < rarest.length) rarest = list;
		}
		if (rarest!.length > this.workLimit) return null;
		return rarest!.filter((token) => token.includes(word) && this.postings.get(token)!.length > 0);
	}

	/** Stores a job's values in its slot (a new one for a new job) and files it under its words; orders are left to the caller. */
	private put(job: IndexedJob): number {
		let slot = this.slotOf.get(job.id);
		if (slot === undefined) {
			slot = this.ids.length;
			this.slotOf.set(job.id, slot);
			this.ids.push(job.id);
			if (slot >= this.alive.length) this.grow(Math.max(1024, slot * 2));
		} else if (this.alive[slot]) {
			this.unlink(slot);
			this.size--;
		}
		this.alive[slot] = 1;
		this.size++;
		this.xids[slot] = job.xid;
		this.texts[slot] = job.text;
		this.status[slot] = STATUS.get(job.status)!;
		let techNo = this.techNumbers.get(job.tech);
		if (techNo === undefined) {
			this.techNumbers.set(job.tech, (techNo = this.techNumbers.size));
			this.techTotals.push(new Int32Array(JOB_STATUSES.length));
		}
		this.techNo[slot] = techNo;
		this.techTotals[techNo][this.status[slot]]++;
		setBit(this.statusBits[this.status[slot]], slot);
		this.opened[slot] = Number(job.opened);
		this.changed[slot] = Number(job.changed);
		const keys = this.keys;
		keys.number[slot] = job.number;
		keys.customer[slot] = codePointKey(job.customer);
		keys.unit[slot] = codePointKey(job.unit);
		keys.status[slot] = job.rank;
		keys.technician[slot] = codePointKey(job.techName);
		keys.promised[slot] = job.promised;
		keys.changed[slot] = this.changed[slot];
		keys.opened[slot] = this.opened[slot];
		for (const token of words(job.text)) {
			let jobs = this.postings.get(token);
			if (!jobs) {
				this.postings.set(token, (jobs = []));
				for (const trigram of new Set(Array.from({ length: Math.max(0, token.length - 2) }, (_, i) => token.slice(i, i + 3)))) {
					let list = this.byTrigram.get(trigram);
					if (!list) this.byTrigram.set(trigram, (list = []));
					list.push(token);
				}
			}
			jobs.push(slot);
			const bits = this.frequent.get(token);
			if (bits) setBit(bits, slot);
			else if (jobs.length >= FREQUENT) {
				const made = new Uint32Array(this.alive.length >>> 5);
				for (const held of jobs) setBit(made, held);
				this.frequent.set(token, made);
			}
		}
		for (const [word, bits] of this.wordBits) if (job.text.includes(word)) setBit(bits, slot);
		return slot;
	}

	/** The bits of a word as typed (see `wordBits`), read from every live job's text when it has none yet. */
	private bitsOf(word: string): Uint32Array {
		let bits = this.wordBits.get(word);
		if (bits) {
			this.wordBits.delete(word); // to the back: the map keeps them in order of use
		} else {
			bits = new Uint32Array(this.alive.length >>> 5);
			for (let slot = 0; slot < this.ids.length; slot++) if (this.alive[slot] && this.texts[slot].includes(word)) setBit(bits, slot);
			if (this.wordBits.size >= WORDS_KEPT) this.wordBits.delete(this.wordBits.keys().next().value!);
		}
		this.wordBits.set(word, bits);
		return bits;
	}

	/** Takes a job out from under its words and out of its counts (its values stay until overwritten). */
	private unlink(slot: number) {
		this.techTotals[this.techNo[slot]][this.status[slot]]--;
		clearBit(this.statusBits[this.status[slot]], slot);
		for (const token of words(this.texts[slot])) {
			const jobs = this.postings.get(token)!;
			jobs.splice(jobs.indexOf(slot), 1);
			const bits = this.frequent.get(token);
			if (bits) clearBit(bits, slot);
		}
		for (const bits of this.wordBits.values()) clearBit(bits, slot);
	}

	private grow(capacity: number) {
		const wider = <T extends Uint8Array | Uint16Array | Float64Array | Int32Array>(old: T, make: (n: number) => T) => {
			const next = make(capacity);
			next.set(old);
			return next;
		};
		this.alive = wider(this.alive, (n) => new Uint8Array(n));
		this.status = wider(this.status, (n) => new Uint8Array(n));
		this.techNo = wider(this.techNo, (n) => new Uint16Array(n));
		this.opened = wider(this.opened, (n) => new Float64Array(n));
		this.changed = wider(this.changed, (n) => new Float64Array(n));
		for (const key of SORTED) this.ranks[key] = wider(this.ranks[key], (n) => new Int32Array(n));
		const widerBits = (bits: Uint32Array) => {
			const next = new Uint32Array(capacity >>> 5);
			next.set(bits);
			return next;
		};
		for (const sets of [this.frequent, this.wordBits]) for (const [word, bits] of sets) sets.set(word, widerBits(bits));
		this.statusBits = this.statusBits.map(widerBits);
	}

	/** PostgreSQL's order for the key: ascending, nulls last, then id (job numbers are unique in a shop). */
	private compare(key: SortKey, a: number, b: number): number {
		const x = this.keys[key][a];
		const y = this.keys[key][b];
		if (x !== y) {
			if (x === null) return 1;
			if (y === null) return -1;
			return x < y! ? -1 : 1;
		}
		return this.ids[a] < this.ids[b] ? -1 : this.ids[a] > this.ids[b] ? 1 : 0;
	}

	private resort(key: SortKey) {
		const order: number[] = [];
		for (let slot = 0; slot < this.ids.length; slot++) if (this.alive[slot]) order.push(slot);
		this.orders[key] = order.sort((a, b) => this.compare(key, a, b));
		this.rerank(key);
	}

	/** Where a job stands, or would stand, in a key's order, by its values as now held. */
	private position(key: SortKey, slot: number): number {
		const order = this.orders[key];
		return countBefore(order.length, (i) => this.compare(key, order[i], slot) < 0);
	}

	/** Takes a job out of every order and out of its status's times (before its values change); ranks are renewed by the caller. */
	private takeOut(slot: number) {
		for (const key of SORTED) this.orders[key].splice(this.position(key, slot), 1);
		for (const [times, sorted] of this.timesFor(slot)) sorted.splice(below(sorted, times[slot]), 1);
	}

	private insertInOrders(slot: number) {
		for (const key of SORTED) this.orders[key].splice(this.position(key, slot), 0, slot);
		for (const [times, sorted] of this.timesFor(slot)) sorted.splice(below(sorted, times[slot]), 0, times[slot]);
	}

	/** The job's opening and change times, each with the sorted list of its status that holds it. */
	private timesFor(slot: number): [Float64Array, number[]][] {
		return [
			[this.opened, this.timesOf.opened[this.status[slot]]],
			[this.changed, this.timesOf.changed[this.status[slot]]]
		];
	}

	/** Every status's sorted times, afresh from the live jobs. */
	private retime() {
		const opened: number[][] = JOB_STATUSES.map(() => []);
		const changed: number[][] = JOB_STATUSES.map(() => []);
		for (let slot = 0; slot < this.ids.length; slot++) {
			if (!this.alive[slot]) continue;
			opened[this.status[slot]].push(this.opened[slot]);
			changed[this.status[slot]].push(this.changed[slot]);
		}
		for (const list of [...opened, ...changed]) list.sort((a, b) => a - b);
		this.timesOf = { opened, changed };
	}

	private rerank(key: SortKey) {
		const order = this.orders[key];
		const rank = this.ranks[key];
		const { status, techNo } = this;
		const groups = this.techNumbers.size * JOB_STATUSES.length;
		const counts = new Int32Array(Math.ceil(order.length / BLOCK) * groups);
		for (let i = 0; i < order.length; i++) {
			const slot = order[i];
			rank[slot] = i;
			counts[((i / BLOCK) | 0) * groups + techNo[slot] * JOB_STATUSES.length + status[slot]]++;
		}
		this.blockCounts[key] = counts;
	}
}
