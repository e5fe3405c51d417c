import { describe, expect, it } from 'vitest';
import { answering } from './answering';

const later = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

describe('answering', () => {
	it('settles at once when no request is being answered', async () => {
		const requests = answering();
		const started = Date.now();
		await requests.settled(5_000);
		expect(Date.now() - started).toBeLessThan(1_000);
	});

	it('settles when the last request being answered is done, whether it succeeded or failed', async () => {
		const requests = answering();
		let finish!: () => void;
		const slow = requests.count(() => new Promise<string>((resolve) => (finish = () => resolve('answer'))));
		const failing = requests.count(async () => {
			await later(5);
			throw new Error('refused');
		});
		let settled = false;
		const waiting = requests.settled(5_000).then(() => (settled = true));
		await expect(failing).rejects.toThrow('refused');
		await later(10);
		expect(settled).toBe(false); // the slow one still runs
		const finished = Date.now();
		finish();
		expect(await slow).toBe('answer');
		await waiting;
		expect(settled).toBe(true);
		expect(Date.now() - finished).toBeLessThan(1_000); // not the 5 s limit
	});

	it('gives up waiting after the time given', async () => {
		const requests = answering();
		void requests.count(() => new Promise(() => {})); // never answered
		const started = Date.now();
		await requests.settled(50);
		expect(Date.now() - started).toBeGreaterThanOrEqual(45);
	});
});
