// Reads a JSON body defensively: size-capped, and a parse failure is a message, not a 500.
const MAX_JSON_BYTES = 512 * 1024;

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
		return { ok: true, value: JSON.parse(text) };
	} catch {
		return { ok: false, message: 'The body is not valid JSON.' };
	}
}
