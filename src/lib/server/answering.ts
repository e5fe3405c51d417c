/**
 * Counts the requests being answered, so that shutting down can wait for them. The server says it
 * has closed once every connection has; a request whose client went away before its answer is
 * still running then, and would find the database pool closed under it.
 */
export function answering() {
	let now = 0;
	const waiting = new Set<() => void>();
	return {
		/** Runs `answer` counted as one request being answered. */
		async count<T>(answer: () => Promise<T>): Promise<T> {
			now++;
			try {
				return await answer();
			} finally {
				if (--now === 0) for (const done of [...waiting]) done();
			}
		},
		/** Resolves once no request is being answered, or after `ms` milliseconds at most. */
		settled(ms: number): Promise<void> {
			if (now === 0) return Promise.resolve();
			return new Promise((resolve) => {
				const done = () => {
					clearTimeout(timer);
					waiting.delete(done);
					resolve();
				};
				const timer = setTimeout(done, ms);
				waiting.add(done);
			});
		}
	};
}
