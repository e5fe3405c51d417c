// The customer's estimate as a PDF, through the link in their e-mail. Public on purpose: the
// token in the address is the credential, and only that link's version is reachable from it.
import { error } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import * as pdf from '$lib/server/pdf';
import { pdfResponse } from '$lib/server/pdf/response';

export const GET: RequestHandler = async ({ params }) => {
	const file = await pdf.customerPdf(params.token);
	if (!file) error(404, 'This estimate link is not valid. Check the address in your e-mail.');
	if (!file.ok) {
		return new Response('The shop has withdrawn this estimate link. Contact the shop for a current estimate.\n', {
			status: 410,
			headers: { 'Content-Type': 'text/plain; charset=utf-8', 'Cache-Control': 'private, no-store', 'X-Robots-Tag': 'noindex' }
		});
	}
	return pdfResponse(file);
};
