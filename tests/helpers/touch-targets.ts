// Touch targets of at least 44 × 44 CSS px (WCAG 2.5.5). A control counts with the label that
// wraps it (tapping the label works the control). Links inside running text are left out, as
// WCAG's inline exception allows; a link that stands alone (the only thing in its line) is not.
import type { Page } from 'playwright-core';

export async function smallTargets(page: Page, min = 44): Promise<string[]> {
	return page.evaluate((min) => {
		const out: string[] = [];
		const visible = (el: Element) => {
			const r = el.getBoundingClientRect();
			const s = getComputedStyle(el);
			return r.width > 1 && r.height > 1 && s.visibility !== 'hidden' && s.display !== 'none';
		};
		const describe = (el: Element) => {
			const text = (el.getAttribute('aria-label') || (el as HTMLElement).innerText || el.getAttribute('name') || '').trim().slice(0, 40);
			return `<${el.tagName.toLowerCase()}${el.getAttribute('type') ? ` type=${el.getAttribute('type')}` : ''}> "${text}"`;
		};
		const standalone = (a: Element) => {
			const block = a.parentElement;
			if (!block) return true;
			return (block.textContent ?? '').trim() === (a.textContent ?? '').trim();
		};
		const nodes = document.querySelectorAll('a[href], button, input:not([type=hidden]), select, textarea, summary');
		for (const el of nodes) {
			if (!visible(el) || el.closest('[data-touch-exempt]')) continue;
			if (el.tagName === 'A' && !standalone(el)) continue;
			const box = (el.closest('label') ?? el).getBoundingClientRect();
			if (box.width < min - 0.5 || box.height < min - 0.5)
				out.push(`${describe(el)} is ${Math.round(box.width)} × ${Math.round(box.height)} px`);
		}
		return out;
	}, min);
}
