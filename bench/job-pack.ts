// Time, size and memory of drawing job packs of growing size (renderJobPack, no database).
// Rendering yields to the event loop between points, so the figure is the total, not one block.
// Prints figures; no pass/fail.
//   npm run bench:jobpack
import { PDFDocument } from 'pdf-lib';
import { renderJobPack } from '../src/lib/server/jobs/pack/render';
import { packInput } from '../tests/helpers/job-pack';

const mb = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(1)} MB`;

// The first pack loads and embeds the fonts; keep it out of the figures.
await renderJobPack(await packInput({ count: 1 }));

for (const count of process.argv[2] ? [Number(process.argv[2])] : [3, 40, 200]) {
	for (const paper of ['A4', 'Letter'] as const) {
		const input = await packInput({ count, paper });
		global.gc?.();
		const before = process.memoryUsage().rss;
		const t0 = performance.now();
		const bytes = await renderJobPack(input);
		const ms = performance.now() - t0;
		const pages = (await PDFDocument.load(bytes)).getPageCount();
		console.log(
			`${String(count).padStart(3)} points, ${paper.padEnd(6)} ${String(pages).padStart(3)} pages  ${mb(bytes.length).padStart(7)}  ` +
				`${ms.toFixed(0).padStart(6)} ms  RSS ${mb(before)} → ${mb(process.memoryUsage().rss)} (peak ${mb(process.resourceUsage().maxRSS * 1024)})`
		);
	}
}
