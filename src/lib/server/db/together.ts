/**
 * Lookups by key that run together: keys asked for while a lookup is on its way to the database
 * wait and go in the next one, all at once. Under load that is one round trip for several
 * requests instead of one each; with nothing else waiting a key goes at once, alone.
 *
 * A key is never answered by a lookup that was sent before it was asked for, even when that
 * lookup holds the same key: its answer could predate a change the asker has already seen (a
 * session ended on another instance a moment ago must be refused here too).
 */
export function together<K, V>(lookup: (keys: K[]) => Promise<Map<K, V>>): (key: K) => Promise<V | undefined> {
	let queued = new Map<K, { resolve: (value: V | undefined) => void; reject: (error: unknown) => void }[]>();
	let sending = false;

	async function send() {
		sending = true;
		while (queued.size) {
			const batch = queued;
			queued = new Map();
			try {
				const found = await lookup([...batch.keys()]);
				for (const [key, waiting] of batch) for (const { resolve } of waiting) resolve(found.get(key));
			} catch (error) {
				for (const waiting of batch.values()) for (const { reject } of waiting) reject(error);
			}
		}
		sending = false;
	}

	return (key) =>
		new Promise<V | undefined>((resolve, reject) => {
			const waiting = queued.get(key);
			if (waiting) waiting.push({ resolve, reject });
			else queued.set(key, [{ resolve, reject }]);
			if (!sending) void send();
		});
}
