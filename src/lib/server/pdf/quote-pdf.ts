import PDFDocument from 'pdfkit';
import { Dec } from '../../pricing/money';
import { registerFonts } from './fonts';
import { estimateReference } from '../../domain';
import { moneyFormatter, sayDate, sayDateTime, sayPercent } from './format';
import type { QuoteDocument, QuoteLine, QuoteOption, RepairComparison } from './quote-document';

// The estimate as a PDF: the customer's record of what was found, what each option costs and
// what they agreed to. Layout of our own: a header band, then sections down the page.

const COLOUR = {
	ink: '#1f2a30',
	soft: '#47555d',
	faint: '#8a969c',
	rule: '#d9d3c7',
	paper: '#f6f3ec',
	copper: '#a64b24',
	copperLight: '#f3dfd2',
	moss: '#3d6b4f',
	mossLight: '#dcebdf',
	amber: '#9a6a00',
	amberLight: '#fbefcf',
	brick: '#a12f2f'
};

const SIZE = { title: 20, shop: 15, heading: 12.5, sub: 10.5, body: 9.5, small: 8.5, footer: 7.5 };
const MARGIN = { top: 46, bottom: 62, left: 50, right: 50 };
const CELL_PAD = 4;

export const SAFETY_CAUTIONS =
	'Run generators outdoors only, far from doors, windows and vents — carbon monoxide kills. ' +
	"Never connect a generator to a building's wiring except through a transfer switch or interlock installed to local code by a licensed electrician. " +
	'Outputs and capacitors can hold a dangerous charge.';

/** Letter where the shop's currency says North America, A4 everywhere else. */
export function pageSizeFor(currency: string): 'LETTER' | 'A4' {
	return currency === 'USD' || currency === 'CAD' ? 'LETTER' : 'A4';
}

const KIND_WORDS: Record<QuoteOption['kind'], string> = { repair: 'Repair', replacement: 'Replacement', decline: 'No repair' };

const VERDICT_WORDS: Record<QuoteDocument['comparison']['verdict'], string> = {
	repair: 'Repairing is the better buy',
	replace: 'Replacing the unit is the better buy',
	'close-call': 'A close call: either choice is reasonable',
	'no-comparison': 'No repair-or-replace comparison'
};

interface Column {
	header: string;
	width: number;
	align?: 'left' | 'right';
}

interface Row {
	cells: string[];
	bold?: boolean;
	colours?: (string | undefined)[];
}

type Pair = { label: string; value: string; bold?: boolean };
const sum = (values: number[]) => values.reduce((a, b) => a + b, 0);
/** Widths of the totals block: labels, then amounts, right-aligned. */
const TOTALS = { label: 230, value: 95 } as const;
/** Space below a table. */
const AFTER_TABLE = 4;

/** Cursor and drawing helpers over one pdfkit document. */
class Page {
	readonly left: number;
	readonly width: number;

	constructor(readonly doc: PDFDocument) {
		this.left = MARGIN.left;
		this.width = doc.page.width - MARGIN.left - MARGIN.right;
	}

	get y() {
		return this.doc.y;
	}

	set y(value: number) {
		this.doc.y = value;
	}

	get bottom() {
		return this.doc.page.height - MARGIN.bottom;
	}

	/** Starts a new page unless `height` still fits below the cursor. */
	ensure(height: number) {
		if (this.y + height > this.bottom) this.newPage();
	}

	newPage() {
		this.doc.addPage();
		this.y = MARGIN.top;
	}

	style(face: 'body' | 'bold', size: number, colour = COLOUR.ink) {
		this.doc.font(face).fontSize(size).fillColor(colour);
		return this;
	}

	height(text: string, width: number, face: 'body' | 'bold', size: number, lineGap = 1.5) {
		this.doc.font(face).fontSize(size);
		return this.doc.heightOfString(text || ' ', { width, lineGap });
	}

	/** Text that may flow onto the next page (paragraphs). */
	paragraph(text: string, options: { face?: 'body' | 'bold'; size?: number; colour?: string; indent?: number; gap?: number } = {}) {
		const indent = options.indent ?? 0;
		this.style(options.face ?? 'body', options.size ?? SIZE.body, options.colour);
		this.ensure(this.doc.currentLineHeight(true) + 2);
		this.doc.text(text, this.left + indent, this.y, { width: this.width - indent, lineGap: 1.5 });
		this.y += options.gap ?? 3;
	}

	bullets(items: string[], size = SIZE.body) {
		for (const item of items) {
			this.style('body', size, COLOUR.ink);
			const h = this.height(item, this.width - 12, 'body', size);
			this.ensure(Math.min(h, 40));
			const top = this.y;
			this.doc.text('•', this.left + 2, top, { width: 10, lineBreak: false });
			this.doc.text(item, this.left + 12, top, { width: this.width - 12, lineGap: 1.5 });
			this.y += 2;
		}
	}

	rule(colour = COLOUR.rule, weight = 0.75) {
		this.doc.save().moveTo(this.left, this.y).lineTo(this.left + this.width, this.y).lineWidth(weight).strokeColor(colour).stroke().restore();
	}

	/** A section title kept together with at least `keep` points of what follows it. */
	heading(text: string, keep = 60) {
		this.y += 10;
		this.ensure(SIZE.heading + 8 + keep);
		this.style('bold', SIZE.heading, COLOUR.copper);
		this.doc.text(text, this.left, this.y, { width: this.width });
		this.y += 2;
		this.rule(COLOUR.copper, 1);
		this.y += 6;
	}

	subheading(text: string, keep = 40) {
		this.y += 4;
		this.ensure(SIZE.sub + 6 + keep);
		this.style('bold', SIZE.sub, COLOUR.ink);
		this.doc.text(text, this.left, this.y, { width: this.width, lineGap: 1 });
		this.y += 3;
	}

	/**
	 * A table whose header row is drawn again at the top of each page it runs onto. `keepWithNext`
	 * is the height of what follows and belongs with it (an option's totals): the last row goes to
	 * the next page rather than leave that block alone at the top of one.
	 */
	table(columns: Column[], rows: Row[], { keepWithNext = 0 } = {}) {
		const doc = this.doc;
		const headerHeight = Math.max(...columns.map((c) => this.height(c.header, c.width - 2 * CELL_PAD, 'bold', SIZE.small, 0))) + 2 * CELL_PAD;
		const drawHeader = () => {
			const top = this.y;
			doc.save().rect(this.left, top, this.width, headerHeight).fill(COLOUR.paper).restore();
			this.style('bold', SIZE.small, COLOUR.soft);
			let x = this.left;
			for (const column of columns) {
				doc.text(column.header, x + CELL_PAD, top + CELL_PAD, { width: column.width - 2 * CELL_PAD, align: column.align ?? 'left', lineGap: 0 });
				x += column.width;
			}
			this.y = top + headerHeight;
		};
		const rowHeights = rows.map(
			(row) => Math.max(...row.cells.map((cell, i) => this.height(cell, columns[i].width - 2 * CELL_PAD, row.bold ? 'bold' : 'body', SIZE.body))) + 2 * CELL_PAD
		);
		const tail = keepWithNext ? keepWithNext + AFTER_TABLE : 0;
		const last = rows.length - 1;
		this.ensure(headerHeight + (rowHeights[0] ?? 0) + (last === 0 ? tail : 0));
		drawHeader();
		rows.forEach((row, r) => {
			if (r > 0 && this.y + rowHeights[r] + (r === last ? tail : 0) > this.bottom) {
				this.newPage();
				drawHeader();
			}
			const top = this.y;
			let x = this.left;
			row.cells.forEach((cell, i) => {
				const column = columns[i];
				this.style(row.bold ? 'bold' : 'body', SIZE.body, row.colours?.[i] ?? COLOUR.ink);
				doc.text(cell, x + CELL_PAD, top + CELL_PAD, { width: column.width - 2 * CELL_PAD, align: column.align ?? 'left', lineGap: 1.5 });
				x += column.width;
			});
			this.y = top + rowHeights[r];
			this.rule();
		});
		this.y += AFTER_TABLE;
	}

	/** Label and amount pairs aligned to the right edge, kept on one page. */
	totals(pairs: Pair[]) {
		const valueWidth = TOTALS.value;
		const labelWidth = TOTALS.label;
		const x = this.left + this.width - valueWidth - labelWidth;
		const heights = this.totalsRows(pairs);
		this.ensure(sum(heights) + 4);
		pairs.forEach((pair, i) => {
			this.style(pair.bold ? 'bold' : 'body', SIZE.body, pair.bold ? COLOUR.ink : COLOUR.soft);
			const top = this.y;
			this.doc.text(pair.label, x, top, { width: labelWidth - CELL_PAD, align: 'right', lineGap: 1.5 });
			this.style(pair.bold ? 'bold' : 'body', SIZE.body, COLOUR.ink);
			this.doc.text(pair.value, x + labelWidth, top, { width: valueWidth - CELL_PAD, align: 'right', lineBreak: false });
			this.y = top + heights[i];
		});
		this.y += 4;
	}

	private totalsRows(pairs: Pair[]): number[] {
		return pairs.map((p) => this.height(p.label, TOTALS.label - CELL_PAD, p.bold ? 'bold' : 'body', SIZE.body) + 3);
	}

	/** How tall `totals(pairs)` draws. */
	totalsHeight(pairs: Pair[]): number {
		return sum(this.totalsRows(pairs)) + 4;
	}

	/** The measures of `box(title, lines)`: its text width, title height, each line's height and the whole. */
	private boxLayout(title: string, lines: string[]) {
		const inner = this.width - 20;
		const titleHeight = title ? this.height(title, inner, 'bold', SIZE.sub) + 3 : 0;
		const bodyHeights = lines.map((l) => this.height(l, inner, 'body', SIZE.body) + 3);
		return { inner, titleHeight, bodyHeights, total: titleHeight + sum(bodyHeights) + 16 };
	}

	/** How tall `box(title, lines)` draws. */
	boxHeight(title: string, lines: string[]): number {
		return this.boxLayout(title, lines).total;
	}

	/** A shaded box around a few paragraphs (notices, safety). */
	box(title: string, lines: string[], fill: string, accent: string) {
		const { inner, titleHeight, bodyHeights, total } = this.boxLayout(title, lines);
		this.ensure(total);
		const top = this.y;
		this.doc.save().rect(this.left, top, this.width, total).fill(fill).restore();
		this.doc.save().rect(this.left, top, 3, total).fill(accent).restore();
		this.y = top + 8;
		if (title) {
			this.style('bold', SIZE.sub, accent);
			this.doc.text(title, this.left + 10, this.y, { width: inner });
			this.y = top + 8 + titleHeight;
		}
		lines.forEach((line, i) => {
			this.style('body', SIZE.body, COLOUR.ink);
			const at = this.y;
			this.doc.text(line, this.left + 10, at, { width: inner, lineGap: 1.5 });
			this.y = at + bodyHeights[i];
		});
		this.y = top + total + 6;
	}
}

function header(page: Page, d: QuoteDocument) {
	const doc = page.doc;
	const rightWidth = 190;
	const leftWidth = page.width - rightWidth - 16;
	const top = page.y;

	page.style('bold', SIZE.shop, COLOUR.ink);
	doc.text(d.shop.name, page.left, top, { width: leftWidth });
	page.style('body', SIZE.small, COLOUR.soft);
	const contact = [d.shop.address, [d.shop.phone, d.shop.email].filter(Boolean).join('  ·  ')].filter(Boolean);
	for (const line of contact) doc.text(line, page.left, doc.y + 1, { width: leftWidth, lineGap: 1 });
	const leftBottom = doc.y;

	const x = page.left + page.width - rightWidth;
	page.style('bold', SIZE.title, COLOUR.copper);
	doc.text('Estimate', x, top, { width: rightWidth, align: 'right' });
	page.style('body', SIZE.small, COLOUR.soft);
	const facts = [
		`Job ${d.job.number}  ·  version ${d.version.number}`,
		`Sent ${sayDate(d.version.sentAt)}`,
		`Valid until ${sayDate(d.version.validUntil)}`
	];
	for (const fact of facts) doc.text(fact, x, doc.y + 1, { width: rightWidth, align: 'right' });
	page.y = Math.max(leftBottom, doc.y) + 10;
	page.rule(COLOUR.ink, 1.25);
	page.y += 10;
}

function customerAndUnit(page: Page, d: QuoteDocument) {
	const doc = page.doc;
	const gap = 20;
	const half = (page.width - gap) / 2;
	const customerLines = [d.customer.phone, d.customer.email].filter(Boolean);
	const unitLines = d.unit.details.map((item) => `${item.label}: ${item.value}`);
	const column = (title: string, name: string, lines: string[]) =>
		page.height(title, half, 'bold', SIZE.small) + page.height(name, half, 'bold', SIZE.sub) + sum(lines.map((l) => page.height(l, half, 'body', SIZE.body) + 1));
	page.ensure(Math.max(column('Customer', d.customer.name, customerLines), column('Unit', d.unit.title, unitLines)) + 8);
	const top = page.y;
	const draw = (x: number, title: string, name: string, lines: string[]) => {
		page.style('bold', SIZE.small, COLOUR.faint);
		doc.text(title.toUpperCase(), x, top, { width: half, characterSpacing: 0.6 });
		page.style('bold', SIZE.sub, COLOUR.ink);
		doc.text(name, x, doc.y + 1, { width: half });
		page.style('body', SIZE.body, COLOUR.soft);
		for (const line of lines) doc.text(line, x, doc.y + 1, { width: half, lineGap: 1 });
		return doc.y;
	};
	const leftBottom = draw(page.left, 'Customer', d.customer.name, customerLines);
	const rightBottom = draw(page.left + half + gap, 'Unit', d.unit.title, unitLines);
	page.y = Math.max(leftBottom, rightBottom) + 6;
}

function findings(page: Page, d: QuoteDocument) {
	page.heading('The complaint');
	page.paragraph(d.job.complaint || 'None recorded.');

	page.heading('What we found');
	if (d.job.failedComponent) page.paragraph(`Failed component: ${d.job.failedComponent}`, { face: 'bold' });
	if (d.job.findings) page.paragraph(d.job.findings);
	if (!d.job.failedComponent && !d.job.findings) page.paragraph('No findings recorded yet; the options below describe the work proposed.', { colour: COLOUR.soft });

	if (d.readings.length > 0) {
		page.subheading('Bench readings against the specification');
		const w = page.width;
		const columns: Column[] = [
			{ header: 'Measurement', width: w * 0.4 },
			{ header: 'Reading', width: w * 0.18, align: 'right' },
			{ header: 'Spec range', width: w * 0.24, align: 'right' },
			{ header: 'Result', width: w * 0.18 }
		];
		page.table(
			columns,
			d.readings.map((r) => ({
				cells: [r.measurement, r.reading, r.spec, r.result],
				colours: [undefined, undefined, COLOUR.soft, r.result === 'In spec' ? COLOUR.moss : r.result === 'Noted' ? COLOUR.soft : COLOUR.brick]
			}))
		);
	}
}

function photoGrid(page: Page, d: QuoteDocument) {
	if (d.photos.length === 0) return;
	const doc = page.doc;
	const perRow = 4;
	const gap = 10;
	const cell = (page.width - gap * (perRow - 1)) / perRow;
	const frame = cell * 0.75;
	page.heading('Photos', frame + 30);
	for (let start = 0; start < d.photos.length; start += perRow) {
		const row = d.photos.slice(start, start + perRow);
		const captionHeight = Math.max(...row.map((p) => (p.caption ? page.height(p.caption, cell, 'body', SIZE.small, 1) : 0)));
		page.ensure(frame + captionHeight + 8);
		const top = page.y;
		row.forEach((photo, i) => {
			const x = page.left + i * (cell + gap);
			doc.save().rect(x, top, cell, frame).fill(COLOUR.paper).restore();
			doc.image(photo.jpeg, x, top, { fit: [cell, frame], align: 'center', valign: 'center' });
			if (photo.caption) {
				page.style('body', SIZE.small, COLOUR.soft);
				doc.text(photo.caption, x, top + frame + 3, { width: cell, lineGap: 1 });
			}
		});
		page.y = top + frame + captionHeight + 12;
	}
}

function lineRows(lines: QuoteLine[], money: (s: string) => string): Row[] {
	return lines.map((line) => {
		const labour = line.kind === 'labour';
		const quantity = line.quantity === null ? '' : labour ? `${line.quantity} h` : line.quantity;
		const unitPrice = line.unitPrice === null ? '' : labour ? `${money(line.unitPrice)}/h` : money(line.unitPrice);
		return { cells: [line.description, quantity, unitPrice, money(line.amount)] };
	});
}

function lineColumns(width: number): Column[] {
	return [
		{ header: 'Description', width: width * 0.52 },
		{ header: 'Qty / hours', width: width * 0.14, align: 'right' },
		{ header: 'Unit price', width: width * 0.17, align: 'right' },
		{ header: 'Amount', width: width * 0.17, align: 'right' }
	];
}

function optionSection(page: Page, d: QuoteDocument, option: QuoteOption, position: number, money: (s: string) => string) {
	const doc = page.doc;
	const title = `Option ${position}: ${option.label}`;
	const kind = option.staged ? 'Repair in stages, cheapest likely fix first' : KIND_WORDS[option.kind];
	page.y += 8;
	page.ensure(70);
	const top = page.y;
	// Once this version is answered, the option the customer approved carries the tag; before, the shop's recommendation.
	const answered = d.approval?.forThisVersion ? d.approval : null;
	const tag = answered ? (answered.decision === 'approved' && answered.optionIndex === option.index ? 'Approved' : null) : option.recommended ? 'Recommended' : null;
	const tagWidth = tag ? 96 : 0;
	page.style('bold', SIZE.sub + 1, COLOUR.ink);
	doc.text(title, page.left, top, { width: page.width - tagWidth - 8 });
	const titleBottom = doc.y;
	if (tag) {
		doc.save().roundedRect(page.left + page.width - tagWidth, top - 1, tagWidth, 15, 3).fill(COLOUR.mossLight).restore();
		page.style('bold', SIZE.small, COLOUR.moss);
		doc.text(tag, page.left + page.width - tagWidth, top + 2.5, { width: tagWidth, align: 'center', lineBreak: false });
	}
	page.y = titleBottom + 1;
	page.paragraph(kind, { size: SIZE.small, colour: COLOUR.soft, gap: 4 });

	const tax = d.taxPercent ? `Tax (${sayPercent(d.taxPercent)})` : 'Tax';
	if (option.staged) {
		const pairs: Pair[] = [
			{ label: 'Subtotal, every stage', value: money(option.subtotal) },
			{ label: `${tax}, every stage`, value: money(option.tax) },
			{ label: 'Total if every stage is needed (worst case)', value: money(option.total), bold: true },
			{ label: 'Expected cost, weighing each stage by its chance', value: money(option.staged.expectedCost) },
			{ label: 'Not to exceed: you authorise up to', value: money(option.staged.notToExceed), bold: true },
			{ label: 'Deposit due on approval', value: money(option.deposit) },
			{ label: 'Balance on completion, at most', value: money(option.balance) }
		];
		const stages = option.staged.stages;
		stages.forEach((stage, k) => {
			page.subheading(`Stage ${k + 1}: ${stage.label}`, 50);
			page.paragraph(
				`Ends the fault ${sayPercent(stage.likelihoodPercent)} of the time; the work gets this far ${sayPercent(stage.reachPercent)} of the time.`,
				{ size: SIZE.small, colour: COLOUR.soft, gap: 3 }
			);
			page.table(lineColumns(page.width), [...lineRows(stage.lines, money), { cells: [`Stage ${k + 1} total, with tax`, '', '', money(stage.total)], bold: true }], {
				keepWithNext: k === stages.length - 1 ? page.totalsHeight(pairs) : 0
			});
		});
		page.totals(pairs);
		page.paragraph('The shop stops and asks you before spending more than the not-to-exceed amount.', { size: SIZE.small, colour: COLOUR.soft });
	} else {
		const pairs: Pair[] = [
			{ label: 'Subtotal', value: money(option.subtotal) },
			{ label: tax, value: money(option.tax) },
			{ label: 'Total', value: money(option.total), bold: true }
		];
		if (option.kind !== 'decline') {
			pairs.push({ label: 'Deposit due on approval', value: money(option.deposit) }, { label: 'Balance on completion', value: money(option.balance) });
		}
		page.table(lineColumns(page.width), lineRows(option.lines, money), { keepWithNext: page.totalsHeight(pairs) });
		page.totals(pairs);
		if (option.kind === 'decline') page.paragraph('Due when you collect the unit.', { size: SIZE.small, colour: COLOUR.soft });
	}
	if (!new Dec(option.specialOrderParts).isZero()) {
		page.paragraph(`Includes special-order parts of ${money(option.specialOrderParts)} before tax.`, { size: SIZE.small, colour: COLOUR.soft });
	}
}

/** The break-even in the customer's words; the engine's own sentence about it is then left out. */
function breakEvenLine(repair: RepairComparison, money: (s: string) => string): string | null {
	if (repair.breakEven === null) return null;
	const against = repair.replacementLabel ? `"${repair.replacementLabel}"` : 'a new unit';
	return new Dec(repair.breakEven).gt(0)
		? `A repair is worth up to ${money(repair.breakEven)}, compared with ${against}.`
		: `No repair price pays against ${against}: the old unit costs more to keep each year than a new one.`;
}

function comparisonSection(page: Page, d: QuoteDocument, money: (s: string) => string) {
	const c = d.comparison;
	page.heading('Repair or replace?');
	const colour = c.verdict === 'repair' ? COLOUR.moss : c.verdict === 'replace' ? COLOUR.copper : c.verdict === 'close-call' ? COLOUR.amber : COLOUR.soft;
	page.paragraph(VERDICT_WORDS[c.verdict], { face: 'bold', size: SIZE.sub + 1, colour, gap: 4 });
	for (const reason of c.reasons) page.paragraph(reason, { gap: 4 });
	for (const repair of c.repairs) {
		page.subheading(repair.label, 36);
		const breakEven = breakEvenLine(repair, money);
		if (breakEven) page.paragraph(breakEven, { face: 'bold', gap: 3 });
		const reasons = breakEven ? repair.reasons.filter((r) => !r.startsWith('The most this repair is worth') && !r.startsWith('Keeping the old unit costs more')) : repair.reasons;
		page.bullets(reasons, SIZE.small + 0.5);
	}
}

function termsSection(page: Page, d: QuoteDocument, money: (s: string) => string) {
	page.heading('Safety', page.boxHeight('', [SAFETY_CAUTIONS]));
	page.box('', [SAFETY_CAUTIONS], COLOUR.amberLight, COLOUR.amber);

	page.heading('Terms');
	const terms = [
		`This estimate is valid until ${sayDate(d.version.validUntil)}. After that date prices and parts availability may change; ask the shop for a new estimate.`,
		'Work starts only after your written approval of one option, signed below or given through the link in your e-mail. The shop asks you again before doing anything that costs more than the option you approved.',
		'A deposit is due on approval. The part of it that pays for special-order parts is non-refundable once those parts are ordered.',
		d.diagnosticFee
			? `The diagnostic fee of ${money(d.diagnosticFee)} pays for finding the fault and is due even if no repair is done.` +
				(d.diagnosticFeeCredited ? ' Where an option shows it credited, it is taken off that option’s price.' : '')
			: 'There is no diagnostic fee on this job.',
		`Amounts are in ${d.currency}. Tax is shown on each option.`
	];
	page.bullets(terms);
}

function approvalSection(page: Page, d: QuoteDocument) {
	const doc = page.doc;
	page.heading('Approval', 110);
	const a = d.approval;
	if (a && a.forThisVersion) {
		const text =
			a.decision === 'approved'
				? `Approved by ${a.signerName ?? 'the customer'} on ${sayDateTime(a.at)}: option “${a.optionLabel ?? '—'}” of estimate ${estimateReference(a.versionHash)}, signed online from network address ${a.clientAddress}.`
				: `Declined on ${sayDateTime(a.at)}: estimate ${estimateReference(a.versionHash)}, answered online from network address ${a.clientAddress}.`;
		page.box(a.decision === 'approved' ? 'Approved' : 'Declined', a.reason ? [text, `Reason given: ${a.reason}`] : [text], a.decision === 'approved' ? COLOUR.mossLight : COLOUR.paper, a.decision === 'approved' ? COLOUR.moss : COLOUR.soft);
		return;
	}
	if (a) {
		page.paragraph(
			`The customer ${a.decision} version ${a.versionNumber} of this estimate on ${sayDateTime(a.at)}; this version (${d.version.number}) was not answered.`,
			{ colour: COLOUR.soft }
		);
		return;
	}
	page.paragraph('To approve, write the option you choose, your name and the date, and sign. You can also approve through the link in your e-mail.', {
		colour: COLOUR.soft,
		gap: 10
	});
	const fields = ['Option chosen', 'Name', 'Signature', 'Date'];
	page.ensure(fields.length * 30);
	for (const field of fields) {
		page.y += 14;
		const lineY = page.y + 10;
		page.style('body', SIZE.body, COLOUR.soft);
		doc.text(field, page.left, page.y, { width: 90, lineBreak: false });
		doc.save().moveTo(page.left + 95, lineY).lineTo(page.left + page.width, lineY).lineWidth(0.75).strokeColor(COLOUR.faint).stroke().restore();
		page.y = lineY + 4;
	}
}

function footers(doc: PDFDocument, d: QuoteDocument) {
	const range = doc.bufferedPageRange();
	const label = `${d.shop.name}  ·  Estimate for job ${d.job.number}, version ${d.version.number}  ·  ${estimateReference(d.version.contentHash)}`;
	for (let i = range.start; i < range.start + range.count; i++) {
		doc.switchToPage(i);
		const width = doc.page.width - MARGIN.left - MARGIN.right;
		const y = doc.page.height - MARGIN.bottom + 22;
		// Writing below the bottom margin would make pdfkit start a new page.
		const margin = doc.page.margins.bottom;
		doc.page.margins.bottom = 0;
		doc.save().moveTo(MARGIN.left, y - 6).lineTo(MARGIN.left + width, y - 6).lineWidth(0.5).strokeColor(COLOUR.rule).stroke().restore();
		doc.font('body').fontSize(SIZE.footer).fillColor(COLOUR.faint);
		doc.text(label, MARGIN.left, y, { width: width - 70, lineBreak: false, ellipsis: true });
		doc.text(`Page ${i - range.start + 1} of ${range.count}`, MARGIN.left + width - 70, y, { width: 70, align: 'right', lineBreak: false });
		doc.page.margins.bottom = margin;
	}
}

/** A new pdfkit document with the shop's page size and the cached fonts registered. */
export function newDocument(currency: string, info: { title: string; author: string; created?: Date }) {
	const doc = new PDFDocument({
		size: pageSizeFor(currency),
		margins: MARGIN,
		bufferPages: true,
		font: null,
		lang: 'en',
		displayTitle: true,
		info: { Title: info.title, Author: info.author, Creator: 'Mendwise', ...(info.created ? { CreationDate: info.created } : {}) }
	});
	registerFonts(doc);
	doc.font('body');
	return doc;
}

/** Ends the document and collects its bytes. */
export function finish(doc: PDFDocument): Promise<Buffer> {
	return new Promise((resolve, reject) => {
		const chunks: Buffer[] = [];
		doc.on('data', (chunk: Buffer) => chunks.push(chunk));
		doc.on('end', () => resolve(Buffer.concat(chunks)));
		doc.on('error', reject);
		doc.end();
	});
}

export async function renderQuotePdf(d: QuoteDocument): Promise<Buffer> {
	const money = moneyFormatter(d.currency, d.minorDigits);
	const doc = newDocument(d.currency, {
		title: `Estimate for job ${d.job.number}, version ${d.version.number}`,
		author: d.shop.name,
		created: new Date(d.version.sentAt)
	});
	const page = new Page(doc);
	page.y = MARGIN.top;

	header(page, d);
	if (d.notice) page.box('Please note', [d.notice], COLOUR.amberLight, COLOUR.amber);
	customerAndUnit(page, d);
	findings(page, d);
	photoGrid(page, d);

	page.heading('Your options', 90);
	d.options.forEach((option, i) => optionSection(page, d, option, i + 1, money));

	comparisonSection(page, d, money);
	termsSection(page, d, money);
	approvalSection(page, d);
	footers(doc, d);
	return finish(doc);
}
