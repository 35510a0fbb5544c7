// axe-core (pinned in package.json) injected into a page of a browser test. `seriousViolations`
// lists what axe finds at the serious or critical level, in words a failing test can print.
import { createRequire } from 'node:module';
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';

const require = createRequire(import.meta.url);
const AXE_SOURCE = readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');

export interface AxeViolation {
	id: string;
	impact: string | null;
	help: string;
	nodes: string[];
}

/** Runs axe (WCAG 2.0/2.1 A and AA rules) on the page as it is now. */
export async function axeViolations(page: Page): Promise<AxeViolation[]> {
	// Evaluated through the DevTools protocol, which the app's Content Security Policy does not
	// cover (a <script> tag would be refused, as it should be).
	if (!(await page.evaluate(() => 'axe' in window))) await page.evaluate(AXE_SOURCE);
	return page.evaluate(async () => {
		const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: unknown[] }> } }).axe;
		const r = await axe.run(document, {
			runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] },
			resultTypes: ['violations']
		});
		return (r.violations as Array<{ id: string; impact: string | null; help: string; nodes: Array<{ target: unknown[] }> }>).map((v) => ({
			id: v.id,
			impact: v.impact,
			help: v.help,
			nodes: v.nodes.slice(0, 5).map((n) => n.target.map(String).join(' '))
		}));
	});
}

/** The serious and critical violations on the page, as "rule (impact): help — nodes" lines. */
export async function seriousViolations(page: Page): Promise<string[]> {
	return (await axeViolations(page))
		.filter((v) => v.impact === 'serious' || v.impact === 'critical')
		.map((v) => `${v.id} (${v.impact}): ${v.help} — ${v.nodes.join(', ')}`);
}
