// The part of pdfkit's API the PDFs use; pdfkit ships no type declarations of its own.
declare module 'pdfkit' {
	import type { EventEmitter } from 'node:events';

	export interface TextOptions {
		width?: number;
		height?: number;
		align?: 'left' | 'center' | 'right' | 'justify';
		lineGap?: number;
		paragraphGap?: number;
		lineBreak?: boolean;
		ellipsis?: boolean | string;
		continued?: boolean;
		characterSpacing?: number;
		features?: string[];
	}

	export interface ImageOptions {
		width?: number;
		height?: number;
		fit?: [number, number];
		align?: 'center' | 'right';
		valign?: 'center' | 'bottom';
	}

	export interface PageMargins {
		top: number;
		bottom: number;
		left: number;
		right: number;
	}

	export interface PDFPage {
		width: number;
		height: number;
		margins: PageMargins;
		maxY(): number;
	}

	export interface DocumentOptions {
		size?: string | [number, number];
		margins?: PageMargins;
		bufferPages?: boolean;
		autoFirstPage?: boolean;
		compress?: boolean;
		lang?: string;
		displayTitle?: boolean;
		/** null: no standard font is loaded until one is chosen. */
		font?: string | null;
		info?: Partial<Record<'Title' | 'Author' | 'Subject' | 'Keywords' | 'Creator' | 'Producer', string>> & { CreationDate?: Date };
	}

	export default class PDFDocument extends EventEmitter {
		constructor(options?: DocumentOptions);
		page: PDFPage;
		x: number;
		y: number;
		info: Record<string, unknown>;
		registerFont(name: string, source: Uint8Array | string): this;
		font(name: string, size?: number): this;
		fontSize(size: number): this;
		fillColor(color: string, opacity?: number): this;
		strokeColor(color: string, opacity?: number): this;
		lineWidth(width: number): this;
		moveTo(x: number, y: number): this;
		lineTo(x: number, y: number): this;
		rect(x: number, y: number, w: number, h: number): this;
		roundedRect(x: number, y: number, w: number, h: number, r?: number): this;
		stroke(color?: string): this;
		fill(color?: string): this;
		fillAndStroke(fill?: string, stroke?: string): this;
		save(): this;
		restore(): this;
		text(text: string, options?: TextOptions): this;
		text(text: string, x?: number, y?: number, options?: TextOptions): this;
		heightOfString(text: string, options?: TextOptions): number;
		widthOfString(text: string, options?: TextOptions): number;
		currentLineHeight(includeGap?: boolean): number;
		image(source: Uint8Array | string, x?: number, y?: number, options?: ImageOptions): this;
		addPage(options?: DocumentOptions): this;
		bufferedPageRange(): { start: number; count: number };
		switchToPage(n: number): PDFPage;
		end(): void;
	}
}
