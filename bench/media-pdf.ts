// Memory of turning an uploaded PDF drawing into its display image and thumbnail, the work the
// upload routes do (processMedia). Each case runs in a fresh child process, so the figures are
// that process's own: resident memory before, the peak during (getrusage maxRSS) and after.
// Prints figures; no pass/fail.
//   npx tsx bench/media-pdf.ts
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { DEFAULT_LIMITS, processMedia } from '../src/lib/server/media/process';
import { pdfDrawing, pdfPage } from '../tests/helpers/images';

const CASES: Record<string, () => Promise<Buffer>> = {
	'A4 landscape drawing (842 × 595 pt)': async () => pdfDrawing(),
	'A0 landscape drawing (3370 × 2384 pt)': () => pdfPage(3370, 2384),
	'200 × 200 in page (14400 × 14400 pt)': () => pdfPage(14400, 14400)
};

const mb = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(0)} MB`;

async function runCase(name: string) {
	const bytes = await CASES[name]!();
	// Load PDFium and sharp first, so "before" includes the libraries and the peak is the file's.
	await processMedia(pdfDrawing());
	global.gc?.();
	const before = process.memoryUsage().rss;
	const t0 = performance.now();
	const r = await processMedia(bytes);
	const ms = performance.now() - t0;
	global.gc?.();
	const after = process.memoryUsage().rss;
	const peak = process.resourceUsage().maxRSS * 1024;
	const px = r.display.width * r.display.height;
	const budget = Math.min(DEFAULT_LIMITS.maxPixels, DEFAULT_LIMITS.pdfRenderMaxPixels);
	console.log(
		`${name.padEnd(40)} display ${r.display.width} × ${r.display.height} (${(px / 1e6).toFixed(1)} MP, budget ${(budget / 1e6).toFixed(1)} MP)  ` +
			`RSS before ${mb(before)}, peak ${mb(peak)} (+${mb(peak - before)}), after ${mb(after)}  ${ms.toFixed(0)} ms`
	);
}

const only = process.argv[2];
if (only) {
	await runCase(only);
} else {
	console.log(`PDF rendering memory (node ${process.version}, one child process per case)`);
	for (const name of Object.keys(CASES)) {
		execFileSync(process.execPath, ['--expose-gc', '--import', 'tsx', fileURLToPath(import.meta.url), name], { stdio: 'inherit' });
	}
}
