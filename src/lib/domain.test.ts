import { describe, expect, it } from 'vitest';
import { JOB_STATUSES, NEXT_STATUSES, isOverdue, isStepBack, moveLabel } from './domain';

describe('job moves', () => {
	it('the one move back, from quoted to diagnosing, is named as a step back', () => {
		expect(isStepBack('quoted', 'diagnosing')).toBe(true);
		expect(moveLabel('quoted', 'diagnosing')).toBe('Back to diagnosis');
		expect(moveLabel('checked_in', 'diagnosing')).toBe('Start diagnosis');
	});

	it('every other allowed move goes forward and keeps its own name', () => {
		const forward = JOB_STATUSES.flatMap((from) => NEXT_STATUSES[from].map((to) => [from, to] as const)).filter(
			([from, to]) => !(from === 'quoted' && to === 'diagnosing')
		);
		expect(forward.length).toBeGreaterThan(5);
		for (const [from, to] of forward) {
			expect(isStepBack(from, to), `${from} → ${to}`).toBe(false);
			expect(moveLabel(from, to)).not.toMatch(/^Back/);
		}
	});
});

describe('overdue jobs', () => {
	const now = new Date('2026-12-02T15:00:00Z');
	it('a job past its promised day is overdue until it is ready', () => {
		expect(isOverdue('2026-12-01', 'in_repair', now)).toBe(true);
		expect(isOverdue('2026-12-02', 'in_repair', now)).toBe(false); // due today is not late yet
		expect(isOverdue('2026-12-01', 'ready', now)).toBe(false);
		expect(isOverdue('2026-12-01', 'declined', now)).toBe(false);
		expect(isOverdue(null, 'diagnosing', now)).toBe(false);
	});
});
