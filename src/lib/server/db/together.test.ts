import { describe, expect, it } from 'vitest';
import { together } from './together';

/** A lookup that records each call's keys and answers only when told to. */
function controlled() {
	const calls: { keys: string[]; answer: (values: Record<string, number>) => void; fail: (error: Error) => void }[] = [];
	const lookup = (keys: string[]) =>
		new Promise<Map<string, number>>((resolve, reject) => {
			calls.push({ keys, answer: (values) => resolve(new Map(Object.entries(values))), fail: reject });
		});
	return { calls, lookup };
}

const settle = () => new Promise((resolve) => setTimeout(resolve, 0));

describe('together', () => {
	it('sends a key at once when nothing is on its way, and what is asked meanwhile in one lookup after it', async () => {
		const { calls, lookup } = controlled();
		const find = together(lookup);
		const first = find('a');
		expect(calls.map((c) => c.keys)).toEqual([['a']]);
		const [b, c, b2] = [find('b'), find('c'), find('b')];
		expect(calls).toHaveLength(1); // waiting for the lookup on its way
		calls[0].answer({ a: 1 });
		expect(await first).toBe(1);
		await settle();
		expect(calls.map((call) => call.keys)).toEqual([['a'], ['b', 'c']]); // one lookup, each key once
		calls[1].answer({ b: 2 }); // no row for c
		expect(await Promise.all([b, c, b2])).toEqual([2, undefined, 2]);
	});

	it('never answers a key from a lookup sent before it was asked for, even one holding the same key', async () => {
		const { calls, lookup } = controlled();
		const find = together(lookup);
		const early = find('session');
		const late = find('session'); // asked while the first lookup is on its way
		calls[0].answer({ session: 1 });
		expect(await early).toBe(1);
		await settle();
		expect(calls).toHaveLength(2);
		calls[1].answer({}); // ended in between: the late asker is told so
		expect(await late).toBeUndefined();
	});

	it('passes a failed lookup to each of its askers and goes on with the next', async () => {
		const { calls, lookup } = controlled();
		const find = together(lookup);
		const first = find('a');
		const second = find('b');
		calls[0].fail(new Error('connection lost'));
		await expect(first).rejects.toThrow('connection lost');
		await settle();
		calls[1].answer({ b: 2 });
		expect(await second).toBe(2);
		// Idle again: the next key goes at once.
		const third = find('c');
		expect(calls).toHaveLength(3);
		calls[2].answer({ c: 3 });
		expect(await third).toBe(3);
	});
});
