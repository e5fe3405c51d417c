// A photo's thumbnail (WebP, at most 320 px on the long side) for galleries.
import type { RequestHandler } from './$types';
import * as photos from '$lib/server/photos';
import { pictureResponse, requireStaff } from '../../http';

export const GET: RequestHandler = async ({ params }) => {
	const user = requireStaff();
	return pictureResponse(await photos.read(user.shopId, params.id, params.photoId, 'thumb'), `job-photo-${params.photoId}-thumb`);
};
