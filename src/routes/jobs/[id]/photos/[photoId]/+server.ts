// One photo of a job. GET: the picture (JPEG). POST: change the caption and/or whether the
// customer sees it — JSON {caption?, showCustomer?: boolean}, or a form with `caption` and
// `showCustomer` ("true"/"on"/"1" or "false"/"off"/"0"); absent fields stay as they are.
// Answers JSON {id, caption, showCustomer, width, height, url, thumbUrl}. DELETE: removes it (204).
import { error, json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { readJson } from '$lib/server/json';
import * as photos from '$lib/server/photos';
import { pictureResponse, requireStaff } from '../http';

const NOT_FOUND = 'There is no such photo in your shop.';

function rethrow(e: unknown): never {
	if (e instanceof photos.PhotoError && e.notFound) error(404, NOT_FOUND);
	throw e;
}

const FLAGS: Record<string, boolean> = { true: true, on: true, '1': true, false: false, off: false, '0': false };

/** A form's strings as the JSON shape; unknown flag words are left for the schema to refuse. */
function fromForm(form: FormData): Record<string, unknown> {
	const raw: Record<string, unknown> = {};
	for (const [key, value] of form.entries()) {
		if (typeof value !== 'string') raw[key] = value;
		else if (key === 'showCustomer') raw[key] = value in FLAGS ? FLAGS[value] : value;
		else raw[key] = value;
	}
	return raw;
}

const UNREADABLE = 'Send the change as JSON or as a form.';

async function readInput(request: Request): Promise<{ ok: true; value: unknown } | { ok: false; message: string }> {
	const type = request.headers.get('content-type') ?? '';
	if (/^application\/json/i.test(type)) return readJson(request);
	if (!/^(application\/x-www-form-urlencoded|multipart\/form-data)/i.test(type)) return { ok: false, message: UNREADABLE };
	try {
		return { ok: true, value: fromForm(await request.formData()) };
	} catch {
		return { ok: false, message: UNREADABLE };
	}
}

export const GET: RequestHandler = async ({ params }) => {
	const user = requireStaff();
	return pictureResponse(await photos.read(user.shopId, params.id, params.photoId, 'full'), `job-photo-${params.photoId}`);
};

export const POST: RequestHandler = async ({ params, request }) => {
	const user = requireStaff();
	const raw = await readInput(request);
	if (!raw.ok) return json({ message: raw.message, issues: [] }, { status: 400 });
	const parsed = photos.updateSchema.safeParse(raw.value);
	if (!parsed.success) {
		const issues = parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
		return json({ message: issues[0]?.message ?? 'Please correct the change.', issues }, { status: 400 });
	}
	try {
		const photo = await photos.update(user, params.id, params.photoId, parsed.data);
		return json(photos.forClient(photo));
	} catch (e) {
		rethrow(e);
	}
};

export const DELETE: RequestHandler = async ({ params }) => {
	const user = requireStaff();
	try {
		await photos.remove(user, params.id, params.photoId);
	} catch (e) {
		rethrow(e);
	}
	return new Response(null, { status: 204 });
};
