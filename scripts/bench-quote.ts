// `npm run bench:quote` (tsx scripts/bench-quote.ts): not a timed test, a measurement.
//  1. Time to render an estimate PDF with three options and four photos, beside a one-line pdfkit
//     page with the same embedded font, in the same process (fonts read from disk once).
//     Goal: at most 5× the one-line page.
//  2. The customer page's (/q/[token]) JavaScript and CSS as the production build ships them,
//     gzipped. Goal: JavaScript under 60 KB.
// Writes the figures into docs/performance.md under "Quote PDF and customer page".
// Flags: --skip-build (measure the last build), --out <file.pdf> (keep one rendered sample),
// --runs <n> (renders per round, default 10). Builds into .data/bench-quote-build and
// .data/bench-quote-kit unless MENDWISE_BUILD_DIR / MENDWISE_KIT_DIR say otherwise.
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import { cpus } from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import sharp from 'sharp';
import { evaluateRequest } from '../src/lib/pricing/evaluate';
import type { PricingRequestInput } from '../src/lib/pricing/schema';
import { pricedPart, type QuoteDocument } from '../src/lib/server/pdf/quote-document';
import { finish, newDocument, renderQuotePdf } from '../src/lib/server/pdf/quote-pdf';

const root = path.resolve(import.meta.dirname, '..');
const args = process.argv.slice(2);
const flag = (name: string) => args.includes(name);
const option = (name: string) => (args.includes(name) ? args[args.indexOf(name) + 1] : undefined);
const RUNS = Number(option('--runs') ?? 10);
const ROUNDS = 5;

/** A sample estimate with three options: a repair with parts and labour, a staged repair, a replacement. */
const request: PricingRequestInput = {
	currency: 'USD',
	settings: { taxRate: '0.0725' },
	diagnosticFee: '89.00',
	unit: { description: 'Harrowgate PG-5500', ageYears: '4', engineHours: '210', lifeYears: '10', lifeHours: '1500', condition: 'good', asIsValue: '60' },
	options: [
		{
			label: 'Replace the alternator head',
			kind: 'repair',
			creditDiagnosticFee: true,
			lines: [
				{ kind: 'part', description: 'Alternator head assembly, 5.5 kW', quantity: '1', unitCost: '212.40', specialOrder: true },
				{ kind: 'part', description: 'Brush holder with brushes', quantity: '1', unitCost: '18.60' },
				{ kind: 'labour', description: 'Remove and replace the alternator head, test output under load', hours: '2.5' },
				{ kind: 'fee', description: 'Disposal of the old head', amount: '12.00', feeType: 'disposal' }
			]
		},
		{
			label: 'Find and fix in stages',
			kind: 'repair',
			notToExceed: '300.00',
			stages: [
				{ label: 'Clean slip rings, new brushes', likelihood: '0.5', lines: [{ kind: 'part', description: 'Brush set', quantity: '1', unitCost: '18.60' }, { kind: 'labour', description: 'Clean and refit', hours: '1' }] },
				{ label: 'New voltage regulator', likelihood: '0.3', lines: [{ kind: 'part', description: 'Automatic voltage regulator', quantity: '1', unitCost: '64.80' }, { kind: 'labour', description: 'Fit and adjust', hours: '0.75' }] },
				{ label: 'Rewind the stator', likelihood: '0.2', lines: [{ kind: 'sublet', description: 'Stator rewind (outside shop)', cost: '140.00', price: '185.00' }, { kind: 'labour', description: 'Remove and refit the stator', hours: '2' }] }
			]
		},
		{
			label: 'New 5,500 W portable',
			kind: 'replacement',
			lines: [
				{ kind: 'unit', description: 'Brevik Power 5500 portable generator', cost: '640.00', price: '899.00' },
				{ kind: 'fee', description: 'Set-up and first run', amount: '25.00', feeType: 'setup' }
			],
			lifeYears: '10',
			lifeHours: '1500'
		}
	]
};

async function samplePhoto(seed: number): Promise<{ jpeg: Buffer; width: number; height: number }> {
	const width = 320;
	const height = 240;
	const raw = Buffer.alloc(width * height * 3);
	for (let i = 0; i < raw.length; i++) raw[i] = (i * (7919 + seed) + (i >> 6) * 104729) & 0xff;
	const { data, info } = await sharp(raw, { raw: { width, height, channels: 3 } }).jpeg({ quality: 80 }).toBuffer({ resolveWithObject: true });
	return { jpeg: data, width: info.width, height: info.height };
}

async function sampleDocument(): Promise<QuoteDocument> {
	const priced = evaluateRequest(request);
	if (!priced.ok) throw new Error(priced.message);
	const captions = ['Stator leads, burnt insulation at the terminal block', 'Slip rings, worn and scored', 'Regulator as found', 'Nameplate'];
	const photos = await Promise.all(captions.map(async (caption, k) => ({ caption, ...(await samplePhoto(k)) })));
	return {
		shop: { name: 'Fenwick Lane Power Repair', address: '14 Fenwick Lane, Dunmore, OR 97000', phone: '555-0142', email: 'bench@fenwick.example' },
		job: {
			number: 1042,
			complaint: 'Runs smoothly but there is no power at any outlet. Breakers reset; nothing changes.',
			failedComponent: 'Stator (open winding)',
			findings: 'Main winding reads open between the outlet terminals; rotor and brushes within spec. Regulator untested with an open stator.'
		},
		customer: { name: 'Tamsin Yarrow', phone: '555-0101', email: 'tamsin@example.com' },
		unit: {
			title: 'Harrowgate PG-5500',
			details: [
				{ label: 'Kind', value: 'Portable generator' },
				{ label: 'Serial', value: 'HG-55-004512' },
				{ label: 'Rated output', value: '5,500 W running / 6,875 W starting' },
				{ label: 'Engine hours', value: '210' }
			]
		},
		version: { number: 2, contentHash: 'a3f1c09b7d2e4f5a6b7c8d9e0f1a2b3c4d5e6f708192a3b4c5d6e7f8091a2b3c', sentAt: '2026-12-02T14:05:00Z', validUntil: '2027-01-01' },
		...pricedPart(priced.result),
		diagnosticFee: '89.00',
		diagnosticFeeCredited: true,
		readings: [
			{ measurement: 'Stator main winding, T1–T2', reading: 'OL (over range)', spec: '0.8–1.2 Ω', result: 'Open circuit' },
			{ measurement: 'Rotor field winding', reading: '14.2 Ω', spec: '12–16 Ω', result: 'In spec' },
			{ measurement: 'Brush length', reading: '9.5 mm', spec: 'at least 6 mm', result: 'In spec' },
			{ measurement: 'No-load output frequency', reading: '61.8 Hz', spec: '61–63 Hz', result: 'In spec' }
		],
		photos,
		approval: null,
		notice: null
	};
}

interface Timing {
	cpu: number;
	wall: number;
}

/** CPU and wall milliseconds per call over `runs` calls. CPU time of this process, so busy neighbours count less. */
async function timed(run: () => Promise<unknown>, runs: number): Promise<Timing> {
	const started = performance.now();
	const used = process.cpuUsage();
	for (let i = 0; i < runs; i++) await run();
	const spent = process.cpuUsage(used);
	return { cpu: (spent.user + spent.system) / 1000 / runs, wall: (performance.now() - started) / runs };
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/**
 * Rounds that time the estimate and then the one-line page back to back, so a change in the
 * machine's load falls on both; the ratio is the median of the rounds' ratios.
 */
async function compare(quote: () => Promise<unknown>, oneLine: () => Promise<unknown>) {
	for (let i = 0; i < 3; i++) await Promise.all([quote(), oneLine()]);
	const rounds: { quote: Timing; oneLine: Timing }[] = [];
	for (let round = 0; round < ROUNDS; round++) rounds.push({ quote: await timed(quote, RUNS), oneLine: await timed(oneLine, RUNS * 2) });
	const pick = (side: 'quote' | 'oneLine', key: keyof Timing) => median(rounds.map((r) => r[side][key]));
	return {
		quote: { cpu: pick('quote', 'cpu'), wall: pick('quote', 'wall') },
		oneLine: { cpu: pick('oneLine', 'cpu'), wall: pick('oneLine', 'wall') },
		ratio: median(rounds.map((r) => r.quote.cpu / r.oneLine.cpu))
	};
}

function oneLinePage(): Promise<Buffer> {
	const doc = newDocument('USD', { title: 'One line', author: 'Bench' });
	doc.fontSize(12).text('Estimate for job 1042: one line of text.');
	return finish(doc);
}

// ------------------------------------------------------------------------------------------------
// Client assets of the customer page, from the production build's server manifest: the entry
// (start + app) with its imports and stylesheets, and the nodes of /q/[token] (layouts + page).

// Its own build folders unless told otherwise, so a running `npm start` keeps its build.
const kitFolder = process.env.MENDWISE_KIT_DIR ?? '.data/bench-quote-kit';
const buildFolder = process.env.MENDWISE_BUILD_DIR ?? '.data/bench-quote-build';
const kitDir = path.resolve(root, kitFolder);
const buildDir = path.resolve(root, buildFolder);

function build() {
	execFileSync(path.join(root, 'node_modules', '.bin', 'vite'), ['build', '--logLevel', 'error'], {
		cwd: root,
		stdio: 'inherit',
		env: { ...process.env, MENDWISE_KIT_DIR: kitFolder, MENDWISE_BUILD_DIR: buildFolder }
	});
}

/** String arrays such as `imports: ["_app/…", …]` or `export const stylesheets = [...]` from generated code. */
function listAfter(text: string, key: string): string[] {
	const match = new RegExp(`${key}\\s*[:=]\\s*\\[([^\\]]*)\\]`).exec(text);
	return match ? [...match[1].matchAll(/"([^"]+)"/g)].map((m) => m[1]) : [];
}

function customerPageAssets() {
	const serverDir = path.join(kitDir, 'output', 'server');
	const manifest = fs.readFileSync(path.join(serverDir, 'manifest.js'), 'utf8');
	const client = /client:\s*\{([^}]*)\}/.exec(manifest)?.[1] ?? '';
	const entry = [/start:\s*"([^"]+)"/.exec(client)?.[1], /app:\s*"([^"]+)"/.exec(client)?.[1]].filter((s): s is string => Boolean(s));
	const js = new Set<string>([...entry, ...listAfter(client, 'imports')]);
	const css = new Set<string>(listAfter(client, 'stylesheets'));
	const route = new RegExp(`id:\\s*"/q/\\[token\\]"[\\s\\S]*?page:\\s*\\{\\s*layouts:\\s*\\[([^\\]]*)\\][\\s\\S]*?leaf:\\s*(\\d+)`).exec(manifest);
	if (!route) throw new Error('The build has no /q/[token] page.');
	const nodes = [...route[1].split(',').map((s) => s.trim()).filter(Boolean), route[2]].map(Number);
	for (const node of nodes) {
		const text = fs.readFileSync(path.join(serverDir, 'nodes', `${node}.js`), 'utf8');
		for (const file of listAfter(text, 'imports')) js.add(file);
		for (const file of listAfter(text, 'stylesheets')) css.add(file);
	}
	const measureFiles = (files: Set<string>) =>
		[...files].map((file) => {
			const bytes = fs.readFileSync(path.join(buildDir, 'client', file));
			return { file, raw: bytes.length, gzip: gzipSync(bytes, { level: 9 }).length };
		});
	return { nodes, js: measureFiles(js), css: measureFiles(css) };
}

// ------------------------------------------------------------------------------------------------

const kb = (bytes: number) => (bytes / 1024).toFixed(1);

function writeSection(markdown: string) {
	const file = path.join(root, 'docs', 'performance.md');
	const title = '## Quote PDF and customer page';
	const existing = fs.existsSync(file) ? fs.readFileSync(file, 'utf8') : '# Performance\n';
	const start = existing.indexOf(title);
	let next = start < 0 ? -1 : existing.indexOf('\n## ', start + title.length);
	if (next >= 0) next += 1;
	const updated =
		start < 0 ? `${existing.trimEnd()}\n\n${markdown}` : `${existing.slice(0, start)}${markdown}${next >= 0 ? `\n${existing.slice(next)}` : ''}`;
	fs.writeFileSync(file, updated.trimEnd() + '\n');
}

const doc = await sampleDocument();
const sample = await renderQuotePdf(doc);
const out = option('--out');
if (out) fs.writeFileSync(out, sample);
const pages = (sample.toString('latin1').match(/\/Type \/Page\b/g) ?? []).length;

const { quote, oneLine, ratio } = await compare(() => renderQuotePdf(doc), oneLinePage);
console.log(`estimate PDF (3 options, 4 photos, ${pages} pages, ${kb(sample.length)} KB): ${quote.cpu.toFixed(1)} ms CPU, ${quote.wall.toFixed(1)} ms wall per document`);
console.log(`one-line page, same embedded font:                   ${oneLine.cpu.toFixed(1)} ms CPU, ${oneLine.wall.toFixed(1)} ms wall per document`);
console.log(`ratio ${ratio.toFixed(2)}× (goal: at most 5×) — ${ratio <= 5 ? 'met' : 'NOT met'}`);

if (!flag('--skip-build')) build();
const assets = customerPageAssets();
const sum = (xs: { gzip: number }[]) => xs.reduce((a, b) => a + b.gzip, 0);
const sumRaw = (xs: { raw: number }[]) => xs.reduce((a, b) => a + b.raw, 0);
const jsGzip = sum(assets.js);
const cssGzip = sum(assets.css);
console.log(`customer page /q/[token] (nodes ${assets.nodes.join(', ')}): JavaScript ${assets.js.length} files, ${kb(jsGzip)} KB gzipped (${kb(sumRaw(assets.js))} KB raw); CSS ${assets.css.length} files, ${kb(cssGzip)} KB gzipped (${kb(sumRaw(assets.css))} KB raw)`);
console.log(`JavaScript goal under 60 KB gzipped — ${jsGzip < 60 * 1024 ? 'met' : 'NOT met'}`);

writeSection(`## Quote PDF and customer page

Measured with \`npm run bench:quote\` (\`tsx scripts/bench-quote.ts\`) on ${new Date().toISOString().slice(0, 10)}, Node ${process.version},
${cpus().length} × ${cpus()[0]?.model.trim() ?? 'unknown CPU'}. Not a timed test.

**Estimate PDF.** A sample estimate with three priced options (a repair with parts and labour, a
repair in three stages, a replacement) and four photos: ${pages} pages, ${kb(sample.length)} KB. Beside it, in the same
process, a one-line pdfkit page with the same embedded Inter face. The font files are read from
disk once per process and registered by name on each document. Median per document over
${ROUNDS} rounds, each timing ${RUNS} estimates and then ${RUNS * 2} one-line pages; the ratio is the median of the
rounds' ratios. CPU time is this process's own, so other load on the machine counts less, but
figures on a shared machine still vary from run to run.

| Document | CPU ms | Wall ms |
|---|---:|---:|
| Estimate, 3 options, 4 photos | ${quote.cpu.toFixed(1)} | ${quote.wall.toFixed(1)} |
| One-line page, same font | ${oneLine.cpu.toFixed(1)} | ${oneLine.wall.toFixed(1)} |
| **Ratio** | **${ratio.toFixed(2)}×** | goal ≤ 5×: ${ratio <= 5 ? 'met' : 'not met'} |

Nearly all of the time is fontkit inside pdfkit: each new document parses the faces it uses
and shapes each distinct word once. The one-line page pays that for one face and a few words;
the estimate for two faces (regular and bold) and a few hundred words. Gathering the data
(database rows, photo thumbnails converted to JPEG) is not in these figures.

**Customer page \`/q/[token]\`.** What the production build sends for that route: the client
entry (start, app and their imports) and the route's layout and page nodes, each file gzipped
with zlib at level 9:

| Asset | Files | Raw KB | Gzipped KB |
|---|---:|---:|---:|
| JavaScript | ${assets.js.length} | ${kb(sumRaw(assets.js))} | ${kb(jsGzip)} |
| CSS | ${assets.css.length} | ${kb(sumRaw(assets.css))} | ${kb(cssGzip)} |

Goal: JavaScript under 60 KB gzipped: ${jsGzip < 60 * 1024 ? 'met' : 'not met'}.
`);
console.log('written to docs/performance.md');
