import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type PDFDocument from 'pdfkit';

/** The shipped Inter faces the PDFs use, by the name each document registers them under. */
export const FACES = {
	body: 'Inter_400Regular.ttf',
	bold: 'Inter_700Bold.ttf'
} as const;
export type FaceName = keyof typeof FACES;

/**
 * Where the TTF files are: static/fonts in the repository (tsx scripts, tests), or the copy the
 * build puts in client/fonts beside the server bundle (the built app).
 */
function fontDirectory(): string {
	const tried: string[] = [];
	let dir = path.dirname(fileURLToPath(import.meta.url));
	const starts = [process.cwd()];
	for (let up = 0; up < 6; up++) {
		starts.push(dir);
		dir = path.dirname(dir);
	}
	for (const start of starts) {
		for (const candidate of [path.join(start, 'static', 'fonts'), path.join(start, 'client', 'fonts')]) {
			tried.push(candidate);
			if (fs.existsSync(path.join(candidate, FACES.body))) return candidate;
		}
	}
	throw new Error(`The PDF fonts (${FACES.body}) were not found; looked in ${tried.join(', ')}.`);
}

let loaded: Record<FaceName, Buffer> | null = null;

/** The font files, read from disk once per process. */
export function fontFiles(): Record<FaceName, Buffer> {
	if (!loaded) {
		const dir = fontDirectory();
		const read = (file: string) => fs.readFileSync(path.join(dir, file));
		loaded = { body: read(FACES.body), bold: read(FACES.bold) };
	}
	return loaded;
}

/** Registers the cached faces on one document, so `doc.font('body')` needs no disk access. */
export function registerFonts(doc: PDFDocument, faces: readonly FaceName[] = ['body', 'bold']): void {
	const files = fontFiles();
	for (const face of faces) doc.registerFont(face, files[face]);
}
