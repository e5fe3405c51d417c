import { describe, expect, it } from 'vitest';
import { MAX_ATTEMPTS, RETRY_CAP_MS, afterFailure, isConnectionFailure, retryDelay } from './backoff';

describe('retry delays', () => {
	it('grow 5 s, 15 s, 45 s … by a factor of three, capped at 10 minutes (common practice, no source)', () => {
		const middle = [1, 2, 3, 4, 5, 6, 7, 20].map((attempt) => retryDelay(attempt, 0.5));
		expect(middle).toEqual([5_000, 15_000, 45_000, 135_000, 405_000, 600_000, 600_000, 600_000]);
	});

	it('spread each delay within ±20% and never beyond the cap', () => {
		expect(retryDelay(1, 0)).toBe(4_000);
		expect(retryDelay(1, 0.999999)).toBe(6_000);
		expect(retryDelay(50, 0.999999)).toBe(RETRY_CAP_MS);
		expect(retryDelay(50, 0)).toBe(RETRY_CAP_MS * 0.8);
		for (let attempt = 1; attempt <= MAX_ATTEMPTS; attempt++) {
			const low = retryDelay(attempt, 0);
			const high = retryDelay(attempt, 0.999999);
			expect(low).toBeLessThan(high);
			expect(low).toBeGreaterThanOrEqual(4_000);
		}
	});

	it('add up to a couple of hours before a message is given up', () => {
		let total = 0;
		for (let attempt = 1; attempt < MAX_ATTEMPTS; attempt++) total += retryDelay(attempt, 0.5);
		// 5 + 15 + 45 + 135 + 405 s, then 14 × 600 s = 9,005 s.
		expect(total).toBe(9_005_000);
	});
});

describe('after a failed attempt', () => {
	it('gives up at once on a permanent 5xx refusal of the envelope or message', () => {
		expect(afterFailure(1, { code: 'EENVELOPE', responseCode: 550 })).toBe('give-up');
		expect(afterFailure(1, { code: 'EMESSAGE', responseCode: 554 })).toBe('give-up');
	});

	it('retries temporary refusals, lost connections and bad credentials until the last attempt', () => {
		expect(afterFailure(1, { code: 'EENVELOPE', responseCode: 451 })).toBe('retry');
		expect(afterFailure(3, { code: 'ESOCKET' })).toBe('retry');
		expect(afterFailure(3, { code: 'EAUTH', responseCode: 535 })).toBe('retry');
		expect(afterFailure(MAX_ATTEMPTS - 1, { code: 'ECONNECTION' })).toBe('retry');
		expect(afterFailure(MAX_ATTEMPTS, { code: 'ECONNECTION' })).toBe('give-up');
	});

	it('tells an unreachable server from an unwelcome message', () => {
		expect(isConnectionFailure({ code: 'ESOCKET' })).toBe(true);
		expect(isConnectionFailure({ code: 'ECONNECTION' })).toBe(true);
		expect(isConnectionFailure({ code: 'EENVELOPE', responseCode: 451 })).toBe(false);
		expect(isConnectionFailure({ code: 'EAUTH', responseCode: 535 })).toBe(false);
	});
});
