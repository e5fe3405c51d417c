// Reads a JSON body defensively: size-capped, and a parse failure is a message, not a 500.
const MAX_JSON_BYTES = 512 * 1024;

// JSON may spell half of a UTF-16 pair on its own ("\ud800"); PostgreSQL refuses such text in jsonb,
// and no keyboard types it. Each lone half becomes U+FFFD, as a browser does when it sends a form.
function wellFormed(value: unknown): unknown {
	if (typeof value === 'string') return value.toWellFormed();
	if (Array.isArray(value)) return value.map(wellFormed);
	if (value !== null && typeof value === 'object') {
		const out: Record<string, unknown> = {};
		// Defined, not assigned: a "__proto__" key stays an own property, as JSON.parse leaves it.
		for (const [key, inner] of Object.entries(value)) {
			Object.defineProperty(out, key.toWellFormed(), { value: wellFormed(inner), enumerable: true, writable: true, configurable: true });
		}
		return out;
	}
	return value;
}

/** JSON.parse whose strings (and keys) are always well-formed Unicode. Throws as JSON.parse does. */
export function parseJson(text: string): unknown {
	return wellFormed(JSON.parse(text));
}

export async function readJson(request: Request): Promise<{ ok: true; value: unknown } | { ok: false; message: string }> {
	const type = request.headers.get('content-type') ?? '';
	if (!type.toLowerCase().startsWith('application/json')) return { ok: false, message: 'Send the body as JSON (Content-Type: application/json).' };
	let text: string;
	try {
		text = await request.text();
	} catch {
		return { ok: false, message: 'The request body could not be read.' };
	}
	if (text.length > MAX_JSON_BYTES) return { ok: false, message: `The body is larger than ${MAX_JSON_BYTES / 1024} KB.` };
	try {
		return { ok: true, value: parseJson(text) };
	} catch {
		return { ok: false, message: 'The body is not valid JSON.' };
	}
}
