// The estimate layout without a database: page size by currency, tables that run over a page
// break repeat their header, long text wraps, every page has its footer, and the document object
// carries no cost or margin. Read back with poppler's pdftotext and pdfinfo.
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { evaluateRequest } from '../../pricing/evaluate';
import { pricedPart, type QuoteDocument } from './quote-document';
import { renderQuotePdf } from './quote-pdf';

const work = fs.mkdtempSync(path.join(os.tmpdir(), 'quote-layout-'));
afterAll(() => fs.rmSync(work, { recursive: true, force: true }));

const LONG_DESCRIPTION = 'Rewind the stator main and exciter windings with class H wire, varnish and bake, then test insulation at 500 V';

function documentFor(currency: string, lineCount: number): QuoteDocument {
	const priced = evaluateRequest({
		currency,
		settings: { taxRate: '0.2' },
		unit: { ageYears: '3', lifeYears: '10' },
		options: [
			{
				label: 'Repair',
				kind: 'repair',
				lines: Array.from({ length: lineCount }, (_, k) => ({ kind: 'part', description: `${LONG_DESCRIPTION} (${k + 1})`, quantity: '1', unitCost: `${20 + k}.37` }))
			},
			{ label: 'New unit', kind: 'replacement', lines: [{ kind: 'unit', description: 'Ostrander 7000 portable', cost: '610.00', price: '840.00' }] }
		]
	});
	if (!priced.ok) throw new Error(priced.message);
	return {
		shop: { name: 'Harrowgate Bench Works', address: '2 Mill Row', phone: '555-0100', email: '' },
		job: { number: 4711, complaint: 'No output. '.repeat(60).trim(), failedComponent: 'Stator', findings: '' },
		customer: { name: 'Odile Marchetti', phone: '', email: '' },
		unit: { title: 'Harrowgate PG-7000', details: [{ label: 'Serial', value: 'HG-7-0091' }] },
		version: { number: 3, contentHash: '0123456789abcdef'.repeat(4), sentAt: '2026-12-02T09:30:00Z', validUntil: '2027-01-01' },
		...pricedPart(priced.result),
		diagnosticFee: null,
		diagnosticFeeCredited: false,
		readings: [],
		photos: [],
		approval: null,
		notice: null
	};
}

let count = 0;
function read(bytes: Buffer) {
	const file = path.join(work, `doc-${++count}.pdf`);
	fs.writeFileSync(file, bytes);
	const pages = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' })
		.split('\f')
		.filter((page) => page.trim() !== '');
	const info = execFileSync('pdfinfo', [file], { encoding: 'utf8' });
	return { pages, info };
}

describe('estimate layout', () => {
	it('uses Letter for US and Canadian dollars and A4 otherwise', async () => {
		expect(read(await renderQuotePdf(documentFor('USD', 2))).info).toMatch(/Page size:\s+612 x 792 pts/);
		expect(read(await renderQuotePdf(documentFor('CAD', 2))).info).toMatch(/Page size:\s+612 x 792 pts/);
		expect(read(await renderQuotePdf(documentFor('EUR', 2))).info).toMatch(/Page size:\s+595\.\d+ x 841\.\d+ pts \(A4\)/);
	});

	it('repeats the table header on every page a long option runs onto, wraps long text and numbers every page', async () => {
		const doc = documentFor('EUR', 60);
		const { pages } = read(await renderQuotePdf(doc));
		expect(pages.length).toBeGreaterThan(3);
		const withLines = pages.filter((page) => page.includes(LONG_DESCRIPTION.slice(0, 30)));
		expect(withLines.length).toBeGreaterThan(1);
		for (const page of withLines) expect(page).toMatch(/Description\s+Qty \/ hours\s+Unit price\s+Amount/);
		// The description is wider than its column, so it wraps instead of running into the figures.
		expect(pages.join('\n')).not.toContain(LONG_DESCRIPTION);
		expect(pages.join('\n')).toContain('Rewind the stator main and exciter windings');
		expect(pages.join('\n').replace(/\s+/g, ' ')).toContain('varnish and bake, then test insulation at 500 V (60)');
		pages.forEach((page, i) => {
			expect(page).toContain(`Page ${i + 1} of ${pages.length}`);
			expect(page).toContain('version 3');
			expect(page).toContain('0123456789ab'); // the estimate reference: the hash's first 12 characters
			expect(page).not.toContain('0123456789abc');
		});
		const euro = new Intl.NumberFormat('en-US', { style: 'currency', currency: 'EUR' });
		expect(pages.join('\n')).toContain(euro.format(doc.options[0].total as unknown as number));
	});

	it("keeps an option's totals on the page of its last line, however many lines it has", async () => {
		// Every length from one page to two: somewhere the totals would otherwise open a page alone.
		for (let lineCount = 8; lineCount <= 26; lineCount++) {
			const { pages } = read(await renderQuotePdf(documentFor('USD', lineCount)));
			const withTotals = pages.find((page) => page.includes('Balance on completion'))!;
			expect(withTotals, `${lineCount} lines`).toContain(`(${lineCount})`);
		}
	});

	it('copies no cost, gross profit, margin or markup from the engine into the document', () => {
		const doc = documentFor('USD', 3);
		const keys = new Set<string>();
		const walk = (value: unknown) => {
			if (Array.isArray(value)) value.forEach(walk);
			else if (value && typeof value === 'object') for (const [key, inner] of Object.entries(value)) (keys.add(key), walk(inner));
		};
		walk(doc);
		expect(keys.has('total')).toBe(true);
		for (const hidden of ['cost', 'grossProfit', 'marginPercent', 'markupPercent', 'meetsTargetMargin', 'settings']) expect(keys.has(hidden)).toBe(false);
	});
});
