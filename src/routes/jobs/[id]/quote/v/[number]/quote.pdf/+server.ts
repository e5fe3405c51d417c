// A sent version of a job's quote as the customer's PDF, for staff of the job's shop.
import { error } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as pdf from '$lib/server/pdf';
import { pdfResponse } from '$lib/server/pdf/response';

export const GET: RequestHandler = async ({ params }) => {
	const user = requireRole(STAFF);
	const number = /^\d{1,6}$/.test(params.number) ? Number(params.number) : 0;
	const file = await pdf.staffPdf(user.shopId, params.id, number);
	if (!file) error(404, 'There is no such estimate version in your shop.');
	return pdfResponse(file);
};
