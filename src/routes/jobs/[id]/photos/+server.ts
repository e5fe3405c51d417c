// A job's photos. POST takes one picture per request (multipart/form-data: `photo`, optional
// `caption`) so the browser can show progress per file; GET lists the photos' metadata.
import { error, json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import * as photos from '$lib/server/photos';
import { requireStaff } from './http';

/** Room for the multipart envelope and a caption around the largest allowed file. */
const ENVELOPE_BYTES = 64 * 1024;

const tooLarge = () =>
	json({ message: `The file is larger than ${photos.MAX_BYTES / (1024 * 1024)} MB, the most a photo can be. Send a smaller photo.` }, { status: 413 });

export const GET: RequestHandler = async ({ params }) => {
	const user = requireStaff();
	if (!(await photos.jobExists(user.shopId, params.id))) error(404, 'There is no such job in your shop.');
	return json({ photos: (await photos.list(user.shopId, params.id)).map(photos.forClient) });
};

export const POST: RequestHandler = async ({ params, request }) => {
	const user = requireStaff();
	if (!(await photos.jobExists(user.shopId, params.id))) error(404, 'There is no such job in your shop.');
	const declared = Number(request.headers.get('content-length') ?? '0');
	if (declared > photos.MAX_BYTES + ENVELOPE_BYTES) return tooLarge();
	if (!/^multipart\/form-data/i.test(request.headers.get('content-type') ?? '')) {
		return json({ message: 'Send the photo as a file upload (multipart/form-data, field "photo").' }, { status: 400 });
	}
	let form: FormData;
	try {
		form = await request.formData();
	} catch (e) {
		if ((e as { status?: number }).status === 413) return tooLarge();
		return json({ message: 'The upload did not arrive complete. Try sending the photo again.' }, { status: 400 });
	}
	const file = form.get('photo');
	if (!(file instanceof File)) return json({ message: 'Choose a photo to upload.' }, { status: 400 });
	const caption = form.get('caption');
	if (caption !== null && typeof caption !== 'string') return json({ message: 'The caption must be text.' }, { status: 400 });
	try {
		const photo = await photos.add(user, params.id, { bytes: Buffer.from(await file.arrayBuffer()), name: file.name }, caption ?? '');
		return json(photos.forClient(photo), { status: 201 });
	} catch (e) {
		if (e instanceof photos.PhotoError) {
			if (e.notFound) error(404, 'There is no such job in your shop.');
			return json({ message: e.message }, { status: 400 });
		}
		throw e;
	}
};
