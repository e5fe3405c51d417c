import type { QuotePdf } from './index';

/** A PDF shown in the browser's viewer, never kept by shared caches. */
export function pdfResponse(file: QuotePdf): Response {
	return new Response(new Uint8Array(file.bytes), {
		headers: {
			'Content-Type': 'application/pdf',
			'Content-Length': String(file.bytes.length),
			'Content-Disposition': `inline; filename="${file.filename}"`,
			'Cache-Control': 'private, no-store',
			'X-Content-Type-Options': 'nosniff',
			'X-Robots-Tag': 'noindex'
		}
	});
}
